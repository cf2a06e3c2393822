import express, { type Express } from 'express';
import session from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import pino from 'pino';
import pg from 'pg';
import path from 'node:path';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { Knex } from 'knex';
import { bookingLimitsOf, type Config } from './config.ts';
import { errorHandler, notFoundHandler } from './errors.ts';
import { RouteTable } from './routes/table.ts';
import { apiRoutes } from './routes/api.ts';
import { jobWorkRoutes } from './routes/job-work.ts';
import { partnerRoutes } from './routes/partners.ts';
import { answerRoutes } from './routes/answers.ts';
import { reportRoutes } from './routes/reports.ts';
import { authRoutes } from './routes/auth.ts';
import { createPassport } from './auth/google.ts';
import { csrfProtection } from './middleware/csrf.ts';
import { createRateLimits } from './middleware/rate-limit.ts';
import { actorFor } from './services/session.ts';
import { Health } from './health.ts';
import { problemRoutes } from './routes/problems.ts';
import { BoardStream } from './services/board-stream.ts';

export interface AppDeps {
  config: Config;
  knex: Knex;
  /** The clock the engine checks against; tests fix it. */
  now?: () => number;
}

export interface WaterlineApp {
  app: Express;
  routes: RouteTable;
  close(): Promise<void>;
}

const distDir = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', 'dist');

/** Builds the Express app; index.ts only listens. Tests call this with their own settings. */
export function createApp({ config, knex, now = Date.now }: AppDeps): WaterlineApp {
  const app = express();
  const logger = pino({ level: config.LOG_LEVEL });
  const health = new Health(knex, config.REDIS_URL);
  const stream = new BoardStream(config.DATABASE_URL, knex);
  const sessionPool = new pg.Pool({ connectionString: config.DATABASE_URL, max: 5 });
  const PgStore = connectPgSimple(session);

  app.disable('x-powered-by');
  // Problem types are absolute URIs under the installation's public address (see problem-types.ts).
  app.locals.publicUrl = config.PUBLIC_URL;
  // Only configured proxies may name the client (X-Forwarded-For); by default it is the socket's address.
  app.set('trust proxy', config.TRUST_PROXY);
  app.use(pinoHttp({
    logger,
    autoLogging: { ignore: (req) => req.url?.startsWith('/api/health') || !req.url?.startsWith('/api') && !req.url?.startsWith('/auth') },
    // Logs carry what a request was, never its cookies or tokens.
    serializers: {
      req: (req: { method: string; url: string }) => ({ method: req.method, url: req.url.replace(/([?&](code|state|access_token)=)[^&]*/g, '$1…') }),
      res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
    },
  }));
  app.use(helmet({
    contentSecurityPolicy: {
      directives: {
        'default-src': ["'self'"],
        // Job photos come from object storage through short-lived private links.
        'img-src': ["'self'", 'data:', 'blob:', ...(config.S3_ENDPOINT ? [new URL(config.S3_ENDPOINT).origin] : [])],
        'style-src': ["'self'", "'unsafe-inline'"],
        'script-src': ["'self'"],
        'connect-src': ["'self'"],
        'form-action': ["'self'", ...(config.OAUTH_AUTHORIZATION_URL ? [new URL(config.OAUTH_AUTHORIZATION_URL).origin] : ['https://accounts.google.com'])],
        'upgrade-insecure-requests': config.NODE_ENV === 'production' ? [] : null,
      },
    },
  }));
  // Public links are limited per address before anything else runs (sessions, token checks, the
  // link_attempts row a refused token writes). The budgets live in Redis, shared by every process.
  const limits = createRateLimits(config, { logger });
  app.use('/answer', limits.answerLinks.count);
  app.use('/invite', limits.inviteLinks.count);
  app.use('/feeds', limits.feeds.count);
  app.use(express.json({ limit: '1mb' }));
  app.use(session({
    name: 'waterline.sid',
    store: new PgStore({ pool: sessionPool, tableName: 'session', pruneSessionInterval: 60 * 15 }),
    secret: config.SESSION_SECRET,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    cookie: { httpOnly: true, sameSite: 'lax', secure: config.PUBLIC_URL.startsWith('https://'), maxAge: 1000 * 60 * 60 * 12 },
  }));
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
  apiRoutes(routes, { knex, health, stream, now, limits: bookingLimitsOf(config), fullcalendarLicenseKey: config.FULLCALENDAR_LICENSE_KEY });
  const jobWork = jobWorkRoutes(routes, { knex, config, now });
  partnerRoutes(routes, { knex, config, now });
  answerRoutes(routes, { knex, config, now });
  problemRoutes(routes);
  reportRoutes(routes, { knex, now, publicUrl: config.PUBLIC_URL, extraWorkingMinutes: bookingLimitsOf(config).extraWorkingMinutes });
  routes.mount(app.router);

  app.use('/api', notFoundHandler);
  if (existsSync(distDir)) {
    app.use(express.static(distDir, { index: false, maxAge: '1h' }));
    // The Vue app owns every other page (its router shows its own 404). Middleware, not a route:
    // every route is in the route table.
    app.use((req, res, next) => (req.method === 'GET' && !req.path.startsWith('/auth/') ? res.sendFile(path.join(distDir, 'index.html')) : next()));
  }
  app.use(notFoundHandler);
  app.use(errorHandler);

  return {
    app,
    routes,
    async close() {
      // Open board streams first: they hold HTTP responses open and a LISTEN connection.
      await stream.close();
      jobWork.close();
      await health.close();
      await limits.close();
      await sessionPool.end();
    },
  };
}
