import type { Request, Response, NextFunction, RequestHandler } from 'express';
import type passport from 'passport';
import rateLimit from 'express-rate-limit';
import type { RouteTable } from './table.ts';
import type { Config } from '../config.ts';
import { newCsrfToken } from '../middleware/csrf.ts';

/** Only same-site paths are followed after sign-in. */
export function safeNext(value: unknown): string {
  return typeof value === 'string' && value.startsWith('/') && !value.startsWith('//') && !value.startsWith('/\\') ? value : '/';
}

export function authRoutes(table: RouteTable, config: Config, auth: passport.PassportStatic): void {
  const limiter = rateLimit({
    windowMs: 15 * 60 * 1000, limit: config.SIGN_IN_RATE_LIMIT, standardHeaders: 'draft-7', legacyHeaders: false,
    handler: (_req, res) => {
      res.status(429).type('application/problem+json').json({ type: '/problems/rate-limited', title: 'Too many sign-in attempts', status: 429, detail: 'Wait a few minutes and try again.' });
    },
  });
  const chain = (...handlers: RequestHandler[]): RequestHandler => (req, res, next) => {
    const step = (i: number) => (err?: unknown) => {
      if (err) return next(err);
      const h = handlers[i];
      if (!h) return next();
      Promise.resolve(h(req, res, step(i + 1))).catch(next);
    };
    step(0)();
  };

  table.get('/auth/google', 'public', chain(limiter, (req: Request, _res: Response, next: NextFunction) => {
    req.session.next = safeNext(req.query.next);
    next();
  }, auth.authenticate('google', { scope: ['profile', 'email'], session: false })));

  table.get('/auth/google/callback', 'public', chain(limiter, (req: Request, res: Response, next: NextFunction) => {
    auth.authenticate('google', { session: false }, (err: unknown, user: { id: string } | false, info?: { message?: string }) => {
      if (err) {
        req.log.warn({ err }, 'sign-in with the provider failed');
        return res.redirect('/sign-in?error=provider');
      }
      // No user: either an account nobody invited, or a stale or forged state from the provider.
      if (!user) return res.redirect(`/sign-in?error=${info?.message === 'unknown_account' ? 'unknown_account' : 'sign_in_failed'}`);
      const nextPath = safeNext(req.session.next);
      // A new session id at sign-in, so a session fixed before sign-in is worthless.
      req.session.regenerate((regenErr) => {
        if (regenErr) return next(regenErr);
        req.session.userId = user.id;
        req.session.csrfToken = newCsrfToken();
        req.session.save((saveErr) => (saveErr ? next(saveErr) : res.redirect(nextPath)));
      });
    })(req, res, next);
  }));

  table.post('/auth/sign-out', 'signed-in', (req, res, next) => {
    req.session.destroy((err) => {
      if (err) return next(err);
      res.clearCookie('waterline.sid');
      res.status(204).end();
    });
  });
}
