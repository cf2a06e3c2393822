import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { account, signIn, startTestApp, type TestContext } from '../helpers/server.ts';
import { safeNext } from '../../server/routes/auth.ts';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await startTestApp();
});
afterAll(async () => {
  await ctx.close();
});

describe('signing in with Google (through the local provider)', () => {
  it('runs redirect → code → token → profile and opens a session for the demo scheduler', async () => {
    const agent = await signIn(ctx, account('scheduler').email);
    const { body } = await agent.get('/api/session').expect(200);
    expect(body.user.name).toBe('Sam Okafor');
    expect(body.firm.name).toBe('Tideway Hot Tubs');
    expect(body.firm.timeZone).toBe('Europe/London');
    expect(body.role).toBe('scheduler');
    expect(body.csrfToken).toMatch(/^[\w-]{32}$/);
    const user = await ctx
      .knex('users')
      .where({ email: account('scheduler').email })
      .first();
    expect(user.googleSub).toMatch(/^fake-[0-9a-f]{20}$/);
  });

  it('gives a new session id at sign-in, so a session fixed beforehand is worthless', async () => {
    const agent = request.agent(ctx.waterline.app);
    const start = await agent.get('/auth/google').expect(302);
    const before = String(start.headers['set-cookie']).match(/waterline\.sid=([^;]+)/)?.[1];
    const pick = new URL(start.headers.location as string);
    const authorize = new URL('/authorize', pick.origin);
    pick.searchParams.forEach((v, k) => authorize.searchParams.set(k, v));
    authorize.searchParams.set('login_hint', account('owner').email);
    const back = new URL((await fetch(authorize, { redirect: 'manual' })).headers.get('location')!);
    const done = await agent.get(back.pathname + back.search).expect(302);
    const after = String(done.headers['set-cookie']).match(/waterline\.sid=([^;]+)/)?.[1];
    expect(before).toBeTruthy();
    expect(after).toBeTruthy();
    expect(after).not.toBe(before);
    expect(String(done.headers['set-cookie'])).toMatch(/HttpOnly/);
    expect(String(done.headers['set-cookie'])).toMatch(/SameSite=Lax/);
  });

  it('refuses a Google account nobody invited', async () => {
    await expect(signIn(ctx, 'stranger@elsewhere.example')).rejects.toMatchObject({
      location: '/sign-in?error=unknown_account',
    });
    expect(await ctx.knex('users').where({ email: 'stranger@elsewhere.example' }).first()).toBeUndefined();
  });

  it('refuses a callback whose state does not match the one sent', async () => {
    const res = await request(ctx.waterline.app).get('/auth/google/callback?code=forged&state=forged').expect(302);
    expect(res.headers.location).toBe('/sign-in?error=sign_in_failed');
  });

  it('follows only same-site paths after sign-in', () => {
    expect(safeNext('/board?from=2026-06-01')).toBe('/board?from=2026-06-01');
    expect(safeNext('//evil.example/')).toBe('/');
    expect(safeNext('https://evil.example/')).toBe('/');
    expect(safeNext('/\\evil.example')).toBe('/');
    expect(safeNext(undefined)).toBe('/');
  });
});

describe('signing out', () => {
  it('needs the CSRF token, then ends the session', async () => {
    const agent = await signIn(ctx, account('viewer').email);
    const refused = await agent.post('/auth/sign-out').expect(403);
    expect(refused.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(refused.body.type).toBe(`${ctx.config.PUBLIC_URL}/problems/csrf`);
    await agent.post('/auth/sign-out').set('X-CSRF-Token', agent.csrf).expect(204);
    await agent.get('/api/session').expect(401);
  });
});

describe('state-changing requests', () => {
  it('are refused without the session CSRF token', async () => {
    const agent = await signIn(ctx, account('scheduler').email);
    const res = await agent.post('/api/jobs').send({}).expect(403);
    expect(res.body.title).toBe('Missing or wrong CSRF token');
    await agent.post('/api/jobs').set('X-CSRF-Token', 'x'.repeat(32)).send({}).expect(403);
  });
});

describe('sign-in rate limit', () => {
  it('answers 429 problem+json after too many attempts from one address', async () => {
    const limited = await startTestApp({ SIGN_IN_RATE_LIMIT: '3' });
    try {
      for (let i = 0; i < 3; i += 1) await request(limited.waterline.app).get('/auth/google').expect(302);
      const res = await request(limited.waterline.app).get('/auth/google').expect(429);
      expect(res.body).toMatchObject({ status: 429, title: 'Too many sign-in attempts' });
    } finally {
      await limited.close();
    }
  });
});
