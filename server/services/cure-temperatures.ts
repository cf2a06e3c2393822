import type { Knex } from 'knex';
import { ageForStrengthRatio, DATUM_C, REFERENCE_C, type CureRule } from '../../shared/scheduler/index.ts';

const DAY_MS = 86_400_000;
/** Days of temperatures handed to the engine past a cure's release (room for a pour moved on the board before it reloads). */
const MARGIN_DAYS = 7;
/** At most a year of days: every month of the seasonal table comes round, so any sensible datum is passed. */
const MAX_DAYS = 366;

/**
 * Monthly mean air temperature (°C), January to December, per country of the firm's holiday
 * region: the seasonal assumption when a site has no forecast for a day. GB: UK mean daily air
 * temperature, Met Office 1991–2020 climate averages (from memory, rounded to 0.1 °C). A month's
 * mean stands for each of its days.
 */
export const SEASONAL_MONTHLY_MEANS_C: Record<string, { basis: string; means: readonly number[] }> = {
  GB: {
    basis: 'UK monthly mean air temperature, Met Office 1991–2020 averages',
    means: [4.1, 4.2, 5.7, 7.9, 10.9, 13.7, 15.6, 15.4, 13.2, 10.0, 6.7, 4.4],
  },
};

/** The seasonal table of a firm's holiday region (e.g. GB-ENG → GB), or null when there is none. */
export function seasonalTableOf(
  holidayRegion: string | null | undefined,
): { basis: string; means: readonly number[] } | null {
  const country = (holidayRegion ?? '').split('-')[0] ?? '';
  return SEASONAL_MONTHLY_MEANS_C[country] ?? null;
}

/** YYYY-MM-DD of an instant in a time zone. */
function dateIn(ms: number, timeZone: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(
    new Date(ms),
  );
}
const addDays = (isoDate: string, days: number) =>
  new Date(Date.parse(`${isoDate}T00:00:00Z`) + days * DAY_MS).toISOString().slice(0, 10);

/** What the board loader hands over: the stages, their jobs and the bookings it read. */
export interface CureWeatherInput {
  stages: readonly { id: string; jobId: string; cure: CureRule | null }[];
  jobs: readonly { id: string; firmId: string; siteTown: string | null }[];
  bookings: readonly { stageId: string; endMs: number; state: string }[];
  now: number;
}

/**
 * The cure rule of each cured stage as the engine should read it: the firm's datum (unless the
 * stage's mix has its own) and the 23 °C reference; and, for a job whose survey gives the site's
 * position, the daily mean temperatures from the day the pour ends (site time; today while the pour
 * is not booked): the stored forecast where there is one, else the seasonal monthly mean of the
 * firm's region, each day marked with its source. A job with no position keeps the plain age at
 * the reference temperature. The jobs come from the caller's scoped query, so their rows are read
 * by id here.
 */
export async function cureRulesFromWeather(
  knex: Knex | Knex.Transaction,
  input: CureWeatherInput,
): Promise<Map<string, CureRule>> {
  const out = new Map<string, CureRule>();
  const cured = input.stages.filter((s): s is typeof s & { cure: CureRule } => Boolean(s.cure));
  if (cured.length === 0) return out;
  const jobIds = [...new Set(cured.map((s) => s.jobId))];
  const jobById = new Map(input.jobs.map((j) => [j.id, j]));
  const firmIds = [...new Set(jobIds.map((id) => jobById.get(id)?.firmId).filter((f): f is string => Boolean(f)))];
  const since = dateIn(input.now - 120 * DAY_MS, 'UTC');
  // One after another: the board loader may call this inside a transaction, whose one connection
  // must not get overlapping queries (pg warns now and refuses from version 9).
  const firms = await (knex('firms')
    .leftJoin('firm_settings', 'firm_settings.firm_id', 'firms.id')
    .whereIn('firms.id', firmIds)
    .select('firms.id', 'firms.time_zone', 'firms.holiday_region', 'firm_settings.cure_datum_c') as Promise<
    { id: string; timeZone: string; holidayRegion: string | null; cureDatumC: number | null }[]
  >);
  const positions = await (knex('surveys')
    .whereIn('job_id', jobIds)
    .whereNotNull('site_latitude')
    .select('job_id') as Promise<{ jobId: string }[]>);
  const forecasts = await (knex('site_forecasts')
    .whereIn('job_id', jobIds)
    .where('date', '>=', since)
    .select('job_id', 'date', 'mean_c') as Promise<{ jobId: string; date: string; meanC: number }[]>);
  const firmById = new Map(firms.map((f) => [String(f.id), f]));
  const positioned = new Set(positions.map((p) => String(p.jobId)));
  const forecastOf = new Map<string, Map<string, number>>();
  for (const f of forecasts) {
    const m = forecastOf.get(String(f.jobId)) ?? new Map<string, number>();
    m.set(f.date, f.meanC);
    forecastOf.set(String(f.jobId), m);
  }
  const pourEnd = new Map<string, number>();
  for (const b of input.bookings)
    if (b.state !== 'declined') pourEnd.set(b.stageId, Math.max(pourEnd.get(b.stageId) ?? 0, b.endMs));

  for (const s of cured) {
    const job = jobById.get(s.jobId);
    const firm = job ? firmById.get(String(job.firmId)) : undefined;
    const datumC = s.cure.datumC ?? firm?.cureDatumC ?? DATUM_C;
    const rule: CureRule = { ...s.cure, datumC, referenceC: s.cure.referenceC ?? REFERENCE_C };
    const table = seasonalTableOf(firm?.holidayRegion);
    // Temperatures stated on the stage itself stay as they are; without a position there is no forecast to use.
    if (!job || !firm || !positioned.has(s.jobId) || s.cure.dailyMeanTempsC?.length) {
      out.set(s.id, rule);
      continue;
    }
    const day0 = dateIn(pourEnd.get(s.id) ?? input.now, firm.timeZone);
    const stored = forecastOf.get(s.jobId);
    const temps: number[] = [],
      fromForecast: boolean[] = [];
    // Days until the release (counted as the engine will) and a margin, at most a year.
    let te = 0,
      releasedOn: number | null = null;
    const needed = ageForStrengthRatio(rule.targetFraction);
    for (let d = 0; d < MAX_DAYS && (releasedOn === null || d <= releasedOn + MARGIN_DAYS); d++) {
      const date = addDays(day0, d);
      const f = stored?.get(date);
      const t = f ?? table?.means[Number(date.slice(5, 7)) - 1];
      if (t === undefined) break;
      temps.push(t);
      fromForecast.push(f !== undefined);
      te += Math.max(0, t - datumC) / (rule.referenceC! - datumC);
      if (releasedOn === null && te >= needed) releasedOn = d;
    }
    // No forecast and no seasonal table for the region: the plain age at the reference temperature.
    if (temps.length === 0 || (releasedOn === null && (temps.at(-1) ?? datumC) <= datumC)) {
      out.set(s.id, rule);
      continue;
    }
    out.set(s.id, {
      ...rule,
      dailyMeanTempsC: temps,
      fromForecast,
      temperatureSource: fromForecast.some(Boolean) ? 'forecast' : 'seasonal',
      temperaturesFrom: day0,
      ...(job.siteTown ? { temperaturePlace: job.siteTown } : {}),
      ...(table ? { seasonalBasis: table.basis } : {}),
    });
  }
  return out;
}
