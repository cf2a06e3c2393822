/**
 * Waterline's colours and type scale: the one source for the naive-ui theme (theme.ts) and for the
 * CSS custom properties (cssVariables()). Contrast figures are in DESIGN.md and checked by
 * tests/client/palette.test.ts.
 */
export const palette = {
  /** Deep water: actions, links, the selected nav item. */
  primary: '#0B5F73',
  primaryHover: '#0E7088',
  primaryPressed: '#084C5C',
  primarySoft: '#E0F0F3',
  /** The header band. */
  header: '#0A3542',
  headerText: '#FFFFFF',
  headerMuted: '#B9D3DA',
  /** Warm neutrals. */
  ink: '#24211E',
  inkMuted: '#5E5850',
  page: '#F7F5F1',
  surface: '#FFFFFF',
  border: '#DDD8D0',
  borderStrong: '#857D73',
  /** Focus rings: on light surfaces and on the header. */
  focus: '#0B5F73',
  focusOnDark: '#FFD166',
  /** Feedback. */
  error: '#B42318',
  warning: '#9A4A00',
  success: '#17663F',
  info: '#1D5A9E',
} as const;

export interface TagColours {
  text: string;
  background: string;
}

/** Job states: dark text on a pale tint of the same hue. */
export const statusColours = {
  enquiry: { text: '#4A443E', background: '#ECE8E2' },
  surveyed: { text: '#4F2F86', background: '#EEE8F7' },
  planned: { text: '#164B7C', background: '#E2EDF8' },
  in_progress: { text: '#7A4500', background: '#FCEFD4' },
  handed_over: { text: '#1A5C31', background: '#E0F1E5' },
  cancelled: { text: '#8F1D1D', background: '#FBE3E3' },
} as const satisfies Record<string, TagColours>;

/** Who a resource belongs to. */
export const ownershipColours = {
  owned: { text: '#0B5F73', background: '#E0F0F3' },
  hired: { text: '#7A4500', background: '#FCEFD4' },
  partner: { text: '#4F2F86', background: '#EEE8F7' },
} as const satisfies Record<string, TagColours>;

/**
 * Booking states on the board: ink on a pale tint, framed by an edge of the state's hue. The edge's
 * shape (dashed, dotted, solid, double, thick left) tells the state as well (board.css), and so does
 * the symbol in the label, so colour is never the only sign.
 */
export const bookingStateColours = {
  pencilled: { background: '#EEF3F4', edge: '#5E6F75' },
  sent: { background: '#E2EDF8', edge: '#164B7C' },
  confirmed: { background: '#D7EDE6', edge: '#17663F' },
  declined: { background: '#FBE3E3', edge: '#8F1D1D' },
  on_site: { background: '#FCEFD4', edge: '#7A4500' },
  done: { background: '#ECE8E2', edge: '#857D73' },
} as const satisfies Record<string, { background: string; edge: string }>;

/**
 * The booking-state colours as CSS custom properties (`--wl-booking-on-site-edge`, …), set by the
 * board on its own page (the only place that draws bookings by state).
 * @example bookingStateVariables()['--wl-booking-sent-background'] // '#E2EDF8'
 */
export function bookingStateVariables(): Record<string, string> {
  const variables: Record<string, string> = {};
  for (const [state, c] of Object.entries(bookingStateColours)) {
    variables[`--wl-booking-${state.replace(/_/g, '-')}-background`] = c.background;
    variables[`--wl-booking-${state.replace(/_/g, '-')}-edge`] = c.edge;
  }
  return variables;
}

/** Type scale on Work Sans: 16 px base, ratio 1.2, in rem. */
export const typeScale = {
  small: '0.833rem',
  body: '1rem',
  h4: '1.2rem',
  h3: '1.44rem',
  h2: '1.728rem',
  h1: '2.074rem',
} as const;

export const fontFamily = "'Work Sans', system-ui, -apple-system, 'Segoe UI', Roboto, sans-serif";

const kebab = (name: string) => name.replace(/[A-Z]/g, (letter) => `-${letter.toLowerCase()}`);

/**
 * The palette, font and type scale as CSS custom properties (`--wl-primary`, `--wl-text-h1`, …),
 * so plain CSS and naive-ui read the same values. main.ts puts them on :root before mounting.
 * @example cssVariables()['--wl-primary'] // '#0B5F73'
 */
export function cssVariables(): Record<string, string> {
  const variables: Record<string, string> = { '--wl-font': fontFamily };
  for (const [name, value] of Object.entries(palette)) variables[`--wl-${kebab(name)}`] = value;
  for (const [name, value] of Object.entries(typeScale)) variables[`--wl-text-${kebab(name)}`] = value;
  return variables;
}
