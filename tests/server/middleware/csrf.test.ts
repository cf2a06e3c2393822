import { connect } from 'node:net';
import type { AddressInfo } from 'node:net';
import express from 'express';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Server } from 'node:http';
import { csrfProtection } from '../../../server/middleware/csrf.ts';
import { errorHandler } from '../../../server/errors.ts';

const TOKEN = 'k'.repeat(32);
let server: Server;
let port: number;

beforeAll(async () => {
  const app = express();
  // A signed-in session holding TOKEN, as express-session would give.
  app.use((req, _res, next) => {
    (req as unknown as { session: object }).session = { userId: 'u1', csrfToken: TOKEN };
    next();
  });
  app.use(csrfProtection);
  app.post('/api/jobs', (_req, res) => {
    res.status(201).json({ ok: true });
  });
  app.use(errorHandler);
  server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  port = (server.address() as AddressInfo).port;
});
afterAll(async () => {
  await new Promise<void>((resolve) => server.close(() => resolve()));
});

/** Sends a POST with the CSRF header as raw bytes, the way any client may put them on the wire. */
function postWithHeaderBytes(header: Buffer): Promise<{ status: number; body: string }> {
  return new Promise((resolve, reject) => {
    const socket = connect(port, '127.0.0.1');
    const chunks: Buffer[] = [];
    socket.on('data', (c) => chunks.push(c));
    socket.on('error', reject);
    socket.on('end', () => {
      const text = Buffer.concat(chunks).toString('utf8');
      resolve({ status: Number(text.slice(9, 12)), body: text.slice(text.indexOf('\r\n\r\n') + 4) });
    });
    socket.write(
      Buffer.concat([
        Buffer.from(
          'POST /api/jobs HTTP/1.1\r\nHost: 127.0.0.1\r\nConnection: close\r\nContent-Length: 0\r\nX-CSRF-Token: ',
        ),
        header,
        Buffer.from('\r\n\r\n'),
      ]),
    );
  });
}

describe('the CSRF check', () => {
  it('lets the session token through', async () => {
    expect((await postWithHeaderBytes(Buffer.from(TOKEN))).status).toBe(201);
  });

  it('refuses a token of non-ASCII bytes with 403 problem+json, not a server error', async () => {
    // 16 × "é" in UTF-8 is 32 bytes, as long on the wire as the real token, but the server reads
    // each byte as a character and those characters take 64 bytes once encoded again.
    const res = await postWithHeaderBytes(Buffer.from('é'.repeat(16), 'utf8'));
    expect(res.status).toBe(403);
    expect(JSON.parse(res.body)).toMatchObject({ type: '/problems/csrf', status: 403 });
  });

  it('refuses a token one character short', async () => {
    expect((await postWithHeaderBytes(Buffer.from(TOKEN.slice(1)))).status).toBe(403);
  });
});
