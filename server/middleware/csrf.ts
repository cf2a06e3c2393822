import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { RequestHandler } from 'express';
import { HttpError } from '../errors.ts';

export const newCsrfToken = () => randomBytes(24).toString('base64url');

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);
// The certificate link's upload form (/answer/certificate/<token>) is one of them.
const LINK_FORMS = /^\/(answer|invite)\/[^/]+$|^\/answer\/certificate\/[^/]+$/;

/**
 * Synchroniser-token CSRF protection: a state-changing request from a signed-in session must carry
 * the session's token in X-CSRF-Token (the client reads it from GET /api/session).
 */
export const csrfProtection: RequestHandler = (req, _res, next) => {
  if (SAFE.has(req.method) || !req.session?.userId) return next();
  // Answer and invitation links from e-mails post a form with no session token (the partner or
  // invitee may have no session, or another person's): their signed, single-use token is the proof.
  if (LINK_FORMS.test(req.path)) return next();
  // Compare bytes, not characters: a header with non-ASCII text has more bytes than characters,
  // and timingSafeEqual throws on buffers of different lengths.
  const expected = Buffer.from(req.session.csrfToken ?? '', 'utf8');
  const given = Buffer.from(req.get('x-csrf-token') ?? '', 'utf8');
  const ok = expected.length > 0 && given.length === expected.length && timingSafeEqual(given, expected);
  if (!ok) return next(new HttpError(403, 'csrf', 'Missing or wrong CSRF token', 'Reload the page and try again.'));
  next();
};
