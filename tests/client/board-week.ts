// The working week most client tests' boards use, and the Monday they start on (an invented scenario).

/** Monday to Friday 08:00–17:00, as minutes of the day (index 0 is Sunday). */
export const WEEK = [[], [[480, 1020]], [[480, 1020]], [[480, 1020]], [[480, 1020]], [[480, 1020]], []] as [
  number,
  number,
][][];
export const HOUR = 3_600_000;
/** Monday 14 September 2026, 08:00 in London (BST). */
export const MON = Date.UTC(2026, 8, 14, 7);
