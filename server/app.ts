import express, { type Express } from 'express';
import session from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import helmet from 'helmet';
import compression from 'compression';
import { pinoHttp } from 'pino-http';
import pino from 'pino';
import pg from 'pg';
import path from 'node:path';
import { existsSync } from 'node:fs';
import type { Knex } from 'knex';
import { bookingLimitsOf, type Config } from './config.ts';
import { CONNECT_TIMEOUT_MS } from './db.ts';
import { errorHandler, notFoundHandler } from './errors.ts';
import { RouteTable } from './routes/table.ts';
import { apiRoutes } from './routes/api.ts';
import { jobWorkRoutes } from './routes/job-work.ts';
import { handoverRoutes } from './routes/handover.ts';
import { partnerRoutes } from './routes/partners.ts';
import { answerRoutes } from './routes/answers.ts';
import { handoverRecordRoutes } from './routes/handover-records.ts';
import { paymentRoutes } from './routes/payments.ts';
import { reportRoutes } from './routes/reports.ts';
import { mailStatusRoutes } from './routes/mail-status.ts';
import { authRoutes } from './routes/auth.ts';
import { createPassport } from './auth/google.ts';
import { csrfProtection } from './middleware/csrf.ts';
import { createRateLimits } from './middleware/rate-limit.ts';
import { actorFor } from './services/session.ts';
import { Health } from './health.ts';
import { projectRoot, workSansFiles } from './paths.ts';
import { problemRoutes } from './routes/problems.ts';
import { BoardStream } from './services/board-stream.ts';
import { answerUnreadableRequests } from './unreadable-requests.ts';
import type { Server } from 'node:http';

export interface AppDeps {
  config: Config;
  knex: Knex;
  /** The clock the engine checks against; tests fix it. */
  now?: () => number;
  /** The built client (`dist/`); tests give a folder of their own. */
  distDir?: string;
}

export interface WaterlineApp {
  app: Express;
  routes: RouteTable;
  /** Listens as production does: requests Node cannot parse answered with problem+json too. */
  listen(port: number, host: string, ready?: () => void): Server;
  close(): Promise<void>;
}

const builtClientDir = path.join(projectRoot, 'dist');

/** Builds the Express app; index.ts only listens. Tests call this with their own settings. */
export function createApp({ config, knex, now = Date.now, distDir = builtClientDir }: AppDeps): WaterlineApp {
  const app = express();
  const logger = pino({ level: config.LOG_LEVEL });
  const health = new Health(knex, config.REDIS_URL);
  const stream = new BoardStream(config.DATABASE_URL, knex);
  const sessionPool = new pg.Pool({
    connectionString: config.DATABASE_URL,
    max: 5,
    connectionTimeoutMillis: CONNECT_TIMEOUT_MS,
  });
  // An idle session connection cut by a database restart is dropped by the pool; unheard, the
  // pool's 'error' would end the process. Requests meanwhile answer 503 (errors.ts).
  sessionPool.on('error', (err) =>
    logger.warn({ err }, 'a session store connection was lost; it reconnects on the next request'),
  );
  const PgStore = connectPgSimple(session);

  app.disable('x-powered-by');
  // Problem types are absolute URIs under the installation's public address (see problem-types.ts).
  app.locals.publicUrl = config.PUBLIC_URL;
  // Only configured proxies may name the client (X-Forwarded-For); by default it is the socket's address.
  app.set('trust proxy', config.TRUST_PROXY);
  app.use(
    pinoHttp({
      logger,
      autoLogging: {
        ignore: (req) =>
          req.url?.startsWith('/api/health') || (!req.url?.startsWith('/api') && !req.url?.startsWith('/auth')),
      },
      // Logs carry what a request was, never its cookies or tokens.
      serializers: {
        req: (req: { method: string; url: string }) => ({
          method: req.method,
          url: req.url.replace(/([?&](code|state|access_token)=)[^&]*/g, '$1…'),
        }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
    }),
  );
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          'default-src': ["'self'"],
          // Job photos come from object storage through short-lived private links.
          'img-src': ["'self'", 'data:', 'blob:', ...(config.S3_ENDPOINT ? [new URL(config.S3_ENDPOINT).origin] : [])],
          'style-src': ["'self'", "'unsafe-inline'"],
          'script-src': ["'self'"],
          'connect-src': ["'self'"],
          'form-action': [
            "'self'",
            ...(config.OAUTH_AUTHORIZATION_URL
              ? [new URL(config.OAUTH_AUTHORIZATION_URL).origin]
              : ['https://accounts.google.com']),
          ],
          'upgrade-insecure-requests': config.NODE_ENV === 'production' ? [] : null,
        },
      },
    }),
  );
  // Compressed answers (the board's JSON, the client's files, pages), but never the live board stream:
  // its events would wait in the compressor's buffer.
  app.use(
    compression({
      filter: (req, res) =>
        !String(res.getHeader('Content-Type') ?? '').startsWith('text/event-stream') &&
        !req.path.endsWith('/stream') &&
        compression.filter(req, res),
    }),
  );
  // The font of the server's own pages (answer links, invitations), the app's own: the same for
  // everyone, so before sessions, and kept a year (a file's name changes with the package's version
  // only, so not forever).
  app.use('/fonts', express.static(workSansFiles, { index: false, maxAge: '365d' }));
  // The built client is the same for everyone, so it is served before sessions: a file or the app's
  // page costs no session read, no membership look-up and sets no cookie. Paths the route table owns
  // (the API, sign-in, links, feeds, problem pages) go on to their routes; the Vue app owns the rest.
  if (existsSync(distDir)) {
    app.use(
      express.static(distDir, {
        index: false,
        maxAge: '1h',
        // The service worker is looked for again on every visit: a new version reaches phones at once.
        setHeaders: (res, file) => {
          if (path.basename(file) === 'sw.js') res.setHeader('Cache-Control', 'no-cache');
        },
      }),
    );
    let serverPaths: Set<string> | undefined;
    const ownedByServer = (p: string) =>
      (serverPaths ??= new Set(['api', 'auth', 'fonts', ...routes.routes.map((r) => r.path.split('/')[1] ?? '')])).has(
        p.split('/')[1] ?? '',
      );
    app.use((req, res, next) =>
      req.method === 'GET' && !ownedByServer(req.path) ? res.sendFile(path.join(distDir, 'index.html')) : next(),
    );
  }
  // Public links are limited per address before anything else runs (sessions, token checks, the
  // link_attempts row a refused token writes). The budgets live in Redis, shared by every process.
  const limits = createRateLimits(config, { logger });
  app.use('/answer', limits.answerLinks.count);
  app.use('/invite', limits.inviteLinks.count);
  app.use('/feeds', limits.feeds.count);
  // The payment provider signs the exact bytes it sends: its webhook gets them raw (before the JSON parser).
  app.use('/api/payments/webhook', express.raw({ type: () => true, limit: '256kb' }));
  app.use(express.json({ limit: '1mb' }));
  app.use(
    session({
      name: 'waterline.sid',
      store: new PgStore({ pool: sessionPool, tableName: 'session', pruneSessionInterval: 60 * 15 }),
      secret: config.SESSION_SECRET,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: {
        httpOnly: true,
        sameSite: 'lax',
        secure: config.PUBLIC_URL.startsWith('https://'),
        maxAge: 1000 * 60 * 60 * 12,
      },
    }),
  );
  // The actor: who is signed in, acting for which firm in which role.
  app.use(async (req, _res, next) => {
    if (req.session.userId) {
      const actor = await actorFor(knex, req.session.userId, req.session.firmId);
      if (actor) req.actor = actor;
    }
    next();
  });
  app.use(csrfProtection);

  const auth = createPassport(config, knex);
  app.use(auth.initialize());
  const routes = new RouteTable();
  authRoutes(routes, auth, limits.signIn, (sessionId) => stream.endSession(sessionId));
  apiRoutes(routes, {
    knex,
    health,
    stream,
    now,
    limits: bookingLimitsOf(config),
    fullcalendarLicenseKey: config.FULLCALENDAR_LICENSE_KEY,
    release: config.RELEASE_ID,
  });
  const jobWork = jobWorkRoutes(routes, { knex, config, now });
  const handover = handoverRoutes(routes, { knex, config, now, limits: bookingLimitsOf(config) });
  partnerRoutes(routes, { knex, config, now });
  answerRoutes(routes, { knex, config, now });
  handoverRecordRoutes(routes, { knex, config, now, files: jobWork.files });
  paymentRoutes(routes, { knex, config, now, log: logger });
  problemRoutes(routes);
  reportRoutes(routes, {
    knex,
    now,
    publicUrl: config.PUBLIC_URL,
    extraWorkingMinutes: bookingLimitsOf(config).extraWorkingMinutes,
  });
  mailStatusRoutes(routes, { knex, config });
  routes.mount(app.router);

  app.use(notFoundHandler);
  app.use(errorHandler);

  return {
    app,
    routes,
    listen: (port, host, ready) => answerUnreadableRequests(app.listen(port, host, ready), config.PUBLIC_URL),
    async close() {
      // Open board streams first: they hold HTTP responses open and a LISTEN connection.
      await stream.close();
      jobWork.close();
      handover.close();
      await health.close();
      await limits.close();
      await sessionPool.end();
    },
  };
}
