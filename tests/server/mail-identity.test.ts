import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Transporter } from 'nodemailer';
import ICAL from 'ical.js';
import { account, signIn, type Agent } from '../helpers/server.ts';
import { pencilIn, startMailTestApp, type MailTestContext } from '../helpers/mail.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { processMailJob } from '../../workers/mail.ts';

// Two installations of Waterline may serve the same partner: what one mints must never name the
// other's events or messages. No pipeline runs here; the worker's own step renders the row.
let ctx: MailTestContext;
let scheduler: Agent;

beforeAll(async () => {
  ctx = await startMailTestApp();
  await unbookJobs(ctx.knex, 'TW-2424');
  scheduler = await signIn(ctx, account('scheduler').email);
});
afterAll(async () => {
  await ctx.close();
});

interface Sent {
  messageId: string;
  icalEvent: { content: string };
}

/** What the mail worker hands to SMTP for one outbox row under a given PUBLIC_URL (rolled back after). */
async function sentUnder(outboxId: string, publicUrl: string): Promise<Sent> {
  const sent: Sent[] = [];
  const transport = {
    sendMail: async (mail: Sent) => {
      sent.push(mail);
      return {};
    },
  } as unknown as Transporter;
  const undo = new Error('roll back: the row stays unsent for the next rendering');
  await ctx.knex
    .transaction(async (trx) => {
      expect(
        await processMailJob(
          { data: { outboxId } },
          { knex: trx, config: { ...ctx.config, PUBLIC_URL: publicUrl }, transport },
        ),
      ).toBe('sent');
      throw undo;
    })
    .catch((err: unknown) => {
      if (err !== undo) throw err;
    });
  expect(sent).toHaveLength(1);
  return sent[0]!;
}
const uidOf = (ics: string) =>
  String(new ICAL.Component(ICAL.parse(ics)).getFirstSubcomponent('vevent')!.getFirstPropertyValue('uid'));

describe('identifiers of one booking under two installations', () => {
  it('take their domain from PUBLIC_URL, so two installations never share a UID or a Message-ID', async () => {
    const b = await pencilIn(ctx.knex, {
      job: 'TW-2424',
      stage: 'lift',
      resource: '60 t mobile crane',
      startsAt: '2027-09-06T08:00:00Z',
      endsAt: '2027-09-06T12:00:00Z',
    });
    await scheduler
      .post(`/api/bookings/${b.id}/publish`)
      .set('X-CSRF-Token', scheduler.csrf)
      .send({ version: 1 })
      .expect(200);
    const row = await ctx
      .knex('outbox')
      .where('kind', 'booking_request')
      .whereRaw("payload->>'bookingId' = ?", [b.id])
      .first();

    const tideway = await sentUnder(String(row.id), 'https://plan.tideway.example');
    const other = await sentUnder(String(row.id), 'https://board.moorview.example:8443');
    const local = await sentUnder(String(row.id), 'http://127.0.0.1:3000');
    // RFC 5545 §3.8.4.7: the UID's right-hand side is the installation's host; RFC 5322 §3.6.4 the same for Message-ID.
    expect(uidOf(tideway.icalEvent.content)).toBe(`booking-${b.id}@plan.tideway.example`);
    expect(uidOf(other.icalEvent.content)).toBe(`booking-${b.id}@board.moorview.example`);
    expect(uidOf(local.icalEvent.content)).toBe(`booking-${b.id}@127.0.0.1`);
    expect(tideway.messageId).toBe(`<${row.idempotencyKey}@plan.tideway.example>`);
    expect(other.messageId).toBe(`<${row.idempotencyKey}@board.moorview.example>`);
    expect(local.messageId).toBe(`<${row.idempotencyKey}@127.0.0.1>`);

    // One installation keeps one UID for the booking: rendering again gives the same one.
    expect(uidOf((await sentUnder(String(row.id), 'https://plan.tideway.example')).icalEvent.content)).toBe(
      uidOf(tideway.icalEvent.content),
    );
  });
});
