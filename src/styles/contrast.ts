/**
 * WCAG 2.2 contrast ratio, from the relative luminance definition in WCAG 2.2 §"relative luminance"
 * (sRGB, 0.04045 threshold as in IEC 61966-2-1).
 * @example contrastRatio('#FFFFFF', '#000000') // 21
 */
export function relativeLuminance(hex: string): number {
  const match = /^#?([0-9a-f]{6})$/i.exec(hex);
  if (!match?.[1]) throw new RangeError(`Not a #RRGGBB colour: ${hex}`);
  const digits = match[1];
  const [r, g, b] = [0, 2, 4].map((start) => {
    const channel = parseInt(digits.slice(start, start + 2), 16) / 255;
    return channel <= 0.04045 ? channel / 12.92 : ((channel + 0.055) / 1.055) ** 2.4;
  }) as [number, number, number];
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

export function contrastRatio(a: string, b: string): number {
  const [light, dark] = [relativeLuminance(a), relativeLuminance(b)].sort((x, y) => y - x) as [number, number];
  return (light + 0.05) / (dark + 0.05);
}
