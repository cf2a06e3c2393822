import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, startTestApp, type Agent, type TestContext } from '../helpers/server.ts';

/*
 * Saves that change one job take its row as their lock, so two of them queue. They take it FOR NO
 * KEY UPDATE, not FOR UPDATE: a write that only points at the job (a booking's stage, a file, a
 * payment) takes FOR KEY SHARE on the job while it checks its foreign key, and holds it until it
 * commits. FOR UPDATE would wait for every such write under way, and hold them all up in turn.
 */
let ctx: TestContext;
let office: Agent;
let jobId: string;

beforeAll(async () => {
  ctx = await startTestApp();
  office = await signIn(ctx, account('scheduler').email);
  jobId = await idOf(ctx.knex, 'jobs', { reference: 'TW-2421' });
});
afterAll(async () => {
  await ctx.close();
});

/**
 * Sends a request while another transaction holds what an insert pointing at the job holds
 * (FOR KEY SHARE on its row), and says whether the request waited for it: polled until it answers
 * or a connection waits on a lock (10 s at most).
 */
async function sentWhileJobPointedAt(send: () => PromiseLike<{ status: number }>) {
  const holder = await ctx.knex.transaction();
  let answered = false;
  let waited = false;
  let sent: Promise<{ status: number }> | undefined;
  try {
    await holder.raw('SELECT 1 FROM jobs WHERE id = ? FOR KEY SHARE', [jobId]);
    sent = Promise.resolve(send()).then((r) => ((answered = true), r));
    for (const started = Date.now(); !answered && Date.now() - started < 10_000;) {
      const { rows } = await ctx.knex.raw(
        `SELECT count(*) AS n FROM pg_stat_activity WHERE datname = current_database() AND wait_event_type = 'Lock'`,
      );
      if (Number(rows[0].n) > 0) {
        waited = true;
        break;
      }
      await new Promise((r) => setTimeout(r, 20));
    }
  } finally {
    await holder.commit();
  }
  return { waited, status: (await sent!).status };
}

describe("a job's own saves and the writes that point at the job", () => {
  const version = async () => Number((await ctx.knex('jobs').where({ id: jobId }).first('version')).version);
  const saves: [string, () => Promise<{ method: 'put' | 'post' | 'patch'; path: string; body: object }>][] = [
    [
      "the job's details",
      async () => ({
        method: 'patch',
        path: `/api/jobs/${jobId}`,
        body: { version: await version(), accessNotes: 'Side gate' },
      }),
    ],
    [
      'the survey',
      async () => ({
        method: 'put',
        path: `/api/jobs/${jobId}/survey`,
        body: { version: 0, survey: { accessWidthMm: 900, groundType: 'clay' } },
      }),
    ],
    [
      'the certificate waiver',
      async () => ({
        method: 'put',
        path: `/api/jobs/${jobId}/certificate-waiver`,
        body: { reason: 'The electrician posts it', reasonWas: null },
      }),
    ],
    [
      'the commissioning record',
      async () => ({
        method: 'put',
        path: `/api/jobs/${jobId}/commissioning`,
        body: { version: 0, checks: { pumpsPrimed: true } },
      }),
    ],
    ['the plan of stages', async () => ({ method: 'post', path: `/api/jobs/${jobId}/plan`, body: {} })],
  ];

  for (const [what, request] of saves) {
    it(`saves ${what} without waiting for them`, async () => {
      const { method, path, body } = await request();
      const { waited, status } = await sentWhileJobPointedAt(() =>
        office[method](path).set('X-CSRF-Token', office.csrf).send(body),
      );
      expect(waited).toBe(false);
      // It reached the job's lock and was answered as usual (saved, or refused for its own reasons).
      expect([200, 201, 409]).toContain(status);
    });
  }
});
