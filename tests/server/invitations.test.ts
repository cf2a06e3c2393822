import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, signIn, TEST_TODAY, type Agent } from '../helpers/server.ts';
import { startMailTestApp, type MailTestContext } from '../helpers/mail.ts';
import { composeMessage } from '../../server/mail/messages.ts';

let ctx: MailTestContext;
let owner: Agent;
const EMAIL = 'jo.planner@tideway.example';

beforeAll(async () => {
  ctx = await startMailTestApp();
  ctx.startPipeline();
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

    // The link works once.
    const again = await request(ctx.waterline.app).post(link).type('form').send({}).expect(409);
    expect(again.text).toContain('already been used');
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

    await request(ctx.waterline.app).get(link).expect(410);
    await request(ctx.waterline.app).post(link).type('form').send({}).expect(410);
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
