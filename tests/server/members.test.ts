import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  account,
  idOf,
  signIn,
  startTestApp,
  untilWaitingOnLocks,
  type Agent,
  type TestContext,
} from '../helpers/server.ts';

/*
 * An owner changes a person's role in the firm, or takes out someone who has left; access follows
 * on their very next request. The demo installer's people (Tideway Hot Tubs).
 */
let ctx: TestContext;
let owner: Agent;

beforeAll(async () => {
  ctx = await startTestApp();
  owner = await signIn(ctx, account('owner').email);
});
afterAll(async () => {
  await ctx.close();
});

const userOf = (email: string) => idOf(ctx.knex, 'users', { email });
const roleOf = async (email: string) =>
  (
    await ctx
      .knex('memberships as m')
      .join('users as u', 'u.id', 'm.user_id')
      .join('firms as f', 'f.id', 'm.firm_id')
      .where({ 'u.email': email, 'f.name': 'Tideway Hot Tubs' })
      .first('m.role')
  )?.role ?? null;
const change = (agent: Agent, userId: string, body: object) =>
  agent.put(`/api/firm/members/${userId}`).set('X-CSRF-Token', agent.csrf).send(body);
const remove = (agent: Agent, userId: string, role: string) =>
  agent.delete(`/api/firm/members/${userId}`).query({ role }).set('X-CSRF-Token', agent.csrf);

describe("the firm's people", () => {
  it("changes a person's role, and their next request is in the new role", async () => {
    const viewer = await signIn(ctx, account('viewer').email);
    await viewer.post('/api/jobs').set('X-CSRF-Token', viewer.csrf).send({}).expect(403);
    const vic = await userOf(account('viewer').email);
    const res = await change(owner, vic, { role: 'scheduler', previousRole: 'viewer' }).expect(200);
    expect(res.body).toEqual({ userId: vic, name: 'Vic Amos', email: account('viewer').email, role: 'scheduler' });
    expect((await viewer.get('/api/session').expect(200)).body.role).toBe('scheduler');
    // A job without its fields is now refused for its fields, not for the role.
    await viewer.post('/api/jobs').set('X-CSRF-Token', viewer.csrf).send({}).expect(400);
    const audit = await ctx.knex('audit_log').where({ entity: 'membership' }).orderBy('id').select('before', 'after');
    expect(audit.at(-1)).toEqual({ before: { role: 'viewer' }, after: { role: 'scheduler' } });
  });

  it('refuses a change made on an old page (409 with the role as it now is), a role the firm has not, and another firm’s person', async () => {
    const vic = await userOf(account('viewer').email);
    const stale = await change(owner, vic, { role: 'crew', previousRole: 'viewer' }).expect(409);
    expect(stale.body).toMatchObject({ code: 'stale-version', current: { role: 'scheduler' } });
    const wrong = await change(owner, vic, { role: 'partner', previousRole: 'scheduler' }).expect(400);
    expect(wrong.body.errors).toEqual([
      { field: 'role', message: 'must be one of owner, scheduler, manager, crew, viewer for this firm' },
    ]);
    const priya = await userOf(account('partner', 'Brightspark Electrical').email);
    await change(owner, priya, { role: 'viewer', previousRole: 'partner' }).expect(404);
    await remove(owner, priya, 'partner').expect(404);
    expect(await roleOf(account('viewer').email)).toBe('scheduler');
  });

  it('takes out someone who has left: their session reads nothing from then on', async () => {
    const crew = await signIn(ctx, account('crew').email);
    await crew.get('/api/my-work').expect(200);
    const connor = await userOf(account('crew').email);
    await remove(owner, connor, 'viewer').expect(409);
    await remove(owner, connor, 'crew').expect(204);
    await crew.get('/api/my-work').expect(401);
    expect(await roleOf(account('crew').email)).toBeNull();
    const audit = await ctx.knex('audit_log').where({ entity: 'membership', action: 'delete' }).first('before');
    expect(audit.before).toMatchObject({ userId: connor, role: 'crew' });
  });

  it('keeps an owner: the only one can be neither changed nor taken out, and two owners demoting each other at once leave one', async () => {
    const olivia = await userOf(account('owner').email);
    const only = await change(owner, olivia, { role: 'viewer', previousRole: 'owner' }).expect(409);
    expect(only.body).toMatchObject({ code: 'last-owner' });
    await remove(owner, olivia, 'owner').expect(409);

    const sam = await userOf(account('scheduler').email);
    await change(owner, sam, { role: 'owner', previousRole: 'scheduler' }).expect(200);
    const second = await signIn(ctx, account('scheduler').email);
    // Hold both owners' rows so both changes are under way, each made by an owner, before either
    // can write (polled, 10 s at most): one goes through, the other then finds the firm's only owner.
    const holder = await ctx.knex.transaction();
    await holder('memberships').whereIn('user_id', [olivia, sam]).forUpdate().select('id');
    const both = Promise.all([
      change(owner, sam, { role: 'scheduler', previousRole: 'owner' }),
      change(second, olivia, { role: 'scheduler', previousRole: 'owner' }),
    ]);
    await untilWaitingOnLocks(ctx.knex, 2);
    await holder.commit();
    const answers = await both;
    expect(answers.map((a) => a.status).sort()).toEqual([200, 409]);
    const owners = await ctx
      .knex('memberships as m')
      .join('firms as f', 'f.id', 'm.firm_id')
      .where({ 'f.name': 'Tideway Hot Tubs', 'm.role': 'owner' })
      .count({ n: '*' })
      .first();
    expect(owners).toEqual({ n: '1' });
  });
});
