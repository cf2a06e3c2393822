import { describe, expect, it } from 'vitest';
import { contrastRatio } from '@/styles/contrast';
import { bookingStateColours, bookingStateVariables, palette } from '@/styles/palette';
import { STATE_LABELS } from '@/components/board/board-events';

// Thresholds from WCAG 2.2: 1.4.3 (text, 4.5:1) and 1.4.11 (graphical objects such as a booking's edge, 3:1).
const TEXT = 4.5;
const NON_TEXT = 3;

describe('booking-state colours', () => {
  it('exist for every state the board knows', () => {
    expect(Object.keys(bookingStateColours).sort()).toEqual(Object.keys(STATE_LABELS).sort());
  });

  it.each(Object.entries(bookingStateColours))(
    '%s: ink and muted ink (the town) read on its tint, its edge stands out from the page',
    (_state, c) => {
      expect(contrastRatio(palette.ink, c.background)).toBeGreaterThanOrEqual(TEXT);
      expect(contrastRatio(palette.inkMuted, c.background)).toBeGreaterThanOrEqual(TEXT);
      expect(contrastRatio(c.edge, palette.surface)).toBeGreaterThanOrEqual(NON_TEXT);
      expect(contrastRatio(c.edge, c.background)).toBeGreaterThanOrEqual(NON_TEXT);
    },
  );

  it('reach the board as CSS custom properties, on-site spelt with a dash', () => {
    const variables = bookingStateVariables();
    expect(variables['--wl-booking-on-site-edge']).toBe(bookingStateColours.on_site.edge);
    expect(variables['--wl-booking-pencilled-background']).toBe(bookingStateColours.pencilled.background);
    expect(Object.keys(variables)).toHaveLength(2 * Object.keys(STATE_LABELS).length);
  });
});
