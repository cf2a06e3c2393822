import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import net, { type AddressInfo } from 'node:net';
import { PROBLEM_TYPES } from '../../server/problem-types.ts';
import { account, signIn, startTestApp, type TestContext } from '../helpers/server.ts';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await startTestApp();
});
afterAll(async () => {
  await ctx.close();
});

function sourcesUnder(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    return statSync(full).isDirectory() ? sourcesUnder(full) : full.endsWith('.ts') ? [full] : [];
  });
}

describe('problem types', () => {
  it('every code the server can answer with has an explanation', () => {
    const codes = new Set<string>();
    for (const file of sourcesUnder(path.resolve('server'))) {
      for (const m of readFileSync(file, 'utf8').matchAll(/(?:new HttpError|super)\(\s*\d{3},\s*'([a-z-]+)'/g))
        codes.add(m[1]!);
    }
    // The scan must see the error classes themselves, or it proves nothing.
    expect(codes).toContain('bad-request');
    expect(codes).toContain('rule-violation');
    expect([...codes].filter((c) => !Object.hasOwn(PROBLEM_TYPES, c))).toEqual([]);
  });

  it('answers with an absolute type under PUBLIC_URL that resolves to a page explaining it', async () => {
    const scheduler = await signIn(ctx, account('scheduler').email);
    const refused = await scheduler
      .post('/api/jobs')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ reference: '' })
      .expect(400);
    expect(refused.body.type).toBe(`${ctx.config.PUBLIC_URL}/problems/bad-request`);
    const page = await request(ctx.waterline.app).get(new URL(refused.body.type).pathname).expect(200);
    expect(page.headers['content-type']).toMatch(/text\/html/);
    expect(page.text).toContain(PROBLEM_TYPES['bad-request']!.title);
  });

  it('a malformed JSON body gets its own documented type', async () => {
    const scheduler = await signIn(ctx, account('scheduler').email);
    const res = await scheduler
      .post('/api/jobs')
      .set('X-CSRF-Token', scheduler.csrf)
      .set('Content-Type', 'application/json')
      .send('{"reference":')
      .expect(400);
    expect(res.body.type).toBe(`${ctx.config.PUBLIC_URL}/problems/malformed-body`);
    // In words, not the parser's ("Unexpected token…"); a bare null is refused the same way.
    expect(res.body.detail).toBe('The request body is not valid JSON: send one JSON object.');
    const bare = await scheduler
      .post('/api/jobs')
      .set('X-CSRF-Token', scheduler.csrf)
      .set('Content-Type', 'application/json')
      .send('null')
      .expect(400);
    expect(bare.body.detail).toBe('The request body is not valid JSON: send one JSON object.');
    const big = await scheduler
      .post('/api/jobs')
      .set('X-CSRF-Token', scheduler.csrf)
      .set('Content-Type', 'application/json')
      .send(JSON.stringify({ reference: 'x'.repeat(1_100_000) }))
      .expect(413);
    expect(big.body).toMatchObject({
      type: `${ctx.config.PUBLIC_URL}/problems/body-too-large`,
      detail: 'The request body is too large: at most 1 MB.',
    });
  });

  it('an unknown problem type is a 404, not an empty page', async () => {
    await request(ctx.waterline.app).get('/problems/no-such-problem').expect(404);
    await request(ctx.waterline.app).get('/problems/constructor').expect(404);
  });

  it("a request Node's parser refuses (too long an address, broken HTTP) is answered with problem+json too", async () => {
    const server = ctx.waterline.listen(0, '127.0.0.1');
    try {
      await new Promise((r) => server.once('listening', r));
      const { port } = server.address() as AddressInfo;
      // A search pasted twenty thousand characters long: past Node's 16 KB for the address and headers.
      const long = await fetch(`http://127.0.0.1:${port}/api/jobs?search=${'x'.repeat(20_000)}`);
      expect(long.status).toBe(431);
      expect(long.headers.get('content-type')).toMatch(/^application\/problem\+json/);
      expect(await long.json()).toEqual({
        type: `${ctx.config.PUBLIC_URL}/problems/headers-too-large`,
        title: 'The address or its headers are too long',
        status: 431,
        detail:
          'The address and headers together are longer than this installation reads. Search with fewer words, or ask for less at once.',
      });
      // A request line that is not HTTP at all, over a bare socket.
      const raw = await new Promise<string>((resolve, reject) => {
        const socket = net.connect(port, '127.0.0.1', () => socket.write('HELLO THERE\r\n\r\n'));
        let text = '';
        socket.on('data', (d) => (text += d.toString('utf8')));
        socket.on('end', () => resolve(text));
        socket.on('error', reject);
      });
      expect(raw).toMatch(/^HTTP\/1\.1 400 Bad Request\r\n/);
      expect(raw).toContain('Content-Type: application/problem+json');
      expect(JSON.parse(raw.slice(raw.indexOf('\r\n\r\n') + 4))).toMatchObject({
        type: `${ctx.config.PUBLIC_URL}/problems/unreadable-request`,
        title: 'The request could not be read',
        status: 400,
      });
      // Both types are documented like every other.
      for (const code of ['headers-too-large', 'unreadable-request'])
        expect((await request(ctx.waterline.app).get(`/problems/${code}`).expect(200)).text).toContain(
          PROBLEM_TYPES[code]!.title,
        );
    } finally {
      server.close();
    }
  });
});
