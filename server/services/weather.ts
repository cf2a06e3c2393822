import type { Knex } from 'knex';
import { z } from 'zod';
import { toEngineBoard } from '../../shared/board-data.ts';
import { analyseBoard, type Violation } from '../../shared/scheduler/index.ts';
import type { Actor } from './actor.ts';
import { loadBoard } from './board.ts';
import { recordChange } from './audit.ts';
import { notifyBookingChange } from './board-stream.ts';

const DAY_MS = 86_400_000;
/** Forecast days asked for: Open-Meteo's forecast API gives up to 16. */
export const FORECAST_DAYS = 16;
/** Bases poured this many days ago or less still have their forecasts refreshed (common practice, no source: a cure rarely runs longer). */
export const REFRESH_PAST_DAYS = 10;
/** The forecast service did not answer with a forecast (down, refused, or an answer we can't read). */
export class WeatherUnavailableError extends Error {
  override name = 'WeatherUnavailableError';
}

/** One day's mean air temperature at 2 m, °C. */
export interface DailyMean {
  date: string;
  meanC: number;
}

const ForecastAnswer = z.object({
  daily: z.object({
    time: z.array(z.string().regex(/^\d{4}-\d{2}-\d{2}$/)),
    temperature_2m_mean: z.array(z.number().nullable()),
  }),
});

/**
 * Daily mean temperatures for a position from the Open-Meteo forecast API (or the local fake at
 * the same path): GET /v1/forecast?latitude&longitude&daily=temperature_2m_mean&timezone&forecast_days=16.
 * Days the service leaves empty (null) are left out. Any failure is a WeatherUnavailableError.
 *
 * @example
 * await fetchDailyMeans('https://api.open-meteo.com', 53.9, -1.8, 'Europe/London') // [{ date: '2026-06-01', meanC: 12.4 }, …]
 */
export async function fetchDailyMeans(
  baseUrl: string,
  latitude: number,
  longitude: number,
  timeZone: string,
  fetchFn: typeof fetch = fetch,
): Promise<DailyMean[]> {
  const url = new URL('/v1/forecast', baseUrl);
  url.search = new URLSearchParams({
    latitude: String(latitude),
    longitude: String(longitude),
    daily: 'temperature_2m_mean',
    timezone: timeZone,
    forecast_days: String(FORECAST_DAYS),
  }).toString();
  let res: Response;
  try {
    res = await fetchFn(url, { signal: AbortSignal.timeout(10_000), headers: { accept: 'application/json' } });
  } catch (error) {
    throw new WeatherUnavailableError(
      `The weather service could not be reached (${error instanceof Error ? error.message : String(error)})`,
    );
  }
  if (!res.ok) {
    const reason = await res.json().then(
      (b: unknown) => {
        const r = (b as { reason?: unknown } | null)?.reason;
        return typeof r === 'string' ? `: ${r}` : '';
      },
      () => '',
    );
    throw new WeatherUnavailableError(`The weather service answered ${res.status}${reason}`);
  }
  const parsed = ForecastAnswer.safeParse(await res.json().catch(() => null));
  if (!parsed.success || parsed.data.daily.time.length !== parsed.data.daily.temperature_2m_mean.length) {
    throw new WeatherUnavailableError('The weather service answered with something other than daily mean temperatures');
  }
  const { time, temperature_2m_mean: means } = parsed.data.daily;
  return time.flatMap((date, i) => (typeof means[i] === 'number' ? [{ date, meanC: means[i] }] : []));
}

/** Reads a firm's board as its office would, for the refresh's cure check (no person behind it). */
const officeOf = (firmId: string): Actor => ({ userId: '0', firmId, firmKind: 'installer', role: 'scheduler' });

async function cureViolationsOf(knex: Knex, firmId: string, jobId: string, now: number): Promise<Violation[]> {
  const data = await loadBoard(knex, officeOf(firmId), {
    from: now - 30 * DAY_MS,
    to: now + 90 * DAY_MS,
    jobIds: [jobId],
    now,
  });
  const stagesOfJob = new Set(data.stages.filter((s) => s.jobId === jobId).map((s) => s.id));
  return analyseBoard(toEngineBoard(data), { now }).violations.filter(
    (v) => v.kind === 'cure' && stagesOfJob.has(String(v.details?.predecessorId)),
  );
}

export interface RefreshResult {
  /** Jobs whose forecast was fetched and stored. */
  refreshed: string[];
  /** Jobs whose forecast could not be had: their stored days stay, the rest falls back to the seasonal assumption. */
  failed: { jobId: string; reason: string }[];
  /** Booked stages the new forecast made too early for their base's cure. */
  lateLifts: { jobId: string; stageId: string; bookingIds: string[]; message: string }[];
}

/**
 * Refreshes the forecast of every site whose base was poured in the last ten days or is booked in
 * the next sixteen (a survey with the site's position on file), storing each day's mean (days
 * gone by keep their last forecast). A cure the new forecast pushes past a booked stage (a lift)
 * is told to the office: an audit row (`cure_forecast`) and a board-stream event on that
 * stage's bookings, so open boards reload and show the cure warning.
 */
export async function refreshForecasts(
  knex: Knex,
  options: { baseUrl: string; now: number; fetchFn?: typeof fetch },
): Promise<RefreshResult> {
  const { now } = options;
  const sites = (await knex('stages as st')
    .join('bookings as b', 'b.stage_id', 'st.id')
    .join('jobs as j', 'j.id', 'st.job_id')
    .join('firms as f', 'f.id', 'j.firm_id')
    .join('surveys as s', 's.job_id', 'j.id')
    .whereNotNull('st.cure')
    .whereNot('b.state', 'declined')
    .whereNotNull('s.site_latitude')
    .where('b.ends_at', '>=', new Date(now - REFRESH_PAST_DAYS * DAY_MS))
    .where('b.starts_at', '<=', new Date(now + FORECAST_DAYS * DAY_MS))
    .distinct(
      'j.id as jobId',
      'j.firm_id as firmId',
      'f.time_zone as timeZone',
      's.site_latitude as latitude',
      's.site_longitude as longitude',
    )
    .orderBy('j.id')) as { jobId: string; firmId: string; timeZone: string; latitude: number; longitude: number }[];
  const result: RefreshResult = { refreshed: [], failed: [], lateLifts: [] };
  for (const site of sites) {
    const jobId = String(site.jobId),
      firmId = String(site.firmId);
    let days: DailyMean[];
    try {
      days = await fetchDailyMeans(
        options.baseUrl,
        Number(site.latitude),
        Number(site.longitude),
        site.timeZone,
        options.fetchFn,
      );
    } catch (error) {
      result.failed.push({ jobId, reason: error instanceof Error ? error.message : String(error) });
      continue;
    }
    const before = await cureViolationsOf(knex, firmId, jobId, now);
    await knex.transaction(async (trx) => {
      if (days.length) {
        await trx('site_forecasts')
          .insert(days.map((d) => ({ job_id: jobId, date: d.date, mean_c: d.meanC, fetched_at: new Date(now) })))
          .onConflict(['job_id', 'date'])
          .merge(['mean_c', 'fetched_at']);
      }
    });
    result.refreshed.push(jobId);
    const was = new Map(before.map((v) => [String(v.details?.dependencyId), v]));
    const late = (await cureViolationsOf(knex, firmId, jobId, now)).filter(
      (v) => !was.has(String(v.details?.dependencyId)),
    );
    if (late.length === 0) continue;
    await knex.transaction(async (trx) => {
      for (const v of late) {
        const stageId = String(v.details?.successorId);
        const bookings = (await trx('bookings')
          .where('stage_id', stageId)
          .whereNot('state', 'declined')
          .select('id', 'resource_id')) as { id: string; resourceId: string }[];
        await recordChange(
          trx,
          null,
          'cure_forecast',
          stageId,
          'update',
          null,
          {
            jobId,
            stageId,
            releaseAt: new Date(Number(v.details?.releaseAt)).toISOString(),
            message: v.message,
            summary: v.details?.summary ?? null,
          },
          firmId,
        );
        for (const b of bookings) await notifyBookingChange(trx, String(b.id), stageId, String(b.resourceId));
        result.lateLifts.push({ jobId, stageId, bookingIds: bookings.map((b) => String(b.id)), message: v.message });
      }
    });
  }
  return result;
}
