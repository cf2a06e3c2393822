/** What the stage move answers: the saved bookings and the engine's warnings about them. */
export interface WriteResultBody {
  bookings: { id: string; startsAt: string; endsAt: string; resourceId: string; state: string }[];
  warnings: { message: string }[];
}

/**
 * The words after a fix was applied: done, and any warning the board's checks still have.
 * @example fixDoneText({ bookings: [b], warnings: [] }) // 'Fix applied: 1 booking moved'
 */
export function fixDoneText(result: WriteResultBody): string {
  const n = result.bookings.length;
  const moved = `Fix applied: ${n} booking${n === 1 ? '' : 's'} moved`;
  return result.warnings.length ? `${moved}. Still to look at: ${result.warnings[0]!.message}` : moved;
}
