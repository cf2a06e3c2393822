import { round, requireNumber, type Computation } from './types.ts';
import type { BlockLaying } from './settings.ts';

export interface WallBlocksInputs {
  /** The pit inside its walls. */
  insideLengthMm: number;
  insideWidthMm: number;
  wallHeightMm: number;
  blockLengthMm: number;
  blockHeightMm: number;
  blockThicknessMm: number;
  jointMm: number;
  /** How the firm lays them; the other way is counted too, for comparison. */
  laying: BlockLaying;
}
export interface WallBlocksLaid {
  /** On edge the wall is the block's thickness; flat, the block's height. */
  wallThicknessMm: number;
  /** Centre-line length of the four walls × their height. */
  wallAreaM2: number;
  blocksPerM2Exact: number;
  blocksPerM2: number;
  blocks: number;
}
export interface WallBlocks extends WallBlocksLaid {
  laying: BlockLaying;
  onEdge: WallBlocksLaid;
  flat: WallBlocksLaid;
}

/** A wall's thickness for a way of laying: on edge the block's thickness, flat its height. */
export function wallThicknessFor(
  laying: BlockLaying,
  block: { blockHeightMm: number; blockThicknessMm: number },
): number {
  return laying === 'flat' ? block.blockHeightMm : block.blockThicknessMm;
}

function laid(i: WallBlocksInputs, laying: BlockLaying): WallBlocksLaid {
  const wallThicknessMm = wallThicknessFor(laying, i);
  // The face a block shows: on edge length × height; flat length × thickness.
  const faceHeightMm = laying === 'flat' ? i.blockThicknessMm : i.blockHeightMm;
  const centreLineM = (2 * (i.insideLengthMm + i.insideWidthMm) + 4 * wallThicknessMm) / 1000;
  const wallAreaM2 = round(centreLineM * (i.wallHeightMm / 1000), 4);
  const exact = 1 / (((i.blockLengthMm + i.jointMm) / 1000) * ((faceHeightMm + i.jointMm) / 1000));
  const blocksPerM2 = Math.ceil(round(exact, 9));
  const blocks = Math.ceil(round(wallAreaM2 * blocksPerM2, 9));
  return { wallThicknessMm, wallAreaM2, blocksPerM2Exact: round(exact), blocksPerM2, blocks };
}

/**
 * Retaining-wall blocks round the pit, laid on edge or flat. Wall area = centre-line length × height, where the
 * centre line = 2 × (inside length + inside width) + 4 × wall thickness; blocks per m² = 1 ÷ ((length + joint) ×
 * (face height + joint)), rounded up to whole blocks per m² to allow for cuts.
 * @example
 * retainingWallBlocks({ insideLengthMm: 2950, insideWidthMm: 2500, wallHeightMm: 900, blockLengthMm: 440, blockHeightMm: 215,
 *   blockThicknessMm: 100, jointMm: 10, laying: 'flat' }).result.blocks
 * // 223  (flat: 2 × 5.45 + 4 × 0.215 = 11.76 m × 0.9 = 10.584 m²; 1 ÷ (0.45 × 0.11) = 20.2 → 21/m²; ⌈222.264⌉)
 */
export function retainingWallBlocks(inputs: WallBlocksInputs): Computation<WallBlocksInputs, WallBlocks> {
  const i = inputs;
  for (const k of ['insideLengthMm', 'insideWidthMm', 'wallHeightMm', 'jointMm'] as const) requireNumber(k, i[k]);
  for (const k of ['blockLengthMm', 'blockHeightMm', 'blockThicknessMm'] as const) requireNumber(k, i[k], 0, true);
  const onEdge = laid(i, 'on_edge');
  const flat = laid(i, 'flat');
  const chosen = i.laying === 'flat' ? flat : onEdge;
  const line = (name: string, l: WallBlocksLaid, faceMm: number) =>
    `${name}: (2 × (${i.insideLengthMm} + ${i.insideWidthMm}) + 4 × ${l.wallThicknessMm}) mm × ${i.wallHeightMm} mm = ${l.wallAreaM2} m²; ` +
    `1 ÷ (${(i.blockLengthMm + i.jointMm) / 1000} × ${(faceMm + i.jointMm) / 1000}) = ${l.blocksPerM2Exact} → ${l.blocksPerM2} blocks/m²; ` +
    `⌈${l.wallAreaM2} × ${l.blocksPerM2}⌉ = ${l.blocks} blocks`;
  return {
    name: 'Retaining-wall blocks',
    inputs: { ...inputs },
    formula: `${line('flat', flat, i.blockThicknessMm)}. ${line('on edge', onEdge, i.blockHeightMm)}. Laid ${i.laying === 'flat' ? 'flat' : 'on edge'}: ${chosen.blocks} blocks`,
    result: { ...chosen, laying: i.laying, onEdge, flat },
    unit: 'blocks',
    notes: [
      `${i.blockLengthMm} × ${i.blockHeightMm} × ${i.blockThicknessMm} mm dense block with ${i.jointMm} mm joints, rounded up to whole blocks a m² for cuts: common practice, no source.`,
      "Laid flat the wall is the block's height thick and takes about twice the blocks; retaining walls are often laid flat (common practice, no source). Retaining-wall design is for a competent person.",
      'Mortar is not counted here.',
    ],
  };
}
