import http from 'node:http';
import { createHash } from 'node:crypto';
import express from 'express';
import { OAuth2Server } from 'oauth2-mock-server';

export interface FakeAccount {
  email: string;
  name: string;
  hint?: string;
}

export interface FakeOAuthProvider {
  url: string;
  authorizationURL: string;
  tokenURL: string;
  userProfileURL: string;
  stop(): Promise<void>;
}

/** A stable subject per e-mail, as a real provider gives one stable id per account. */
export function fakeSubject(email: string): string {
  return 'fake-' + createHash('sha256').update(email.toLowerCase()).digest('hex').slice(0, 20);
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

function decodeJwtPayload(token: string): Record<string, unknown> {
  const part = token.split('.')[1] ?? '';
  return JSON.parse(Buffer.from(part, 'base64url').toString('utf8')) as Record<string, unknown>;
}

/**
 * A local OAuth 2.0 provider on loopback for sign-in during development and tests: the standard
 * authorize → code → token → userinfo flow of oauth2-mock-server, with an account picker in front
 * of the authorize step so a person can choose which demo account to be.
 */
export async function startFakeOAuthProvider(port: number, accounts: FakeAccount[]): Promise<FakeOAuthProvider> {
  const oauth = new OAuth2Server();
  await oauth.issuer.keys.generate('RS256');
  const base = `http://127.0.0.1:${port}`;
  oauth.issuer.url = base;
  const emailByCode = new Map<string, string>();

  oauth.service.on('beforeAuthorizeRedirect', (redirect: { url: URL }, req: { query: Record<string, unknown> }) => {
    const code = redirect.url.searchParams.get('code');
    const email = typeof req.query.login_hint === 'string' ? req.query.login_hint : '';
    if (code && email) emailByCode.set(code, email);
    if (!email) {
      redirect.url.searchParams.delete('code');
      redirect.url.searchParams.set('error', 'access_denied');
    }
  });
  oauth.service.on(
    'beforeTokenSigning',
    (token: { payload: Record<string, unknown> }, req: { body?: Record<string, unknown> }) => {
      const email = typeof req.body?.code === 'string' ? emailByCode.get(req.body.code) : undefined;
      if (email) Object.assign(token.payload, { sub: fakeSubject(email), email });
    },
  );
  oauth.service.on(
    'beforeUserinfo',
    (response: { body: Record<string, unknown>; statusCode: number }, req: http.IncomingMessage) => {
      // passport-google-oauth20 sends the token as ?access_token=, other clients as a Bearer header.
      const fromQuery = new URL(req.url ?? '/', 'http://fake').searchParams.get('access_token');
      const bearer = fromQuery ?? (req.headers.authorization ?? '').replace(/^Bearer\s+/i, '');
      const email = bearer ? String(decodeJwtPayload(bearer).email ?? '') : '';
      if (!email) {
        response.statusCode = 401;
        response.body = { error: 'invalid_token' };
        return;
      }
      const account = accounts.find((a) => a.email.toLowerCase() === email.toLowerCase());
      response.body = {
        sub: fakeSubject(email),
        email,
        email_verified: true,
        name: account?.name ?? email.split('@')[0],
      };
    },
  );

  const app = express();
  app.get('/pick', (req, res) => {
    const params = new URLSearchParams(req.query as Record<string, string>);
    const link = (email: string) => {
      const p = new URLSearchParams(params);
      p.set('login_hint', email);
      return `/authorize?${p.toString()}`;
    };
    const items = accounts
      .map(
        (a) => `<li><a href="${escapeHtml(link(a.email))}"><strong>${escapeHtml(a.name)}</strong>
      <span>${escapeHtml(a.email)}</span>${a.hint ? `<em>${escapeHtml(a.hint)}</em>` : ''}</a></li>`,
      )
      .join('');
    const hidden = [...params.entries()]
      .map(([k, v]) => `<input type="hidden" name="${escapeHtml(k)}" value="${escapeHtml(v)}">`)
      .join('');
    res.type('html').send(`<!doctype html><html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1"><title>Local sign-in provider</title>
<style>body{font-family:system-ui,sans-serif;max-width:34rem;margin:2rem auto;padding:0 1rem;color:#1d2730}
h1{font-size:1.3rem}p{color:#4a5560}ul{list-style:none;padding:0}li a{display:block;padding:.7rem .9rem;margin:.4rem 0;border:1px solid #c9d2da;border-radius:8px;color:inherit;text-decoration:none}
li a:hover,li a:focus{border-color:#0b5c7a;outline:2px solid #0b5c7a}span,em{display:block;font-size:.9rem;color:#4a5560}em{font-style:normal}
form{margin-top:1.5rem;display:flex;gap:.5rem}input[type=email]{flex:1;padding:.5rem}</style></head><body>
<h1>Local sign-in provider</h1><p>This page stands in for Google on this machine only. Choose an account to sign in as.</p>
<ul>${items}</ul>
<form method="get" action="/authorize">${hidden}<label for="other" class="sr">Another account</label>
<input id="other" type="email" name="login_hint" placeholder="another.address@example.test" required><button>Continue</button></form>
</body></html>`);
  });
  app.use(oauth.service.requestHandler);

  const server = http.createServer(app);
  await new Promise<void>((resolve) => server.listen(port, '127.0.0.1', resolve));
  const actualPort = (server.address() as { port: number }).port;
  const url = `http://127.0.0.1:${actualPort}`;
  oauth.issuer.url = url;
  return {
    url,
    authorizationURL: `${url}/pick`,
    tokenURL: `${url}/token`,
    userProfileURL: `${url}/userinfo`,
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
