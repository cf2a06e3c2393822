import { describe, expect, it } from 'vitest';
import { contrastRatio } from '@/styles/contrast';
import { cssVariables, ownershipColours, palette, statusColours } from '@/styles/palette';

// Thresholds from WCAG 2.2: 1.4.3 (text, 4.5:1) and 1.4.11 (UI components and focus indicators, 3:1).
const TEXT = 4.5;
const NON_TEXT = 3;

describe('contrastRatio', () => {
  it('matches the WCAG end points and a known pair', () => {
    expect(contrastRatio('#FFFFFF', '#000000')).toBeCloseTo(21, 5);
    expect(contrastRatio('#777777', '#FFFFFF')).toBeCloseTo(4.48, 2); // the well-known "#777 just fails" pair
  });
});

describe('the palette meets WCAG 2.2 AA', () => {
  const textPairs: [string, string, string][] = [
    ['ink on page', palette.ink, palette.page],
    ['ink on surface', palette.ink, palette.surface],
    ['muted ink on page', palette.inkMuted, palette.page],
    ['muted ink on surface', palette.inkMuted, palette.surface],
    ['primary on surface', palette.primary, palette.surface],
    ['primary on page', palette.primary, palette.page],
    ['white on primary', palette.surface, palette.primary],
    ['white on primary hover', palette.surface, palette.primaryHover],
    ['white on primary pressed', palette.surface, palette.primaryPressed],
    ['pressed primary on soft primary', palette.primaryPressed, palette.primarySoft],
    ['header text on header', palette.headerText, palette.header],
    ['muted header text on header', palette.headerMuted, palette.header],
    ['error on surface', palette.error, palette.surface],
    ['warning on surface', palette.warning, palette.surface],
    ['success on surface', palette.success, palette.surface],
    ['info on surface', palette.info, palette.surface],
    ...Object.entries({ ...statusColours }).map(([name, c]): [string, string, string] => [
      `state ${name}`,
      c.text,
      c.background,
    ]),
    ...Object.entries({ ...ownershipColours }).map(([name, c]): [string, string, string] => [
      `ownership ${name}`,
      c.text,
      c.background,
    ]),
  ];
  it.each(textPairs)('%s reaches 4.5:1', (_name, fg, bg) => {
    expect(contrastRatio(fg, bg)).toBeGreaterThanOrEqual(TEXT);
  });

  const nonTextPairs: [string, string, string][] = [
    ['control border on surface', palette.borderStrong, palette.surface],
    ['control border on page', palette.borderStrong, palette.page],
    ['focus ring on surface', palette.focus, palette.surface],
    ['focus ring on page', palette.focus, palette.page],
    ['focus ring on header', palette.focusOnDark, palette.header],
  ];
  it.each(nonTextPairs)('%s reaches 3:1', (_name, fg, bg) => {
    expect(contrastRatio(fg, bg)).toBeGreaterThanOrEqual(NON_TEXT);
  });
});

describe('cssVariables', () => {
  it('carries the palette, font and type scale under --wl- names', () => {
    const variables = cssVariables();
    expect(variables['--wl-primary']).toBe(palette.primary);
    expect(variables['--wl-ink-muted']).toBe(palette.inkMuted);
    expect(variables['--wl-focus-on-dark']).toBe(palette.focusOnDark);
    expect(variables['--wl-text-h1']).toBe('2.074rem');
    expect(variables['--wl-text-h4']).toBe('1.2rem');
    expect(variables['--wl-font']).toMatch(/^'Work Sans'/);
    expect(Object.keys(variables)).toHaveLength(Object.keys(palette).length + 7);
  });
});
