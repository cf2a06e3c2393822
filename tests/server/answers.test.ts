import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { account, idOf, signIn, TEST_TODAY, type Agent } from '../helpers/server.ts';
import { answerLinks, calendarOf, pencilIn, startMailTestApp, type MailTestContext } from '../helpers/mail.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { LinkSigner } from '../../server/services/links.ts';
import type { InboxMessage } from '../../scripts/fakes/smtp-inbox.ts';

let ctx: MailTestContext;
let scheduler: Agent;
const web = () => request(ctx.waterline.app);

beforeAll(async () => {
  ctx = await startMailTestApp();
  ctx.startPipeline();
  // The jobs this file books, at dates of its own, start with nothing booked.
  await unbookJobs(ctx.knex, 'TW-2419', 'TW-2420', 'TW-2421');
  scheduler = await signIn(ctx, account('scheduler').email);
});
afterAll(async () => {
  await ctx.close();
});

/** Pencils a booking in, publishes it and returns it with the request e-mail. */
async function requested(input: Parameters<typeof pencilIn>[1]): Promise<{ id: string; mail: InboxMessage }> {
  const b = await pencilIn(ctx.knex, input);
  await scheduler
    .post(`/api/bookings/${b.id}/publish`)
    .set('X-CSRF-Token', scheduler.csrf)
    .send({ version: b.version })
    .expect(200);
  const [mail] = await ctx.inbox.waitFor(
    (m) =>
      m.text.includes(`booking-${b.id}@127.0.0.1`) ||
      (m.attachments[0]?.content ?? '').includes(`booking-${b.id}@127.0.0.1`),
  );
  return { id: b.id, mail: mail! };
}
const stateOf = async (id: string) => (await ctx.knex('bookings').where('id', id).first()).state as string;
const attempts = async (reason: string) => ctx.knex('link_attempts').where({ reason });

describe('an answer link opened with GET', () => {
  it('only shows the slot and a button: nothing changes (mail scanners follow links)', async () => {
    const { id, mail } = await requested({
      job: 'TW-2419',
      stage: 'electrical_connect',
      resource: 'Tom Ashworth',
      startsAt: '2027-05-04T08:00:00Z',
      endsAt: '2027-05-04T12:00:00Z',
    });
    const links = answerLinks(mail);
    for (const path of [links.confirm, links.decline, links.propose, links.confirm]) {
      const page = await web().get(path).expect(200);
      expect(page.headers['content-type']).toMatch(/text\/html/);
      expect(page.text).toMatch(/<form method="post"/);
    }
    const page = await web().get(links.confirm).expect(200);
    expect(page.text).toContain('Confirm this slot');
    expect(page.text).toContain('Tuesday 4 May 2027'); // 08:00Z is 09:00 BST
    expect(page.text).toContain('09:00–13:00');
    expect(page.text).toContain('registered (licensed) electrician');
    expect(page.text).toContain('Follow local codes and licensed practice');
    // Whom to call on the day, each number a tap on the phone the link is opened on.
    expect(page.text).toContain('Installer office, Tideway Hot Tubs: <a href="tel:01134960001">0113 496 0001</a>');
    expect(await stateOf(id)).toBe('sent');
    expect(await ctx.knex('booking_answers').where('booking_id', id)).toHaveLength(0);
    expect(await ctx.knex('link_uses')).toHaveLength(0);

    // The button: POST without any session token (the link is the proof), even from a signed-in browser.
    const partner = await signIn(ctx, account('partner', 'Brightspark Electrical').email);
    const done = await partner.post(links.confirm).type('form').send({}).expect(200);
    expect(done.text).toContain('the slot is confirmed');
    expect(await stateOf(id)).toBe('confirmed');
    const view = await scheduler.get(`/api/bookings/${id}`).expect(200);
    expect(view.body).toMatchObject({
      state: 'confirmed',
      overdue: false,
      answer: { action: 'confirm', via: 'link', version: 2 },
    });

    // Used once: a second press is refused, logged, and changes nothing. The page says when and how
    // the request was answered (in the installer's zone) and shows the slot as it is now, so the
    // e-mail still leads to the site and whom to call on the day.
    // Answered at 13:05 UTC on the test's today: 14:05 in London (British Summer Time).
    await ctx.knex('booking_answers').where('booking_id', id).update({ created_at: '2026-06-01T13:05:00Z' });
    const when = 'Mon 1 Jun at 14:05';
    const again = await web().post(links.confirm).type('form').send({}).expect(409);
    expect(again.text).toContain('This request was already answered');
    expect(again.text).toContain(`It was confirmed on ${when}, and the links in its e-mail work once.`);
    expect(again.text).toContain('This booking is now confirmed.');
    expect(await attempts('used')).toHaveLength(1);
    expect(await stateOf(id)).toBe('confirmed');
    for (const link of [links.confirm, links.decline, links.propose]) {
      const opened = await web().get(link).expect(409);
      expect(opened.text).toContain(`It was confirmed on ${when}`);
      expect(opened.text).toContain('Installer office, Tideway Hot Tubs: <a href="tel:01134960001">0113 496 0001</a>');
      expect(opened.text).toContain('Tuesday 4 May 2027');
      expect(opened.text).not.toMatch(/<form method="post"/);
    }
    expect(await attempts('used')).toHaveLength(4);
  });
});

describe('a link that is not what was sent', () => {
  it('refuses a tampered token and logs the attempt', async () => {
    const { id, mail } = await requested({
      job: 'TW-2420',
      stage: 'electrical_connect',
      resource: 'Tom Ashworth',
      startsAt: '2027-05-05T08:00:00Z',
      endsAt: '2027-05-05T12:00:00Z',
    });
    const token = answerLinks(mail).decline.split('/').pop()!;
    const [h, p, s] = token.split('.') as [string, string, string];
    const claims = JSON.parse(Buffer.from(p, 'base64url').toString());
    const forged = `${h}.${Buffer.from(JSON.stringify({ ...claims, bid: '1' })).toString('base64url')}.${s}`;
    const flipped = `${h}.${p}.${s.slice(0, -2)}${s.endsWith('AA') ? 'BB' : 'AA'}`;
    for (const bad of [forged, flipped, 'not-a-token']) {
      const page = await web().post(`/answer/${bad}`).type('form').send({}).expect(400);
      expect(page.text).toContain('This link is not valid');
    }
    expect(await attempts('tampered')).toHaveLength(3);
    expect(await stateOf(id)).toBe('sent');
  });

  it('refuses an expired token', async () => {
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2420',
      stage: 'electrical_first_fix',
      resource: 'Tom Ashworth',
      startsAt: '2027-05-06T08:00:00Z',
      endsAt: '2027-05-06T12:00:00Z',
      state: 'sent',
    });
    const token = await new LinkSigner(ctx.config.LINK_SECRET).signAnswer({
      bookingId: b.id,
      version: 1,
      action: 'confirm',
      // A minute before the app's today: links are checked against the app's clock.
      expiresAt: new Date(TEST_TODAY.getTime() - 60_000),
    });
    const page = await web().get(`/answer/${token}`).expect(410);
    expect(page.text).toContain('This link has expired');
    await web().post(`/answer/${token}`).type('form').send({}).expect(410);
    expect(await attempts('expired')).toHaveLength(2);
    expect(await stateOf(b.id)).toBe('sent');
  });

  it('refuses a token signed with another secret', async () => {
    const token = await new LinkSigner('another-secret-of-at-least-32-characters!').signAnswer({
      bookingId: '1',
      version: 1,
      action: 'confirm',
      expiresAt: new Date(Date.now() + 3_600_000),
    });
    await web().get(`/answer/${token}`).expect(400);
  });
});

describe('a link for a version that has changed', () => {
  it('says the slot has changed and shows the new one', async () => {
    const { id, mail } = await requested({
      job: 'TW-2423',
      stage: 'electrical_connect',
      resource: 'Priya Nair',
      startsAt: '2027-05-10T08:00:00Z',
      endsAt: '2027-05-10T12:00:00Z',
    });
    const old = answerLinks(mail);
    await scheduler
      .post(`/api/bookings/${id}/cancel`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 2 })
      .expect(200);
    await ctx
      .knex('bookings')
      .where('id', id)
      .update({ starts_at: '2027-05-11T08:00:00Z', ends_at: '2027-05-11T12:00:00Z' });
    await scheduler
      .post(`/api/bookings/${id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 3 })
      .expect(200);
    const page = await web().get(old.confirm).expect(200);
    expect(page.text).toContain('This slot has changed');
    expect(page.text).toContain('Tuesday 11 May 2027');
    expect(page.text).not.toMatch(/<form method="post"/);
    const post = await web().post(old.confirm).type('form').send({}).expect(409);
    expect(post.text).toContain('This slot has changed');
    expect(await stateOf(id)).toBe('sent');
  });
});

describe("a slot given to another firm, through the first firm's links", () => {
  it('shows nothing of it: not its new person, times or site, nor a certificate link, whether the link was used or not', async () => {
    const gareth = await idOf(ctx.knex, 'resources', { name: 'Gareth Pryce' });
    const moveTo = async (id: string, startsAt: string, endsAt: string) =>
      scheduler
        .patch(`/api/bookings/${id}`)
        .set('X-CSRF-Token', scheduler.csrf)
        .send({
          version: (await ctx.knex('bookings').where('id', id).first('version')).version,
          resourceId: gareth,
          startsAt,
          endsAt,
        })
        .expect(200);
    await unbookJobs(ctx.knex, 'TW-2418');
    // Answered by Brightspark from its e-mail, then given to Northgate's electrician a day later.
    const answered = await requested({
      job: 'TW-2418',
      stage: 'electrical_connect',
      resource: 'Tom Ashworth',
      startsAt: '2027-06-15T08:00:00Z',
      endsAt: '2027-06-15T12:00:00Z',
    });
    const used = answerLinks(answered.mail);
    await web().post(used.confirm).type('form').send({}).expect(200);
    await moveTo(answered.id, '2027-06-16T08:00:00Z', '2027-06-16T12:00:00Z');
    // Asked of Brightspark and never answered, then given to Northgate.
    const unanswered = await requested({
      job: 'TW-2418',
      stage: 'electrical_first_fix',
      resource: 'Tom Ashworth',
      startsAt: '2027-06-08T08:00:00Z',
      endsAt: '2027-06-08T12:00:00Z',
    });
    const stale = answerLinks(unanswered.mail);
    await moveTo(unanswered.id, '2027-06-09T08:00:00Z', '2027-06-09T12:00:00Z');
    const pages = [
      await web().get(used.confirm).expect(410),
      await web().get(used.decline).expect(410),
      await web().post(used.confirm).type('form').send({}).expect(410),
      await web().get(stale.confirm).expect(410),
      await web().post(stale.confirm).type('form').send({}).expect(410),
      await web()
        .post(stale.propose)
        .type('form')
        .send({ date: '2027-05-27', start: '09:00', end: '13:00' })
        .expect(410),
    ];
    const site = (await ctx.knex('jobs').where('reference', 'TW-2418').first('site_address')).siteAddress as string;
    for (const page of pages) {
      expect(page.text).toContain('This slot is no longer with your firm');
      expect(page.text).not.toMatch(/Gareth Pryce|June 2027|certificate|<form/i);
      expect(page.text).not.toContain(site);
    }
    // Nothing was taken through them: Northgate's request waits for Northgate.
    expect(await stateOf(unanswered.id)).toBe('sent');
  });
});

describe('confirming a time that was taken meanwhile', () => {
  it('shows a clear page: PostgreSQL refused the overlap', async () => {
    // The write path never sends two overlapping requests for one crane, so the overlap is made
    // behind its back: PostgreSQL's exclusion constraint is the last guard, and the page explains it.
    const first = await requested({
      job: 'TW-2421',
      stage: 'lift',
      resource: '25 t city crane',
      startsAt: '2027-05-27T08:00:00Z',
      endsAt: '2027-05-27T12:00:00Z',
    });
    const second = await requested({
      job: 'TW-2422',
      stage: 'lift',
      resource: '25 t city crane',
      startsAt: '2027-06-01T10:00:00Z',
      endsAt: '2027-06-01T14:00:00Z',
    });
    await ctx
      .knex('bookings')
      .where('id', first.id)
      .update({ starts_at: '2027-06-01T08:00:00Z', ends_at: '2027-06-01T12:00:00Z' });
    await web().post(answerLinks(first.mail).confirm).type('form').send({}).expect(200);
    const page = await web().post(answerLinks(second.mail).confirm).type('form').send({}).expect(409);
    expect(page.text).toContain('That time was taken meanwhile');
    expect(page.text).toContain('or call Tideway Hot Tubs on <a href="tel:01134960001">0113 496 0001</a>.');
    expect(await stateOf(second.id)).toBe('sent');
    // The link was not spent: the partner can still decline or propose with the others.
    await web().post(answerLinks(second.mail).decline).type('form').send({}).expect(200);
    expect(await stateOf(second.id)).toBe('declined');
  });

  it('says a slot that is under way has nothing to answer, and whom to call', async () => {
    const { id, mail } = await requested({
      job: 'TW-2421',
      stage: 'electrical_connect',
      resource: 'Tom Ashworth',
      startsAt: '2027-06-08T08:00:00Z',
      endsAt: '2027-06-08T12:00:00Z',
    });
    // Started on the day without the link being used (the crew marked it from their phone).
    await ctx.knex('bookings').where('id', id).update({ state: 'on_site' });
    const page = await web().get(answerLinks(mail).confirm).expect(200);
    expect(page.text).toContain('Already answered');
    expect(page.text).toContain(
      'This booking is under way, so there is nothing to answer. To change anything, call Tideway Hot Tubs on <a href="tel:01134960001">0113 496 0001</a>.',
    );
    expect(page.text).not.toMatch(/<form method="post"/);
  });

  it('tells the householder the lift day is booked when the crane confirms', async () => {
    const [notice] = await ctx.inbox.waitFor((m) => m.subject.startsWith('Your lift day: Tue 1 Jun 2027'));
    expect(notice!.to).toEqual(['beth@home.example']); // TW-2421's householder (Beth Garside) in the demo scenario
    expect(notice!.text).toMatch(/Power ready/);
  });
});

describe('proposing another time', () => {
  it('stores the proposal for the board; the scheduler accepts it and the partner gets the update', async () => {
    const { id, mail } = await requested({
      job: 'TW-2424',
      stage: 'electrical_connect',
      resource: 'Gareth Pryce',
      startsAt: '2027-05-12T08:00:00Z',
      endsAt: '2027-05-12T12:00:00Z',
    });
    const links = answerLinks(mail);
    const form = await web().get(links.propose).expect(200);
    expect(form.text).toContain('name="date"');
    expect(form.text).toContain('value="2027-05-12"');
    await web().post(links.propose).type('form').send({ date: '2027-05-13', start: '13:00', end: '10:00' }).expect(400);
    const done = await web()
      .post(links.propose)
      .type('form')
      .send({ date: '2027-05-13', start: '12:00', end: '16:00' })
      .expect(200);
    expect(done.text).toContain('your proposal is sent');
    const view = (await scheduler.get(`/api/bookings/${id}`).expect(200)).body;
    // 12:00–16:00 BST is 11:00–15:00 UTC.
    expect(view.answer).toMatchObject({
      action: 'propose',
      proposalStatus: 'open',
      proposedStart: '2027-05-13T11:00:00.000Z',
      proposedEnd: '2027-05-13T15:00:00.000Z',
    });
    expect(view.state).toBe('sent');

    await ctx.inbox.clear();
    const accepted = await scheduler
      .post(`/api/bookings/${id}/proposal/accept`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 2 })
      .expect(200);
    expect(accepted.body).toMatchObject({
      version: 3,
      state: 'sent',
      startsAt: '2027-05-13T11:00:00.000Z',
      endsAt: '2027-05-13T15:00:00.000Z',
      answer: { proposalStatus: 'accepted' },
    });
    const [update] = await ctx.inbox.waitFor((m) => m.subject.startsWith('Booking changed: Connect and certify'));
    expect(calendarOf(update!)).toMatchObject({ method: 'REQUEST', uid: `booking-${id}@127.0.0.1`, sequence: 3 });
    expect(calendarOf(update!).start.toISOString()).toBe('2027-05-13T11:00:00.000Z');
    await scheduler
      .post(`/api/bookings/${id}/proposal/accept`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 3 })
      .expect(409);
  });

  it('lets the scheduler refuse a proposal: the slot stands and the partner is asked again', async () => {
    // The first fix comes before the unit goes in and is connected (Thu 13 May, above): Thu 6 May.
    const { id, mail } = await requested({
      job: 'TW-2424',
      stage: 'electrical_first_fix',
      resource: 'Gareth Pryce',
      startsAt: '2027-05-06T08:00:00Z',
      endsAt: '2027-05-06T12:00:00Z',
    });
    await web()
      .post(answerLinks(mail).propose)
      .type('form')
      .send({ date: '2027-05-07', start: '09:00', end: '13:00' })
      .expect(200);
    await ctx.inbox.clear();
    const refused = await scheduler
      .post(`/api/bookings/${id}/proposal/refuse`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 2 })
      .expect(200);
    // The slot stands and the partner is asked about it again: a new request version, with new links.
    expect(refused.body).toMatchObject({
      version: 3,
      state: 'sent',
      startsAt: '2027-05-06T08:00:00.000Z',
      answer: { proposalStatus: 'refused' },
    });
    const [again] = await ctx.inbox.waitFor((m) => m.subject.startsWith('Your proposed time could not be used'));
    // The new links work: the partner confirms the original slot.
    await web().post(answerLinks(again!).confirm).type('form').send({}).expect(200);
    expect(await stateOf(id)).toBe('confirmed');
  });
});

describe('the pages a link opens', () => {
  it("are set in the app's font, served from the app itself before any session (no cookie set) and kept a year", async () => {
    // (Last in this file: a refused link is logged, and the tests above count what they leave.)
    const page = await web().get('/answer/not-a-token').expect(400);
    const urls = [...page.text.matchAll(/src:url\((\/fonts\/[^)]+)\) format\('woff2'\)/g)].map((m) => m[1]!);
    expect(urls).toEqual([
      '/fonts/work-sans-latin-400-normal.woff2',
      '/fonts/work-sans-latin-ext-400-normal.woff2',
      '/fonts/work-sans-latin-600-normal.woff2',
      '/fonts/work-sans-latin-ext-600-normal.woff2',
    ]);
    expect(page.text).toContain("font-family:'Work Sans',system-ui");
    for (const url of urls) {
      const font = await web().get(url).buffer(true).expect(200);
      expect(font.headers['content-type']).toBe('font/woff2');
      expect(font.headers['cache-control']).toBe('public, max-age=31536000');
      expect(font.headers['set-cookie']).toBeUndefined();
      // A WOFF2 file begins with its signature, "wOF2" (W3C WOFF File Format 2.0, §3).
      expect((font.body as Buffer).subarray(0, 4).toString('latin1')).toBe('wOF2');
    }
    // A font not there is a plain 404 problem, not the app's page.
    const missing = await web().get('/fonts/no-such-font.woff2').expect(404);
    expect(missing.headers['content-type']).toMatch(/application\/problem\+json/);
  });
});
