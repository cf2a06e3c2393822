/**
 * What a booking reads as on the board: the job reference, the stage and the town, led by its
 * state symbol and markers. The chip carries both the stage's full and short name; the board's CSS
 * picks the form that fits the chip's width (container queries in board.css), and the full text is
 * always in the tooltip and the accessible name.
 */
import { hyphenateSync } from 'hyphen/en-gb';
import { timeZoneOffset } from '@shared/scheduler/index';
import { BOOKING_MARKERS, STATE_LABELS, type EventInput } from './board-events';

type BookingProps = EventInput['extendedProps'];

/** Short names of the usual stage kinds, for chips too narrow for the stage's own name. */
export const STAGE_SHORT_NAMES: Record<string, string> = {
  survey: 'Survey',
  excavation: 'Dig',
  base_pour: 'Base',
  walls: 'Walls',
  electrical_first_fix: 'Cable',
  delivery: 'Delivery',
  lift: 'Lift',
  placement: 'Place',
  fill: 'Fill',
  electrical_connect: 'Connect',
  commission: 'Commission',
  handover: 'Handover',
  deck_check: 'Deck check',
};

/**
 * A stage's short name: ours for the usual kinds, otherwise the first word of its own name.
 * @example stageShortName('base_pour', 'Pour reinforced base') // 'Base'
 * @example stageShortName('pergola', 'Pergola footings') // 'Pergola'
 */
export function stageShortName(kind: string, name: string): string {
  return STAGE_SHORT_NAMES[kind] ?? name.split(/\s+/)[0] ?? name;
}

/** The symbols that lead a chip: each marker's, then the state's. */
export function chipMarks(props: Pick<BookingProps, 'state' | 'markers' | 'elsewhere'>): string {
  if (props.elsewhere) return '';
  return [...props.markers.map((m) => BOOKING_MARKERS[m].symbol), STATE_LABELS[props.state].symbol].join(' ');
}

/** "TW-2417 · Pour reinforced base · Otley" (a busy-elsewhere block just says so). */
export function bookingLine(props: Pick<BookingProps, 'reference' | 'stageName' | 'town' | 'elsewhere'>): string {
  if (props.elsewhere) return props.stageName;
  return [props.reference, props.stageName, props.town].filter(Boolean).join(' · ');
}

const WEEKDAYS = ['Sun', 'Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat'];
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/**
 * The browser's own zone: the timeline draws in it, so its tooltips speak it too. Asked once: a
 * new Intl.DateTimeFormat per booking cost half a second on a board of 3,000 bookings.
 */
let zone: string | undefined;
const browserZone = () => (zone ??= Intl.DateTimeFormat().resolvedOptions().timeZone);

/**
 * The local day and time of an instant, as "Mon 14 Sep" and "08:00" (our own words for months,
 * not Intl's, whose short names differ between engines: "Sep" or "Sept").
 */
export function localParts(instant: number, timeZone: string): { day: string; time: string } {
  const d = new Date(instant + timeZoneOffset(timeZone, instant));
  const pad = (n: number) => String(n).padStart(2, '0');
  return {
    day: `${WEEKDAYS[d.getUTCDay()]} ${d.getUTCDate()} ${MONTHS[d.getUTCMonth()]}`,
    time: `${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}`,
  };
}

/**
 * When a booking runs, as the firm reads it: "Mon 14 Sep 08:00–13:00", or across days
 * "Mon 14 Sep 08:00 – Tue 15 Sep 12:00". Without a zone, the browser's (as the timeline draws it).
 */
export function whenText(start: number, end: number, timeZone = browserZone()): string {
  const [a, b] = [localParts(start, timeZone), localParts(end, timeZone)];
  return a.day === b.day ? `${a.day} ${a.time}–${b.time}` : `${a.day} ${a.time} – ${b.day} ${b.time}`;
}

/**
 * Everything a booking says, one fact a line: the tooltip, and (joined) its accessible name.
 * @example bookingSummary(props, start, end) // ['TW-2417 · Pour reinforced base · Otley', '✔ Confirmed: the firm said yes', 'Mon 14 Sep 08:00–13:00']
 */
export function bookingSummary(props: BookingProps, start: number, end: number, timeZone?: string): string[] {
  if (props.elsewhere) return [`${props.stageName}: another installer's booking`, whenText(start, end, timeZone)];
  const state = STATE_LABELS[props.state];
  const lines = [
    bookingLine(props),
    `${state.symbol} ${state.label}: ${state.description}`,
    whenText(start, end, timeZone),
  ];
  for (const m of props.markers) {
    const marker = BOOKING_MARKERS[m];
    lines.push(
      m === 'problem' && props.problems.length
        ? `${marker.symbol} ${marker.label}: ${props.problems.join(' ')}`
        : `${marker.symbol} ${marker.label}: ${marker.description}`,
    );
  }
  return lines;
}

const SHY = '\u00AD';
/** A run of letters this long with no break of its own may be broken anywhere (with a hyphen). */
const LONG_RUN = 7;

/**
 * A name as the narrowest chips may break it: a soft hyphen at each break British English allows
 * (Liang's patterns, the ones TeX uses), so a day's column reads "Harrog-ate", not "Harroga/te".
 * A long run the patterns leave whole ("Horsforth") may break at any letter but its first and last
 * three, still with a hyphen. The browser shows a hyphen only where it breaks; the tooltip and the
 * accessible name keep the plain words.
 * @example breakable('Harrogate') // 'Har\u00ADrog\u00ADate'
 */
export function breakable(text: string): string {
  return hyphenateSync(text).replace(new RegExp(`[^\\s${SHY}-]{${LONG_RUN},}`, 'g'), (run) => {
    const letters = [...run];
    return letters.map((ch, i) => (i >= 3 && i <= letters.length - 3 ? SHY + ch : ch)).join('');
  });
}

function span(className: string, text?: string): HTMLSpanElement {
  const el = document.createElement('span');
  el.className = className;
  if (text !== undefined) el.textContent = text;
  return el;
}

/**
 * The chip's content as DOM nodes (built, not parsed from HTML, so names never become markup):
 * marks, reference (its prefix apart), the stage (full and short name) and the town, side by side
 * so the CSS can lay them out on one line, or three, or two in a day's column.
 */
export function chipNodes(props: BookingProps): HTMLElement {
  const chip = span(
    `wl-chip${props.elsewhere ? ' wl-chip--elsewhere' : props.markers.length ? ' wl-chip--marked' : ''}`,
  );
  if (props.elsewhere) {
    chip.textContent = props.stageName;
    return chip;
  }
  const marks = span('wl-chip__marks', chipMarks(props));
  marks.setAttribute('aria-hidden', 'true');
  const stage = span('wl-chip__stage');
  stage.append(
    span('wl-chip__sep', ' · '),
    span('wl-chip__full', props.stageName),
    span('wl-chip__short', breakable(stageShortName(props.stageKind, props.stageName))),
  );
  // The firm's own prefix ("TW-") is the same on every job of the board: the narrowest chips leave it to the tooltip.
  const ref = span('wl-chip__ref');
  const prefix = /^[A-Za-z]+-(?=\S)/.exec(props.reference)?.[0] ?? '';
  ref.append(span('wl-chip__prefix', prefix), props.reference.slice(prefix.length));
  chip.append(marks, ' ', ref, stage);
  if (props.town) {
    const town = span('wl-chip__town');
    town.append(span('wl-chip__sep', ' · '), breakable(props.town));
    chip.append(town);
  }
  return chip;
}
