import type { Request, Response, NextFunction, RequestHandler } from 'express';
import type passport from 'passport';
import type { RouteTable } from './table.ts';
import { newCsrfToken } from '../middleware/csrf.ts';
import type { RateBudget } from '../middleware/rate-limit.ts';

/** Only same-site paths are followed after sign-in. */
export function safeNext(value: unknown): string {
  return typeof value === 'string' && value.startsWith('/') && !value.startsWith('//') && !value.startsWith('/\\')
    ? value
    : '/';
}

/**
 * Sign-in with Google and sign-out. A sign-in costs one point of the address's sign-in budget, taken
 * when the flow starts (`/auth/google`). A callback that completes a flow this session started is
 * free; one that fails (a forged, stale or replayed state, or a code the provider refuses) costs a
 * point too, so the callback cannot be hammered for free either. `onSignOut` hears of each session
 * signed out (the board streams end theirs).
 */
export function authRoutes(
  table: RouteTable,
  auth: passport.PassportStatic,
  signInLimit: RateBudget,
  onSignOut: (sessionId: string) => void = () => undefined,
): void {
  const chain =
    (...handlers: RequestHandler[]): RequestHandler =>
    (req, res, next) => {
      const step = (i: number) => (err?: unknown) => {
        if (err) return next(err);
        const h = handlers[i];
        if (!h) return next();
        Promise.resolve(h(req, res, step(i + 1))).catch(next);
      };
      step(0)();
    };

  table.get(
    '/auth/google',
    'public',
    chain(
      signInLimit.count,
      (req: Request, _res: Response, next: NextFunction) => {
        req.session.next = safeNext(req.query.next);
        next();
      },
      auth.authenticate('google', { scope: ['profile', 'email'], session: false }),
    ),
  );

  table.get('/auth/google/callback', 'public', (req: Request, res: Response, next: NextFunction) => {
    // A failed callback is charged as an attempt; past the budget it is refused (429) instead.
    const failed = (error: string) =>
      void signInLimit.count(req, res, (limitErr?: unknown) =>
        limitErr ? next(limitErr) : res.redirect(`/sign-in?error=${error}`),
      );
    auth.authenticate(
      'google',
      { session: false },
      (err: unknown, user: { id: string } | false, info?: { message?: string }) => {
        if (err) {
          req.log.warn({ err }, 'sign-in with the provider failed');
          return failed('provider');
        }
        // An account nobody invited finished a real flow (already counted at its start); anything
        // else without a user is a stale, forged or replayed state.
        if (!user)
          return info?.message === 'unknown_account'
            ? res.redirect('/sign-in?error=unknown_account')
            : failed('sign_in_failed');
        const nextPath = safeNext(req.session.next);
        // A new session id at sign-in, so a session fixed before sign-in is worthless.
        req.session.regenerate((regenErr) => {
          if (regenErr) return next(regenErr);
          req.session.userId = user.id;
          req.session.csrfToken = newCsrfToken();
          req.session.save((saveErr) => (saveErr ? next(saveErr) : res.redirect(nextPath)));
        });
      },
    )(req, res, next);
  });

  table.post('/auth/sign-out', 'signed-in', (req, res, next) => {
    const sessionId = req.sessionID;
    req.session.destroy((err) => {
      if (err) return next(err);
      // This process's open streams of the session end now; other processes' at their next check.
      onSignOut(sessionId);
      res.clearCookie('waterline.sid');
      res.status(204).end();
    });
  });
}
