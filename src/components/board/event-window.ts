/**
 * Which rows of a large board get their bookings drawn. The timeline draws every row it is given
 * (cheap: a name and an empty lane), but a booking costs it about sixteen elements and a measure,
 * so on a board of hundreds of rows only the rows in view (and a viewport above and below) get
 * their bookings; the others keep the height their bookings need, so nothing jumps as they come
 * into view. Pure, so it is tested without a browser; useEventWindow measures the lanes and hands
 * their boxes in.
 */

/** Above this many rows the board draws only the bookings of the rows in view. */
export const WINDOW_ABOVE_ROWS = 60;

/** A row as the timeline orders them: by group, then kind, then name. */
export interface OrderedRow {
  id: string;
  group: string;
  kind: string;
  title: string;
}

/**
 * The first rows of the board, in the timeline's order (its `resourceOrder: 'group,kind,title'`,
 * texts compared by locale): the rows a board opening at its top shows, drawn with their
 * bookings from the first go instead of on a second pass.
 *
 * @example
 * firstRows(rows, 30) // the ids of the 30 rows at the top
 */
export function firstRows(rows: readonly OrderedRow[], count: number): string[] {
  return [...rows]
    .sort((a, b) => a.group.localeCompare(b.group) || a.kind.localeCompare(b.kind) || a.title.localeCompare(b.title))
    .slice(0, count)
    .map((r) => r.id);
}

/** A drawn lane: its resource, and where it is in the board's scrolled content (px). */
export interface LaneBox {
  id: string;
  top: number;
  height: number;
}

/** The part of the board in view: its scroll offset and height (px). */
export interface Viewport {
  top: number;
  height: number;
}

const meets = (lane: LaneBox, from: number, to: number) => lane.top < to && lane.top + lane.height > from;

/**
 * The rows whose bookings to draw: every lane within one viewport above and below the view.
 *
 * @example
 * rowsToDraw([{ id: 'a', top: 0, height: 40 }, { id: 'b', top: 4000, height: 40 }], { top: 0, height: 800 })
 * // Set { 'a' }
 */
export function rowsToDraw(lanes: readonly LaneBox[], view: Viewport): Set<string> {
  const out = new Set<string>();
  for (const lane of lanes) if (meets(lane, view.top - view.height, view.top + 2 * view.height)) out.add(lane.id);
  return out;
}

/**
 * Whether the view comes within half a viewport of a row whose bookings are not drawn (time to
 * draw a new window, before that row scrolls into view). Rows drawn but no longer near stay drawn
 * until then, so scrolling a little draws nothing new.
 *
 * @example
 * needsRedraw(lanes, new Set(['a']), { top: 3600, height: 800 }) // true: 'b' at 4,000 px is near
 */
export function needsRedraw(lanes: readonly LaneBox[], drawn: ReadonlySet<string>, view: Viewport): boolean {
  const from = view.top - view.height / 2,
    to = view.top + view.height * 1.5;
  for (const lane of lanes) if (meets(lane, from, to) && !drawn.has(lane.id)) return true;
  return false;
}

/** What the stacking needs of a booking: its row and times (epoch ms). */
export interface Span {
  resourceId: string;
  start: number;
  end: number;
}

/**
 * How many bookings deep each row stacks: the most that overlap at once, after `snap` widens each
 * to what the timeline draws (a whole day in the fortnight and month views). Rows with none are
 * left out.
 *
 * @example
 * stackDepths([{ resourceId: 'a', start: 0, end: 10 }, { resourceId: 'a', start: 5, end: 15 }]) // Map { 'a' => 2 }
 */
export function stackDepths(
  spans: readonly Span[],
  snap: (start: number, end: number) => [number, number] = (s, e) => [s, e],
): Map<string, number> {
  const byRow = new Map<string, [number, number][]>();
  for (const s of spans) {
    const list = byRow.get(s.resourceId);
    const snapped = snap(s.start, s.end);
    if (list) list.push(snapped);
    else byRow.set(s.resourceId, [snapped]);
  }
  const out = new Map<string, number>();
  for (const [id, list] of byRow) {
    // A sweep over starts and ends: an end at the same instant as a start frees its place first.
    const points = list.flatMap(([s, e]) => [
      [s, 1],
      [e, -1],
    ]);
    points.sort((a, b) => (a[0] as number) - (b[0] as number) || (a[1] as number) - (b[1] as number));
    let depth = 0,
      most = 0;
    for (const [, d] of points) {
      depth += d as number;
      if (depth > most) most = depth;
    }
    out.set(id, most);
  }
  return out;
}

/**
 * The height (px) to keep for a row whose bookings are not drawn: what it measured when they were;
 * else what a drawn row of the same stack depth measured; else its depth times the height one
 * level took.
 *
 * @example
 * reservedHeight('crane-1', { measured: new Map(), depths: new Map([['crane-1', 2]]), byDepth: new Map(), levelHeight: 26 }) // 52
 */
export function reservedHeight(
  id: string,
  known: {
    measured: ReadonlyMap<string, number>;
    depths: ReadonlyMap<string, number>;
    byDepth: ReadonlyMap<number, number>;
    levelHeight: number;
  },
): number {
  const depth = known.depths.get(id) ?? 0;
  return known.measured.get(id) ?? known.byDepth.get(depth) ?? depth * known.levelHeight;
}

/**
 * The value counted most often (the smaller of a tie): the height most drawn rows of one stack
 * depth had, which a few rows of longer words do not sway.
 *
 * @example
 * mostCommon(new Map([[79, 20], [95, 3]])) // 79
 */
export function mostCommon(counts: ReadonlyMap<number, number>): number {
  let best = Number.NaN,
    most = 0;
  for (const [value, n] of counts) if (n > most || (n === most && value < best)) [best, most] = [value, n];
  return best;
}

/**
 * The bookings to hand the timeline: those of drawn rows, and any carrying one of the `always`
 * classes (a report's outlined bookings, which the board scrolls to).
 *
 * @example
 * eventsToDraw(events, new Set(['crane-1']), ['wl-pointed'])
 */
export function eventsToDraw<E extends { resourceId: string; classNames: readonly string[] }>(
  events: readonly E[],
  drawn: ReadonlySet<string>,
  always: readonly string[],
): E[] {
  return events.filter((e) => drawn.has(e.resourceId) || e.classNames.some((c) => always.includes(c)));
}
