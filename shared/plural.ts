/**
 * A count and its noun, in English: "1 day", "2 days", "1.5 days", "0 bookings". The one place
 * the product makes a plural, so no screen or e-mail says "1 days" or "2 skip".
 *
 * The regular English endings (common practice, no source): a consonant and "y" become "ies"
 * (lorry → lorries), "s", "x", "z", "ch" and "sh" take "es" (pass → passes), everything else takes
 * "s". Give the plural yourself where English does not follow them (person → people). Only the
 * last word changes: "working day" → "working days".
 *
 * @example
 * plural(1, 'day')                 // '1 day'
 * plural(2, 'working day')         // '2 working days'
 * plural(1.5, 'day')               // '1.5 days'
 * plural(3, 'lorry')               // '3 lorries'
 * plural(2, 'person', 'people')    // '2 people'
 * plural(2, 'day', undefined, false) // 'days' (the noun alone, for "2 of 3 days")
 */
export function plural(count: number, singular: string, pluralForm?: string, withCount = true): string {
  const word = count === 1 ? singular : (pluralForm ?? regularPlural(singular));
  return withCount ? `${count} ${word}` : word;
}

function regularPlural(singular: string): string {
  if (/[^aeiou]y$/i.test(singular)) return `${singular.slice(0, -1)}ies`;
  if (/(s|x|z|ch|sh)$/i.test(singular)) return `${singular}es`;
  return `${singular}s`;
}
