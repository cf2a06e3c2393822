import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, signIn, TEST_TODAY, type Agent } from '../helpers/server.ts';
import {
  startMailTestApp,
  waitForMailSettled,
  waitUntil,
  type MailTestContext,
  type TestPipeline,
} from '../helpers/mail.ts';
import { composeMessage } from '../../server/mail/messages.ts';
import { LinkSigner } from '../../server/services/links.ts';

let ctx: MailTestContext;
let pipeline: TestPipeline;
let owner: Agent;
const EMAIL = 'jo.planner@tideway.example';

beforeAll(async () => {
  ctx = await startMailTestApp();
  pipeline = ctx.startPipeline();
  owner = await signIn(ctx, account('owner').email);
});
afterAll(async () => {
  await ctx.close();
});

describe('inviting a new scheduler', () => {
  it('e-mails a signed link; accepting it lets that Google account sign in with the role', async () => {
    await expect(signIn(ctx, EMAIL)).rejects.toMatchObject({ location: '/sign-in?error=unknown_account' });
    const created = await owner
      .post('/api/firm/invitations')
      .set('X-CSRF-Token', owner.csrf)
      .send({ email: 'Jo.Planner@tideway.example', role: 'scheduler' })
      .expect(201);
    expect(created.body).toMatchObject({
      email: EMAIL,
      role: 'scheduler',
      firmName: 'Tideway Hot Tubs',
      acceptedAt: null,
      // Fourteen days by the app's clock (the tests' today), not the machine's: the e-mailed link
      // is checked against the same clock.
      expiresAt: new Date(TEST_TODAY.getTime() + 14 * 86_400_000).toISOString(),
    });
    const list = await owner.get('/api/firm/invitations').expect(200);
    expect(list.body.items.map((i: { email: string }) => i.email)).toContain(EMAIL);

    const [mail] = await ctx.inbox.waitFor((m) => m.to.includes(EMAIL));
    expect(mail!.subject).toBe('Tideway Hot Tubs invited you to Waterline');
    const link = new URL(/^Accept the invitation:\n(\S+)$/m.exec(mail!.text)![1]!).pathname;
    expect(link).toMatch(/^\/invite\//);

    // Opening the link changes nothing.
    const page = await request(ctx.waterline.app).get(link).expect(200);
    expect(page.text).toContain('Accept the invitation');
    expect(await ctx.knex('users').whereRaw('lower(email) = ?', [EMAIL]).first()).toBeUndefined();

    const accepted = await request(ctx.waterline.app).post(link).type('form').send({}).expect(200);
    expect(accepted.text).toContain('Invitation accepted');
    const agent = await signIn(ctx, EMAIL);
    const session = await agent.get('/api/session').expect(200);
    expect(session.body).toMatchObject({
      role: 'scheduler',
      firm: { name: 'Tideway Hot Tubs' },
      user: { email: EMAIL },
    });

    // The link works once; opened again it says so in an invitation's words, and leads to sign-in.
    for (const again of [
      await request(ctx.waterline.app).post(link).type('form').send({}).expect(409),
      await request(ctx.waterline.app).get(link).expect(409),
    ]) {
      expect(again.text).toContain('This invitation was already accepted');
      expect(again.text).toContain(`Now sign in with Google using <strong>${EMAIL}</strong>`);
      expect(again.text).toContain('<form method="get" action="/auth/google">');
      expect(again.text).not.toMatch(/booking|installer/i);
    }
  });

  it('is for owners only', async () => {
    const scheduler = await signIn(ctx, account('scheduler').email);
    await scheduler
      .post('/api/firm/invitations')
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ email: 'x@tideway.example', role: 'viewer' })
      .expect(403);
  });

  it('refuses a bad address or role by name', async () => {
    const res = await owner
      .post('/api/firm/invitations')
      .set('X-CSRF-Token', owner.csrf)
      .send({ email: 'nope', role: 'boss' })
      .expect(400);
    expect(res.body.errors.map((e: { field: string }) => e.field).sort()).toEqual(['email', 'role']);
  });

  it("offers only the installer's own roles: a partner firm's coordinator role is refused by name, and nothing is sent", async () => {
    const invitations = await ctx.knex('invitations').count({ n: '*' }).first();
    const mail = await ctx.knex('outbox').count({ n: '*' }).first();
    const res = await owner
      .post('/api/firm/invitations')
      .set('X-CSRF-Token', owner.csrf)
      .send({ email: 'sol.wire@tideway.example', role: 'partner' })
      .expect(400);
    expect(res.body.errors).toEqual([
      { field: 'role', message: 'must be one of owner, scheduler, manager, crew, viewer for this firm' },
    ]);
    expect(await ctx.knex('invitations').count({ n: '*' }).first()).toEqual(invitations);
    expect(await ctx.knex('outbox').count({ n: '*' }).first()).toEqual(mail);
  });
});

describe('withdrawing an invitation', () => {
  const invite = async (email: string) =>
    (
      await owner
        .post('/api/firm/invitations')
        .set('X-CSRF-Token', owner.csrf)
        .send({ email, role: 'crew' })
        .expect(201)
    ).body as { id: string };
  const withdraw = (agent: Agent, id: string) =>
    agent.delete(`/api/firm/invitations/${id}`).set('X-CSRF-Token', agent.csrf);
  const linkIn = async (email: string) => {
    const [mail] = await ctx.inbox.waitFor((m) => m.to.includes(email));
    return new URL(/^Accept the invitation:\n(\S+)$/m.exec(mail!.text)![1]!).pathname;
  };

  it('stops its link working, says so in the list, and keeps the row; withdrawing again changes nothing', async () => {
    const email = 'wrong.address@tideway.example';
    const { id } = await invite(email);
    const link = await linkIn(email);
    const res = await withdraw(owner, id).expect(200);
    expect(res.body).toMatchObject({ id, email, acceptedAt: null, withdrawnAt: expect.any(String) });

    for (const gone of [
      await request(ctx.waterline.app).get(link).expect(410),
      await request(ctx.waterline.app).post(link).type('form').send({}).expect(410),
    ]) {
      // In an invitation's words, not a booking's.
      expect(gone.text).toContain('This invitation no longer exists');
      expect(gone.text).not.toMatch(/booking|installer/i);
    }
    // A link past its time says it has expired, in the same words.
    const late = await new LinkSigner(ctx.config.LINK_SECRET).signInvite({
      invitationId: id,
      expiresAt: new Date(TEST_TODAY.getTime() - 60_000),
    });
    const expired = await request(ctx.waterline.app).get(`/invite/${late}`).expect(410);
    expect(expired.text).toContain('This invitation has expired');
    expect(expired.text).not.toMatch(/booking|installer/i);
    expect(await ctx.knex('users').where('email', email).first()).toBeUndefined();

    const listed = (await owner.get('/api/firm/invitations').expect(200)).body.items.find(
      (i: { id: string }) => i.id === id,
    );
    expect(listed.withdrawnAt).toBe(res.body.withdrawnAt);
    expect((await withdraw(owner, id).expect(200)).body.withdrawnAt).toBe(res.body.withdrawnAt);
    const audit = await ctx.knex('audit_log').where({ entity: 'invitation', entity_id: id }).pluck('action');
    expect(audit).toEqual(['create', 'update']);
  });

  it('one withdrawn before its e-mail went is never sent', async () => {
    const [row] = await ctx
      .knex('invitations')
      .insert({
        firm_id: await ctx
          .knex('firms')
          .where('name', 'Tideway Hot Tubs')
          .first('id')
          .then((f) => f.id),
        email: 'not.sent@tideway.example',
        role: 'crew',
        expires_at: new Date(Date.now() + 86_400_000),
      })
      .returning('id');
    await withdraw(owner, String(row.id)).expect(200);
    expect(
      await composeMessage({ knex: ctx.knex, config: ctx.config }, 'invitation', { invitationId: String(row.id) }),
    ).toEqual({ skip: 'withdrawn by the owner' });
  });

  it('refuses one already accepted (409), and is not found for another firm', async () => {
    const email = 'kept.on@tideway.example';
    const { id } = await invite(email);
    await request(ctx.waterline.app)
      .post(await linkIn(email))
      .type('form')
      .send({})
      .expect(200);
    const refused = await withdraw(owner, id).expect(409);
    expect(refused.body).toMatchObject({ code: 'accepted' });

    // The owner of another installer: Tideway's invitation is not theirs to see or withdraw.
    const moorview = await ctx.knex('firms').where('name', 'Moorview Spas').first('id');
    const [other] = await ctx
      .knex('users')
      .insert({ email: 'ada.moor@moorview.example', name: 'Ada Moor' })
      .returning('id');
    await ctx.knex('memberships').insert({ user_id: other.id, firm_id: moorview.id, role: 'owner' });
    const otherOwner = await signIn(ctx, 'ada.moor@moorview.example');
    const { id: open } = await invite('still.open@tideway.example');
    await withdraw(otherOwner, open).expect(404);
    expect((await ctx.knex('invitations').where('id', open).first('withdrawn_at')).withdrawnAt).toBeNull();
    const theirs = (await otherOwner.get('/api/firm/invitations').expect(200)).body.items;
    expect(theirs.map((i: { email: string }) => i.email)).not.toContain('still.open@tideway.example');
  });
});

describe('inviting the same person again', () => {
  const send = (email: string, role = 'crew') =>
    owner.post('/api/firm/invitations').set('X-CSRF-Token', owner.csrf).send({ email, role });
  const linksTo = async (email: string, n: number) => {
    const mails = await ctx.inbox.waitFor((m) => m.to.includes(email), n);
    return mails.map((m) => new URL(/^Accept the invitation:\n(\S+)$/m.exec(m.text)![1]!).pathname);
  };
  const open = async (email: string) =>
    ctx
      .knex('invitations')
      .whereRaw('lower(email) = lower(?)', [email])
      .whereNull('accepted_at')
      .whereNull('withdrawn_at')
      .pluck('id');

  it('sends a new link and the one sent before stops working: one open invitation, both audited', async () => {
    const email = 'lost.link@tideway.example';
    const first = (await send(email).expect(201)).body;
    expect(first.replaced).toEqual([]);
    const [oldLink] = await linksTo(email, 1);
    // Typed again with capitals, and as a scheduler this time: the same address.
    const again = (await send('Lost.Link@tideway.example', 'scheduler').expect(201)).body;
    expect(again).toMatchObject({ email, role: 'scheduler', replaced: [first.id] });
    expect(await open(email)).toEqual([again.id]);
    const links = await linksTo(email, 2);
    const newLink = links.find((l) => l !== oldLink)!;
    await request(ctx.waterline.app).get(oldLink!).expect(410);
    await request(ctx.waterline.app).post(newLink).type('form').send({}).expect(200);
    const audit = await ctx
      .knex('audit_log')
      .where({ entity: 'invitation', entity_id: first.id })
      .orderBy('id')
      .select('action', 'after');
    expect(audit.map((a) => a.action)).toEqual(['create', 'update']);
    expect(audit[1]!.after).toMatchObject({ replacedBy: again.id });
    const listed = (await owner.get('/api/firm/invitations').expect(200)).body.items;
    expect(listed.find((i: { id: string }) => i.id === first.id)).toMatchObject({ replacedBy: again.id });
    expect(listed.find((i: { id: string }) => i.id === again.id)).toMatchObject({ replacedBy: null });
    expect((await signIn(ctx, email).then((a) => a.get('/api/session'))).body.role).toBe('scheduler');
  });

  it('sent twice at once (a double-click): one open invitation, and only its link works', async () => {
    const email = 'double.click@tideway.example';
    const answers = await Promise.all([send(email), send(email)]);
    // In turn, the second replaces the first; truly at once, the second is refused (below).
    for (const a of answers) expect([201, 409]).toContain(a.status);
    const [id] = await open(email);
    expect(await open(email)).toHaveLength(1);
    await waitForMailSettled(ctx, pipeline);
    const links = (await ctx.inbox.list())
      .filter((m) => m.to.includes(email))
      .map((m) => new URL(/^Accept the invitation:\n(\S+)$/m.exec(m.text)![1]!).pathname);
    const working = [];
    for (const link of links) if ((await request(ctx.waterline.app).get(link)).status === 200) working.push(link);
    expect(working).toHaveLength(1);
    expect(id).toBeDefined();
  });

  it('one arriving while another to the same address is being written waits, then is refused by name (409)', async () => {
    const email = 'same.moment@tideway.example';
    const firmId = (await ctx.knex('firms').where('name', 'Tideway Hot Tubs').first('id')).id;
    const trx = await ctx.knex.transaction();
    await trx('invitations').insert({
      firm_id: firmId,
      email,
      role: 'crew',
      expires_at: new Date(Date.now() + 86_400_000),
    });
    const pending = send(email).then((r) => r);
    // The request's insert waits on the open invitation being written (a lock not yet granted).
    await waitUntil(async () => {
      const waiting = await ctx.knex('pg_locks').where('granted', false).count<{ count: string }[]>('* as count');
      return Number(waiting[0]!.count) > 0;
    });
    await trx.commit();
    const refused = await pending;
    expect(refused.status).toBe(409);
    expect(refused.body).toMatchObject({
      detail: 'An invitation to this address was sent a moment ago: it is in the list.',
      errors: [{ field: 'email', message: 'is already invited: the invitation went a moment ago' }],
    });
    expect(await open(email)).toHaveLength(1);
  });

  it('refuses someone already in the firm, naming the address, and sends nothing', async () => {
    const before = await ctx.knex('invitations').count();
    const res = await send(account('scheduler').email.toUpperCase(), 'manager').expect(409);
    expect(res.body).toMatchObject({
      code: 'member',
      detail: `${account('scheduler').email} is already in your firm: change their role in the list of people instead.`,
      errors: [{ field: 'email', message: 'is already in your firm' }],
    });
    expect(await ctx.knex('invitations').count()).toEqual(before);
  });
});
