import { isIPv6 } from 'node:net';
import type { Request, RequestHandler, Response } from 'express';
import { Redis } from 'ioredis';
import type { Logger } from 'pino';
import { RateLimiterMemory, RateLimiterRedis, RateLimiterRes } from 'rate-limiter-flexible';
import type { Config } from '../config.ts';
import { HttpError } from '../errors.ts';
import { escapeHtml, page } from '../pages/page.ts';

/** The settings the rate limits read (a whole Config will do). */
export type RateLimitSettings = Pick<
  Config,
  | 'REDIS_URL'
  | 'RATE_LIMIT_PREFIX'
  | 'RATE_LIMIT_WINDOW_SECONDS'
  | 'SIGN_IN_RATE_LIMIT'
  | 'ANSWER_LINK_RATE_LIMIT'
  | 'INVITE_LINK_RATE_LIMIT'
  | 'FEED_RATE_LIMIT'
>;

/** 429 as RFC 9457 problem+json, through the one error handler. */
export class TooManyRequestsError extends HttpError {
  constructor(title: string, detail: string) {
    super(429, 'rate-limited', title, detail);
  }
}

/**
 * The bucket of a client address. An IPv6 client usually holds a whole /56 or /64, so its buckets
 * are per /56 (express-rate-limit 8's default, read in its source); an IPv4-mapped IPv6 address is its IPv4.
 */
export function addressKey(ip: string | undefined): string {
  if (!ip) return 'unknown';
  const mapped = /^::ffff:(\d{1,3}(?:\.\d{1,3}){3})$/i.exec(ip);
  if (mapped) return mapped[1]!;
  const bare = ip.replace(/%.*$/, '');
  if (!isIPv6(bare)) return ip;
  const [head = '', tail] = bare.split('::');
  const groups = (part: string) => (part ? part.split(':').flatMap((g) => (g.includes('.') ? ['0', '0'] : [g])) : []);
  const front = groups(head);
  const back = tail === undefined ? [] : groups(tail);
  const full = [...front, ...Array<string>(8 - front.length - back.length).fill('0'), ...back].map((g) =>
    g.padStart(4, '0').toLowerCase(),
  );
  return `${full.slice(0, 3).join(':')}:${full[3]!.slice(0, 2)}00::/56`;
}

export interface BudgetOptions {
  /** Part of the Redis key, and of the log lines. */
  name: string;
  points: number;
  windowSeconds: number;
  /** Shown to the refused client. */
  title: string;
  detail: string;
  /**
   * Give the point back when the answer is a success (status < 400): the budget then counts only
   * refused requests, so guessing tokens runs out while a valid link can be opened any number of
   * times. It is still taken up front, so a burst of parallel guesses cannot overrun it.
   */
  refundSuccess?: boolean;
}

function minutesText(seconds: number): string {
  const minutes = Math.ceil(seconds / 60);
  return minutes <= 1 ? 'a minute' : `${minutes} minutes`;
}

/** The draft-7 rate-limit fields (draft-ietf-httpapi-ratelimit-headers-07), as express-rate-limit sent them. */
function setRateHeaders(res: Response, points: number, windowSeconds: number, taken: RateLimiterRes): void {
  const reset = Math.max(0, Math.ceil(taken.msBeforeNext / 1000));
  res.set('RateLimit-Policy', `${points};w=${windowSeconds}`);
  res.set('RateLimit', `limit=${points}, remaining=${taken.remainingPoints}, reset=${reset}`);
}

/**
 * One budget (sign-ins, answer links, …): per client address, counted in Redis so every web
 * process draws on the same budget. When Redis does not answer, the count falls back to this
 * process's memory (same budget, per process) with a warning: the site keeps serving and is
 * still not open to unlimited guessing.
 */
export class RateBudget {
  private readonly shared: RateLimiterRedis;
  private readonly local: RateLimiterMemory;
  private warnedAt = 0;

  constructor(
    private readonly redis: Redis,
    prefix: string,
    private readonly options: BudgetOptions,
    private readonly logger?: Logger,
    private readonly connected: Promise<void> = Promise.resolve(),
  ) {
    const common = { points: options.points, duration: options.windowSeconds, keyPrefix: `${prefix}:${options.name}` };
    // Not ready (down, reconnecting) → fall back at once instead of waiting for the connection.
    this.shared = new RateLimiterRedis({ ...common, storeClient: redis, rejectIfRedisNotReady: true });
    this.local = new RateLimiterMemory(common);
  }

  /**
   * Takes one point for `key`. `allowed` is false when the budget is spent; `refund` gives the point
   * back to whichever store took it.
   */
  async take(key: string): Promise<{ allowed: boolean; result: RateLimiterRes; refund: () => Promise<void> }> {
    let store: RateLimiterRedis | RateLimiterMemory = this.shared;
    let result: RateLimiterRes;
    await this.connected;
    try {
      result = await this.shared.consume(key);
    } catch (error) {
      if (error instanceof RateLimiterRes) return { allowed: false, result: error, refund: async () => {} };
      this.warnUnshared(error);
      store = this.local;
      try {
        result = await this.local.consume(key);
      } catch (refused) {
        if (refused instanceof RateLimiterRes) return { allowed: false, result: refused, refund: async () => {} };
        throw refused;
      }
    }
    const taken = store;
    return {
      allowed: true,
      result,
      refund: async () => {
        try {
          await taken.reward(key, 1);
        } catch (error) {
          this.warnUnshared(error);
        }
      },
    };
  }

  /** The middleware: takes a point for the client address, or answers 429. */
  readonly count: RequestHandler = async (req, res, next) => {
    let taken: Awaited<ReturnType<RateBudget['take']>>;
    try {
      taken = await this.take(addressKey(req.ip));
    } catch (error) {
      return next(error);
    }
    const { allowed, result, refund } = taken;
    setRateHeaders(res, this.options.points, this.options.windowSeconds, result);
    if (!allowed) return this.refuse(req, res, next, result);
    if (this.options.refundSuccess)
      res.once('finish', () => {
        if (res.statusCode < 400) void refund();
      });
    next();
  };

  private refuse(req: Request, res: Response, next: (err?: unknown) => void, result: RateLimiterRes): void {
    const retryAfter = Math.max(1, Math.ceil(result.msBeforeNext / 1000));
    const detail = `${this.options.detail} Try again in ${minutesText(retryAfter)}.`;
    res.set('Retry-After', String(retryAfter));
    res.set('Cache-Control', 'no-store');
    req.log?.warn({ limit: this.options.name, key: addressKey(req.ip) }, 'rate limit reached');
    // A person following a link in a browser gets a page; everything else gets problem+json.
    if (req.accepts(['application/problem+json', 'application/json', 'html']) === 'html') {
      res
        .status(429)
        .type('html')
        .send(page(this.options.title, `<p>${escapeHtml(detail)}</p>`, 'warn'));
      return;
    }
    next(new TooManyRequestsError(this.options.title, detail));
  }

  /** Once a minute at most: a Redis outage would otherwise log a line per request. */
  private warnUnshared(error: unknown): void {
    if (Date.now() - this.warnedAt < 60_000) return;
    this.warnedAt = Date.now();
    this.logger?.warn(
      { limit: this.options.name, err: error, redis: this.redis.status },
      'rate limits are counted in this process only: Redis is not answering',
    );
  }
}

/** Every rate limit of the web process; `close()` ends its Redis connection. */
export interface RateLimits {
  /** Sign-ins: one point at the start of the flow (`/auth/google`); see routes/auth.ts for the callback. */
  signIn: RateBudget;
  answerLinks: RateBudget;
  inviteLinks: RateBudget;
  feeds: RateBudget;
  close(): Promise<void>;
}

/**
 * Settles when a new client is first ready, fails, or `ms` have passed. The first requests of a
 * starting process wait for it, so they are not counted in memory while the connection is still
 * being made (which would split an address's count between two stores); later requests never wait.
 */
function firstConnection(client: Redis, ms: number): Promise<void> {
  if (!['wait', 'connecting', 'connect'].includes(client.status)) return Promise.resolve();
  return new Promise((resolve) => {
    const done = () => {
      clearTimeout(timer);
      for (const event of ['ready', 'error', 'end']) client.off(event, done);
      resolve();
    };
    const timer = setTimeout(done, ms);
    for (const event of ['ready', 'error', 'end']) client.once(event, done);
  });
}

/**
 * The rate limits over REDIS_URL (or a given client, e.g. ioredis-mock in tests). The connection
 * fails fast: no offline queue and a short command timeout, so once the process has started (its
 * first connection is awaited for at most a second) a request never waits on Redis for more than
 * half a second.
 */
export function createRateLimits(
  settings: RateLimitSettings,
  { redis, logger }: { redis?: Redis; logger?: Logger } = {},
): RateLimits {
  const client =
    redis ??
    new Redis(settings.REDIS_URL, {
      // Named after the keys it keeps, so CLIENT LIST tells this connection apart.
      connectionName: `${settings.RATE_LIMIT_PREFIX}:limits`,
      enableOfflineQueue: false,
      maxRetriesPerRequest: 0,
      commandTimeout: 500,
      connectTimeout: 2_000,
      retryStrategy: () => 2_000,
    });
  if (!redis)
    client.on('error', () => {
      /* reported by warnUnshared when a count falls back */
    });
  const connected = firstConnection(client, 1_000);
  const budget = (options: Omit<BudgetOptions, 'windowSeconds'>) =>
    new RateBudget(
      client,
      settings.RATE_LIMIT_PREFIX,
      { ...options, windowSeconds: settings.RATE_LIMIT_WINDOW_SECONDS },
      logger,
      connected,
    );
  return {
    signIn: budget({
      name: 'sign-in',
      points: settings.SIGN_IN_RATE_LIMIT,
      title: 'Too many sign-in attempts',
      detail: 'Too many sign-in attempts came from your address.',
    }),
    answerLinks: budget({
      name: 'answer-link',
      points: settings.ANSWER_LINK_RATE_LIMIT,
      refundSuccess: true,
      title: 'Too many refused links',
      detail: 'Too many answer links from your address were not valid.',
    }),
    inviteLinks: budget({
      name: 'invite-link',
      points: settings.INVITE_LINK_RATE_LIMIT,
      refundSuccess: true,
      title: 'Too many refused links',
      detail: 'Too many invitation links from your address were not valid.',
    }),
    feeds: budget({
      name: 'feed',
      points: settings.FEED_RATE_LIMIT,
      refundSuccess: true,
      title: 'Too many unknown feeds',
      detail: 'Too many calendar feed addresses asked for from your address were not valid.',
    }),
    async close() {
      // Only a connection made here is ours to end.
      if (!redis) client.disconnect();
    },
  };
}
