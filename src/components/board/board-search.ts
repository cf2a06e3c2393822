/**
 * What the board shows under its search and filters: which rows, which bookings and which tray
 * stages. One search box finds a job by its reference, customer, town or postcode and a resource by
 * its name or firm; the job and state filters narrow the bookings. A booking the scheduler asked to
 * see (a clash the filters hid) is always shown, with its row. Pure, so it is tested without a browser.
 */
import type { BoardBooking, BoardData, BoardJob, BoardResource, BoardStage } from '@shared/board-data';
import type { BookingState } from '@shared/scheduler/index';
import { kindLabel } from './board-events';

export interface BoardFilterInput {
  /** The search box. */
  q: string;
  jobId: string;
  state: BookingState | '';
  firmId: string;
  kind: string;
}

export const NO_FILTER: BoardFilterInput = { q: '', jobId: '', state: '', firmId: '', kind: '' };

/** The words of a search, lower case: "TW-2417  Otley" → ['tw-2417', 'otley']. */
export function searchTerms(q: string): string[] {
  return q.toLowerCase().split(/\s+/).filter(Boolean);
}

/** What a job is found by: its reference, customer, town and postcode (with and without its space). */
export function jobText(job: BoardJob): string {
  const postcode = job.sitePostcode ?? '';
  return [job.reference, job.customerName, job.siteTown, postcode, postcode.replace(/\s+/g, '')]
    .join(' ')
    .toLowerCase();
}

/** What a resource is found by: its name, its firm and its kind. */
export function resourceText(r: BoardResource): string {
  return [r.name, r.firmName, kindLabel(r.kind)].join(' ').toLowerCase();
}

/** True when every word is found somewhere in the texts (words may match different fields). */
export function matchesAll(terms: readonly string[], ...texts: string[]): boolean {
  const all = texts.join(' ');
  return terms.every((t) => all.includes(t));
}

export interface BoardVisibility {
  /** Resource ids of the rows shown. */
  rows: Set<string>;
  /** Ids of the bookings shown (busy-elsewhere blocks included on shown rows). */
  bookings: Set<string>;
  /** Whether a tray stage is shown. */
  trayStage: (stage: BoardStage) => boolean;
  /** True when any search or filter narrows the board. */
  filtering: boolean;
}

/**
 * The rows, bookings and tray stages the board shows.
 *
 * - A booking is shown when it passes the job, state, firm and kind filters and every search word
 *   is found in its job (reference, customer, town, postcode), its stage's name or its resource.
 * - A row is shown when it passes the firm and kind filters and, while searching, when the search
 *   finds the resource itself or the row carries a shown booking.
 * - A tray stage is shown when it passes the job filter and the search finds its job or its name,
 *   or it needs a kind of resource the search found.
 * - Bookings in `revealed` are always shown, and their rows.
 *
 * @example
 * boardVisibility(data, { ...NO_FILTER, q: 'TW-2417' }).rows // the rows TW-2417 is booked on
 */
export function boardVisibility(
  data: BoardData,
  f: BoardFilterInput,
  revealed: ReadonlySet<string> = new Set(),
): BoardVisibility {
  const terms = searchTerms(f.q);
  const jobs = new Map(data.jobs.map((j) => [j.id, j]));
  const stages = new Map(data.stages.map((s) => [s.id, s]));
  const resources = new Map(data.resources.map((r) => [r.id, r]));
  const rowFilter = (r: BoardResource) => (!f.firmId || r.firmId === f.firmId) && (!f.kind || r.kind === f.kind);
  const foundResources = new Set(
    terms.length ? data.resources.filter((r) => matchesAll(terms, resourceText(r))).map((r) => r.id) : [],
  );

  const ownShown = (b: BoardBooking): boolean => {
    const stage = stages.get(b.stageId);
    const job = stage && jobs.get(stage.jobId);
    const resource = resources.get(b.resourceId);
    if (!stage || !job || !resource) return false;
    if (f.jobId && job.id !== f.jobId) return false;
    if (f.state && b.state !== f.state) return false;
    if (!rowFilter(resource)) return false;
    return terms.length === 0 || matchesAll(terms, jobText(job), stage.name.toLowerCase(), resourceText(resource));
  };

  const bookings = new Set<string>();
  for (const b of data.bookings) if (revealed.has(b.id) || (!b.elsewhere && ownShown(b))) bookings.add(b.id);
  const rows = new Set<string>();
  for (const r of data.resources) {
    if (!rowFilter(r)) continue;
    if (terms.length === 0 || foundResources.has(r.id)) rows.add(r.id);
  }
  for (const b of data.bookings) if (bookings.has(b.id)) rows.add(b.resourceId);
  // Another installer's block is context for a row that is shown anyway.
  for (const b of data.bookings) if (b.elsewhere && rows.has(b.resourceId)) bookings.add(b.id);

  const foundKinds = new Set([...foundResources].map((id) => resources.get(id)!.kind));
  const trayStage = (s: BoardStage): boolean => {
    if (f.jobId && s.jobId !== f.jobId) return false;
    if (terms.length === 0) return true;
    const job = jobs.get(s.jobId);
    return (
      (job !== undefined && matchesAll(terms, jobText(job), s.name.toLowerCase())) ||
      s.requirements.some((r) => foundKinds.has(r.kind))
    );
  };

  return {
    rows,
    bookings,
    trayStage,
    filtering: terms.length > 0 || Boolean(f.jobId || f.state || f.firmId || f.kind),
  };
}

/** A booking a refusal cites that the filters hide, named by its job so the scheduler can find it. */
export interface HiddenBooking {
  bookingId: string;
  jobId: string;
  reference: string;
}

/**
 * The bookings a refusal cites (violation booking ids) that the board does not show now; another
 * installer's "busy elsewhere" block has no job to name and is left out.
 *
 * @example
 * hiddenCited(data, visibility, ['b7', 'b9']) // [{ bookingId: 'b9', jobId: 'j3', reference: 'TW-2423' }]
 */
export function hiddenCited(
  data: BoardData,
  visibility: Pick<BoardVisibility, 'bookings'>,
  bookingIds: readonly string[],
): HiddenBooking[] {
  const out: HiddenBooking[] = [];
  for (const id of new Set(bookingIds)) {
    if (visibility.bookings.has(id)) continue;
    const b = data.bookings.find((x) => x.id === id);
    const job =
      b && !b.elsewhere
        ? data.jobs.find((j) => j.id === data.stages.find((s) => s.id === b.stageId)?.jobId)
        : undefined;
    if (job) out.push({ bookingId: id, jobId: job.id, reference: job.reference });
  }
  return out;
}

/** "(TW-2423 is hidden by the filters)", to follow a refusal that cites bookings the board does not show. */
export function hiddenNote(hidden: readonly HiddenBooking[]): string {
  const refs = [...new Set(hidden.map((h) => h.reference))];
  if (refs.length === 0) return '';
  return `(${refs.join(', ')} ${refs.length === 1 ? 'is' : 'are'} hidden by the filters)`;
}
