import { createHash } from 'node:crypto';
import { isIP } from 'node:net';
import { z } from 'zod';

/** Express's named ranges for `trust proxy` (proxy-addr). */
const PROXY_RANGES = new Set(['loopback', 'linklocal', 'uniquelocal']);

/**
 * TRUST_PROXY: which proxies may say who the client is (X-Forwarded-For). Unset or `false` trusts
 * none, so the client address is the socket's; a whole number trusts that many hops; otherwise a
 * comma-separated list of addresses, CIDR ranges and Express's named ranges. `true` (trust every
 * hop) is refused: any client could then pick its own address, and with it its rate-limit bucket.
 */
const TrustProxy = z
  .string()
  .trim()
  .default('false')
  .refine(
    (v) => v !== 'true',
    'true would let any client choose its address; give a number of proxies or their addresses',
  )
  .refine(
    (v) =>
      v === 'false' ||
      /^\d+$/.test(v) ||
      v.split(',').every((part) => {
        const [address = '', bits, ...extra] = part.trim().split('/');
        if (PROXY_RANGES.has(address) && bits === undefined) return true;
        const family = isIP(address);
        const maxBits = family === 4 ? 32 : 128;
        return (
          family !== 0 && extra.length === 0 && (bits === undefined || (/^\d+$/.test(bits) && Number(bits) <= maxBits))
        );
      }),
    'give false, a number of proxies, or addresses, CIDR ranges, loopback, linklocal or uniquelocal separated by commas',
  )
  .transform((v): false | number | string[] =>
    v === 'false' ? false : /^\d+$/.test(v) ? Number(v) : v.split(',').map((part) => part.trim()),
  );

/** Every production setting comes from the environment; see .env.example. */
const Env = z.object({
  NODE_ENV: z.enum(['development', 'test', 'production']).default('development'),
  PORT: z.coerce.number().int().default(3000),
  HOST: z.string().default('127.0.0.1'),
  PUBLIC_URL: z.url().default('http://127.0.0.1:3000'),
  // The release every web process of one deployment runs (e.g. the commit): their board ETags then agree,
  // so a 304 holds whichever process answers. Unset, each process tags its own (safe, fewer 304s).
  RELEASE_ID: z
    .string()
    .regex(/^[\w.-]{1,64}$/)
    .optional(),
  DATABASE_URL: z.string().min(1),
  REDIS_URL: z.string().min(1).default('redis://127.0.0.1:6379'),
  SESSION_SECRET: z.string().min(16, 'SESSION_SECRET must be at least 16 characters'),
  GOOGLE_CLIENT_ID: z.string().min(1),
  GOOGLE_CLIENT_SECRET: z.string().min(1),
  // Left unset in production (Google's own endpoints); set to the local fake provider otherwise.
  OAUTH_AUTHORIZATION_URL: z.url().optional(),
  OAUTH_TOKEN_URL: z.url().optional(),
  OAUTH_USERINFO_URL: z.url().optional(),
  SMTP_URL: z.string().default('smtp://127.0.0.1:2525'),
  MAIL_FROM: z.string().default('Waterline <no-reply@waterline.invalid>'),
  S3_ENDPOINT: z.string().optional(),
  S3_BUCKET: z.string().default('waterline'),
  S3_ACCESS_KEY_ID: z.string().optional(),
  S3_SECRET_ACCESS_KEY: z.string().optional(),
  FULLCALENDAR_LICENSE_KEY: z.string().default('GPL-My-Project-Is-Open-Source'),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  // Rate limits, counted per client address in Redis so every web process shares them
  // (server/middleware/rate-limit.ts). Sign-ins started per window:
  SIGN_IN_RATE_LIMIT: z.coerce.number().int().min(1).default(30),
  // Refused answer links, invitation links and calendar feeds per window (a good link is free).
  // The default figures are our own judgement of a busy office behind one address, no source.
  ANSWER_LINK_RATE_LIMIT: z.coerce.number().int().min(1).default(30),
  INVITE_LINK_RATE_LIMIT: z.coerce.number().int().min(1).default(20),
  FEED_RATE_LIMIT: z.coerce.number().int().min(1).default(30),
  RATE_LIMIT_WINDOW_SECONDS: z.coerce
    .number()
    .int()
    .min(1)
    .default(15 * 60),
  // The start of every rate-limit key in Redis, so two deployments (or test runs) sharing one never mix.
  RATE_LIMIT_PREFIX: z
    .string()
    .regex(/^[\w:.-]+$/)
    .default('waterline:rate'),
  TRUST_PROXY: TrustProxy,
  // Signs the answer, invitation and feed links in e-mails; required in production (see loadConfig).
  LINK_SECRET: z.string().min(32, 'LINK_SECRET must be at least 32 characters').optional(),
  // A request to a partner unanswered this long is flagged overdue and gets one reminder.
  REMINDER_HOURS: z.coerce.number().min(1).default(48),
  // The BullMQ queue the outbox relay feeds and the mail worker drains.
  MAIL_QUEUE: z
    .string()
    .regex(/^[\w-]+$/)
    .default('mail'),
  // Bookings lie within this many days of today (the write path refuses others with a field error).
  BOOKING_WINDOW_PAST_DAYS: z.coerce.number().int().min(1).max(3650).default(730),
  BOOKING_WINDOW_FUTURE_DAYS: z.coerce.number().int().min(1).max(3650).default(1095),
  // Working minutes a booking may run past what its stage needs (one working day by default).
  BOOKING_EXTRA_WORKING_MINUTES: z.coerce
    .number()
    .int()
    .min(0)
    .max(10 * 480)
    .default(480),
  // The weather forecast service (Open-Meteo's forecast API; the local fake in npm start and tests).
  WEATHER_API_URL: z.url().default('https://api.open-meteo.com'),
  // How often the worker refreshes the forecasts of sites with a base poured or about to be.
  WEATHER_REFRESH_HOURS: z.coerce.number().min(1).max(168).default(24),
  // The BullMQ queue of the daily forecast refresh (one per installation, like MAIL_QUEUE).
  WEATHER_QUEUE: z
    .string()
    .regex(/^[\w-]+$/)
    .default('weather'),
  // Pruning (workers/prune.ts, every PRUNE_EVERY_HOURS): e-mails sent or given up on (outbox rows
  // created this many days ago; pending and queued rows are never pruned), refused link attempts, and
  // the board's change marks behind its ETags. Our own judgement of how long each stays useful, no source.
  PRUNE_EVERY_HOURS: z.coerce.number().min(1).max(168).default(24),
  OUTBOX_KEEP_DAYS: z.coerce.number().int().min(1).max(3650).default(30),
  LINK_ATTEMPTS_KEEP_DAYS: z.coerce.number().int().min(1).max(3650).default(90),
  BOARD_CHANGES_KEEP_DAYS: z.coerce.number().int().min(1).max(365).default(2),
  // The payment provider's API key and webhook signing secret (deposits and balances from the
  // householder). Both or neither; with neither, npm start and the tests use the local fake
  // (scripts/fakes/payments.ts, FAKE_PAYMENTS_*), and production has no payments.
  PAYMENT_SECRET_KEY: z.string().trim().min(1).optional(),
  PAYMENT_WEBHOOK_SECRET: z.string().trim().min(1).optional(),
  FAKE_PAYMENTS_URL: z.url().optional(),
  FAKE_PAYMENTS_SECRET_KEY: z.string().optional(),
  FAKE_PAYMENTS_WEBHOOK_SECRET: z.string().optional(),
});
export type Config = z.infer<typeof Env> & { LINK_SECRET: string };

/** Secrets from .env.example and the local stack, never acceptable in production. */
const PLACEHOLDER_SECRETS = new Set([
  'change-me-to-a-long-random-string',
  'local-only-session-secret-not-for-production',
]);

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = Env.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Waterline's settings are incomplete:\n${lines.join('\n')}`);
  }
  const { LINK_SECRET, ...rest } = parsed.data;
  if (rest.NODE_ENV === 'production') {
    const missing: string[] = [];
    // Links in e-mails, problem types and calendar UIDs are built on PUBLIC_URL: a default would
    // send partners to 127.0.0.1.
    if (!env.PUBLIC_URL)
      missing.push('PUBLIC_URL: is required in production (the address people open, e.g. https://plan.example.com)');
    if (!LINK_SECRET) missing.push('LINK_SECRET: is required in production');
    if (PLACEHOLDER_SECRETS.has(rest.SESSION_SECRET) || (LINK_SECRET && PLACEHOLDER_SECRETS.has(LINK_SECRET))) {
      missing.push(
        'SESSION_SECRET / LINK_SECRET: the example or local value cannot be used in production; generate a random one',
      );
    }
    if (missing.length > 0)
      throw new Error(`Waterline's settings are incomplete:\n${missing.map((m) => `  ${m}`).join('\n')}`);
  }
  if (Boolean(rest.PAYMENT_SECRET_KEY) !== Boolean(rest.PAYMENT_WEBHOOK_SECRET)) {
    throw new Error(
      "Waterline's settings are incomplete:\n  PAYMENT_SECRET_KEY / PAYMENT_WEBHOOK_SECRET: give both (the provider's API key and its webhook signing secret) or neither",
    );
  }
  // Outside production a link secret derived from the session secret keeps local set-up to one setting.
  return {
    ...rest,
    LINK_SECRET:
      LINK_SECRET ?? createHash('sha256').update(`waterline-links:${rest.SESSION_SECRET}`).digest('base64url'),
  };
}

/** The booking bounds the guarded write path keeps. */
export function bookingLimitsOf(
  config: Pick<Config, 'BOOKING_WINDOW_PAST_DAYS' | 'BOOKING_WINDOW_FUTURE_DAYS' | 'BOOKING_EXTRA_WORKING_MINUTES'>,
) {
  return {
    pastDays: config.BOOKING_WINDOW_PAST_DAYS,
    futureDays: config.BOOKING_WINDOW_FUTURE_DAYS,
    extraWorkingMinutes: config.BOOKING_EXTRA_WORKING_MINUTES,
  };
}
