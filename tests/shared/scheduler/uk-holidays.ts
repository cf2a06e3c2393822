// The UK's bank holidays for 2026 and 2027 as the engine's calendars carry them (the server lists
// them from date-holidays, server/services/holiday-days.ts; tests/server/holiday-days.test.ts checks
// that it gives these dates). Source: gov.uk/bank-holidays — from memory (not read in this session).
import type { PublicHoliday } from '../../../shared/scheduler/index.js';

const list = (days: [string, string][]): PublicHoliday[] => days.map(([date, name]) => ({ date, name }));

/** England and Wales (GB/ENG, GB/WLS), 2026–2027. */
export const ENGLAND_AND_WALES = list([
  ['2026-01-01', "New Year's Day"],
  ['2026-04-03', 'Good Friday'],
  ['2026-04-06', 'Easter Monday'],
  ['2026-05-04', 'Early May bank holiday'],
  ['2026-05-25', 'Spring bank holiday'],
  ['2026-08-31', 'Summer bank holiday'],
  ['2026-12-25', 'Christmas Day'],
  ['2026-12-28', 'Boxing Day (substitute day)'],
  ['2027-01-01', "New Year's Day"],
  ['2027-03-26', 'Good Friday'],
  ['2027-03-29', 'Easter Monday'],
  ['2027-05-03', 'Early May bank holiday'],
  ['2027-05-31', 'Spring bank holiday'],
  ['2027-08-30', 'Summer bank holiday'],
  ['2027-12-27', 'Christmas Day (substitute day)'],
  ['2027-12-28', 'Boxing Day (substitute day)'],
]);

/** Scotland (GB/SCT), 2026–2027. */
export const SCOTLAND = list([
  ['2026-01-01', "New Year's Day"],
  ['2026-01-02', '2nd January'],
  ['2026-04-03', 'Good Friday'],
  ['2026-05-04', 'Early May bank holiday'],
  ['2026-05-25', 'Spring bank holiday'],
  ['2026-08-03', 'Summer bank holiday'],
  ['2026-11-30', "St Andrew's Day"],
  ['2026-12-25', 'Christmas Day'],
  ['2026-12-28', 'Boxing Day (substitute day)'],
  ['2027-01-01', "New Year's Day"],
  ['2027-01-04', '2nd January (substitute day)'],
  ['2027-03-26', 'Good Friday'],
  ['2027-05-03', 'Early May bank holiday'],
  ['2027-05-31', 'Spring bank holiday'],
  ['2027-08-02', 'Summer bank holiday'],
  ['2027-11-30', "St Andrew's Day"],
  ['2027-12-27', 'Christmas Day (substitute day)'],
  ['2027-12-28', 'Boxing Day (substitute day)'],
]);

/** Northern Ireland (GB/NIR), 2026–2027. */
export const NORTHERN_IRELAND = list([
  ['2026-01-01', "New Year's Day"],
  ['2026-03-17', "St Patrick's Day"],
  ['2026-04-03', 'Good Friday'],
  ['2026-04-06', 'Easter Monday'],
  ['2026-05-04', 'Early May bank holiday'],
  ['2026-05-25', 'Spring bank holiday'],
  ['2026-07-13', 'Battle of the Boyne (substitute day)'],
  ['2026-08-31', 'Summer bank holiday'],
  ['2026-12-25', 'Christmas Day'],
  ['2026-12-28', 'Boxing Day (substitute day)'],
  ['2027-01-01', "New Year's Day"],
  ['2027-03-17', "St Patrick's Day"],
  ['2027-03-26', 'Good Friday'],
  ['2027-03-29', 'Easter Monday'],
  ['2027-05-03', 'Early May bank holiday'],
  ['2027-05-31', 'Spring bank holiday'],
  ['2027-07-12', 'Battle of the Boyne'],
  ['2027-08-30', 'Summer bank holiday'],
  ['2027-12-27', 'Christmas Day (substitute day)'],
  ['2027-12-28', 'Boxing Day (substitute day)'],
]);
