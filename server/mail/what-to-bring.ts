/**
 * What a partner's people bring, by the kind of resource booked (the cautions themselves come from
 * shared/cautions.ts, the one list every output uses).
 */
/** What a partner's people should bring, by the kind of resource booked. */
const BRING_BY_RESOURCE: Record<string, string[]> = {
  crane: [
    "The lift plan and the lift supervisor's contact",
    'Outrigger mats or spreader pads',
    'Lifting gear with current inspection records',
  ],
  electrician: ['Test instruments and certification forms', 'Isolator, RCD and cable as specified for the unit'],
  groundworks_crew: ['Cable locator and utility plans', 'Edge protection and barriers', 'A pump for water in the pit'],
  lorry: ['The delivery note', 'Straps and corner protectors', "The loader crane's inspection record if it will lift"],
  excavator: ["The machine's current inspection record", "The operator's competence card"],
  dumper: ["The machine's current inspection record", "The operator's competence card"],
};
const BRING_ALWAYS = 'Usual protective kit: boots, gloves, hi-vis, and a hard hat where there is lifting or digging';

export function whatToBring(resourceKind: string): string[] {
  return [...(BRING_BY_RESOURCE[resourceKind] ?? []), BRING_ALWAYS];
}
