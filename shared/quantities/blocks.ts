import { round, requireNumber, type Computation } from './types.ts';

export interface WallBlocksInputs { pitLengthMm: number; pitWidthMm: number; wallHeightMm: number; blockLengthMm: number; blockHeightMm: number; jointMm: number }
export interface WallBlocks { wallAreaM2: number; blocksPerM2Exact: number; blocksPerM2: number; blocks: number }

/**
 * Retaining-wall blocks round the pit: wall area = perimeter × height; blocks per m² =
 * 1 ÷ ((length + joint) × (height + joint)), rounded up to whole blocks per m² to allow for cuts.
 * @example
 * retainingWallBlocks({ pitLengthMm: 2500, pitWidthMm: 2500, wallHeightMm: 900, blockLengthMm: 440, blockHeightMm: 215, jointMm: 10 }).result
 * // { wallAreaM2: 9, blocksPerM2Exact: 9.877, blocksPerM2: 10, blocks: 90 }
 */
export function retainingWallBlocks(inputs: WallBlocksInputs): Computation<WallBlocksInputs, WallBlocks> {
  const { pitLengthMm: l, pitWidthMm: w, wallHeightMm: h, blockLengthMm: bl, blockHeightMm: bh, jointMm: j } = inputs;
  for (const [k, v] of Object.entries(inputs)) requireNumber(k, v);
  requireNumber('blockLengthMm', bl, 0, true);
  requireNumber('blockHeightMm', bh, 0, true);
  const perimeterM = 2 * (l + w) / 1000;
  const wallAreaM2 = round(perimeterM * (h / 1000), 4);
  const exact = 1 / (((bl + j) / 1000) * ((bh + j) / 1000));
  const blocksPerM2 = Math.ceil(exact);
  const blocks = Math.ceil(wallAreaM2 * blocksPerM2 - 1e-9);
  return {
    name: 'Retaining-wall blocks',
    inputs: { ...inputs },
    formula: `2 × (${l} + ${w}) mm × ${h} mm = ${wallAreaM2} m²; 1 ÷ (${(bl + j) / 1000} × ${(bh + j) / 1000}) = ${round(exact)} → ${blocksPerM2} blocks/m²; ⌈${wallAreaM2} × ${blocksPerM2}⌉ = ${blocks} blocks`,
    result: { wallAreaM2, blocksPerM2Exact: round(exact), blocksPerM2, blocks },
    unit: 'blocks',
    notes: ['440 × 215 mm dense block with 10 mm joints, about 10 blocks per m²: common practice, no source. Retaining-wall design is for a competent person.'],
  };
}
