import http from 'node:http';
import type { AddressInfo } from 'node:net';
import express from 'express';

/** The daily mean (°C) the fake gives for a date at a position. */
export type FakeTemperature = (date: string, latitude: number, longitude: number) => number;

export interface FakeWeather {
  /** Base URL to use as WEATHER_API_URL. */
  url: string;
  /** Forecast requests answered or refused so far (the query of each). */
  requests: URLSearchParams[];
  /** While on, every forecast request fails with 503 (a weather service outage). */
  setOutage(on: boolean): void;
  /** Replaces the temperatures (a test's own figures); `undefined` goes back to the default. */
  setTemperature(fn: FakeTemperature | undefined): void;
  stop(): Promise<void>;
}

const DAY_MS = 86_400_000;

/**
 * The fake's own deterministic temperatures: a smooth yearly swing (coldest mid-January, warmest
 * mid-July, 10 °C ± 6 °C at 52° N) cooling by 0.6 °C for each degree further from the equator,
 * rounded to 0.1 °C. Invented figures for local use, not a climate.
 */
export const defaultFakeTemperature: FakeTemperature = (date, latitude) => {
  const dayOfYear = (Date.parse(`${date}T00:00:00Z`) - Date.parse(`${date.slice(0, 4)}-01-01T00:00:00Z`)) / DAY_MS;
  const swing = -Math.cos((2 * Math.PI * (dayOfYear - 15)) / 365);
  return Math.round((10 + 6 * swing - 0.6 * (Math.abs(latitude) - 52)) * 10) / 10;
};

/** YYYY-MM-DD of an instant in a time zone. */
function dateIn(ms: number, timeZone: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(
    new Date(ms),
  );
}

const bad = (res: express.Response, reason: string) => res.status(400).json({ error: true, reason });

/**
 * A local stand-in for the Open-Meteo forecast API on 127.0.0.1: GET /v1/forecast with
 * `latitude`, `longitude`, `daily=temperature_2m_mean`, `timezone` and `forecast_days` (1–16)
 * answers in the same JSON shape (`daily.time`, `daily.temperature_2m_mean`, starting today in that
 * time zone), with deterministic temperatures. Bad parameters get Open-Meteo's
 * `{ "error": true, "reason": … }` with 400. `POST /control/outage {"on": true}` (or `setOutage`)
 * makes every forecast fail with 503 until switched off. `now` sets the fake's "today" (tests).
 */
export async function startFakeWeather(
  port: number,
  options: { now?: () => number; temperature?: FakeTemperature } = {},
): Promise<FakeWeather> {
  const now = options.now ?? Date.now;
  let temperature = options.temperature ?? defaultFakeTemperature;
  let outage = false;
  const requests: URLSearchParams[] = [];
  const app = express();
  app.use(express.json());

  app.get('/v1/forecast', (req, res) => {
    const q = new URL(req.originalUrl, 'http://fake').searchParams;
    requests.push(q);
    if (outage) {
      res.status(503).type('text/plain').send('Service unavailable (simulated outage)');
      return;
    }
    const latitude = Number(q.get('latitude')),
      longitude = Number(q.get('longitude'));
    if (!q.has('latitude') || !(latitude >= -90 && latitude <= 90)) {
      bad(res, 'Latitude must be in range of -90 to 90°.');
      return;
    }
    if (!q.has('longitude') || !(longitude >= -180 && longitude <= 180)) {
      bad(res, 'Longitude must be in range of -180 to 180°.');
      return;
    }
    const daily = (q.get('daily') ?? '').split(',').filter(Boolean);
    if (daily.some((d) => d !== 'temperature_2m_mean')) {
      bad(res, `This fake only knows temperature_2m_mean, not ${daily.join(',')}.`);
      return;
    }
    const timeZone = q.get('timezone') ?? 'GMT';
    try {
      dateIn(0, timeZone);
    } catch {
      bad(res, `Invalid timezone ${timeZone}`);
      return;
    }
    const days = q.has('forecast_days') ? Number(q.get('forecast_days')) : 7;
    if (!Number.isInteger(days) || days < 0 || days > 16) {
      bad(res, 'Forecast days is invalid. Allowed range 0 to 16.');
      return;
    }
    const today = dateIn(now(), timeZone);
    const time = Array.from({ length: days }, (_, d) =>
      new Date(Date.parse(`${today}T00:00:00Z`) + d * DAY_MS).toISOString().slice(0, 10),
    );
    res.json({
      latitude,
      longitude,
      generationtime_ms: 0.1,
      utc_offset_seconds: 0,
      timezone: timeZone,
      timezone_abbreviation: timeZone,
      elevation: 0,
      ...(daily.length
        ? {
            daily_units: { time: 'iso8601', temperature_2m_mean: '°C' },
            daily: { time, temperature_2m_mean: time.map((t) => temperature(t, latitude, longitude)) },
          }
        : {}),
    });
  });
  app.post('/control/outage', (req, res) => {
    outage = Boolean((req.body as { on?: unknown } | undefined)?.on);
    res.json({ outage });
  });

  const server = http.createServer(app);
  await new Promise<void>((resolve) => server.listen(port, '127.0.0.1', resolve));
  const bound = (server.address() as AddressInfo).port;
  return {
    url: `http://127.0.0.1:${bound}`,
    requests,
    setOutage(on) {
      outage = on;
    },
    setTemperature(fn) {
      temperature = fn ?? defaultFakeTemperature;
    },
    stop: () =>
      new Promise((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
