import { CAUTIONS, CAUTION_NOTE } from './cautions.ts';

/**
 * What the crew goes through with the householder at handover, item by item, with the cautions
 * each carries. The handover page shows it, the householder signs for it and the pack prints it.
 * The chemical and water-hygiene cautions are the product's one list (shared/cautions.ts); the
 * rest are the usual cautions of the trade (common practice, no source). They remind; the maker's
 * manual, the safety data sheets and local guidance decide.
 */
export interface HandoverItem {
  id: string;
  title: string;
  shown: string;
  cautions: readonly string[];
}

export const HANDOVER_CHECKLIST = [
  {
    id: 'controls',
    title: 'The controls',
    shown:
      'Showed the control panel: heating and temperature, pumps and jets, lights, filter cycles and any economy setting, and what the panel shows when something is wrong.',
    cautions: [
      'Keep the water at or below 40 °C; children, pregnant bathers and anyone with a health condition should ask their doctor about bathing and keep sessions short.',
    ],
  },
  {
    id: 'cover',
    title: 'The cover and safe lifting',
    shown:
      'Showed how to take the cover off and put it back: with the cover lifter, or two people, lifting with bent knees and a straight back.',
    cautions: [
      "The cover is heavy, heavier still when wet: lift it with the cover lifter or two people, never alone at arm's length.",
      'Lock the cover straps every time the spa is left: a closed, locked cover keeps children out.',
      'Never stand, sit or lie on the cover.',
    ],
  },
  {
    id: 'water_care',
    title: 'Water care',
    shown: 'Went through testing the water, sanitiser and pH, cleaning the filters, and when to drain and refill.',
    cautions: [...CAUTIONS.water_hygiene, 'Follow the local water-hygiene guidance where it asks more than this.'],
  },
  {
    id: 'chemicals',
    title: 'Chemical safety',
    shown: 'Went through the chemical-safety cautions with the products left on site.',
    cautions: [...CAUTIONS.chemicals, 'Keep chemicals locked away from children, in a cool dry place.'],
  },
  {
    id: 'electrics',
    title: 'Electrics',
    shown: 'Showed the isolator and the RCD, and how to test the RCD.',
    cautions: [
      'Test the RCD as often as its maker says, with its test button; if it does not trip, stop using the spa and call the installer.',
      'Switch off at the isolator before opening the cabinet, draining or cleaning the filters.',
    ],
  },
  {
    id: 'who_to_call',
    title: 'Who to call',
    shown: "Left the installer's phone for faults and service visits, and the warranty details.",
    cautions: ['In an emergency switch the spa off at the isolator, then call.'],
  },
] as const satisfies readonly HandoverItem[];

export type HandoverItemId = (typeof HANDOVER_CHECKLIST)[number]['id'];
export const HANDOVER_ITEM_IDS = HANDOVER_CHECKLIST.map((i) => i.id) as HandoverItemId[];

/** The close of every caution list, as elsewhere in the product. */
export const HANDOVER_NOTE = CAUTION_NOTE;

/** The warranty reminder the pack carries (the maker's terms decide; common practice, no source). */
export const WARRANTY_REMINDER =
  "Register the spa's warranty with its maker as their paperwork asks, usually within 30 days of installation, and keep this pack with your receipt.";
