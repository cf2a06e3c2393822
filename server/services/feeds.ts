import { createHash, randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import { Resource } from '../models/index.ts';
import { UnprocessableError } from '../errors.ts';
import { personFeed } from '../mail/calendar.ts';
import { CAUTION_NOTE, cautionLines } from '../../shared/cautions.ts';
import { loadBookingFactsMany, slotSections } from '../mail/facts.ts';
import type { Actor } from './actor.ts';
import { findVisible } from './scope.ts';
import { bookingDuring } from './ranges.ts';
import { recordChange } from './audit.ts';

const hashOf = (token: string) => createHash('sha256').update(token).digest('hex');
const DAY = 86_400_000;

/**
 * Private iCalendar feeds, one per person: the URL holds a random token (only its hash is stored),
 * so a calendar app can subscribe without signing in. Rotating makes a new URL and kills the old;
 * revoking kills it outright.
 */
export class FeedsService {
  constructor(
    private readonly knex: Knex,
    private readonly publicUrl: string,
  ) {}

  private async person(actor: Actor, resourceId: string, trx: Knex.Transaction): Promise<Resource> {
    const person = await findVisible(Resource, actor, resourceId, trx, 'person');
    if (person.category !== 'person' || String(person.firmId) !== actor.firmId) {
      throw new UnprocessableError('A feed belongs to one of your own people.', { code: 'not-a-person' });
    }
    return person;
  }

  async rotate(actor: Actor, resourceId: string): Promise<{ url: string; createdAt: string }> {
    return this.knex.transaction(async (trx) => {
      const person = await this.person(actor, resourceId, trx);
      await this.stopLive(trx, actor, person);
      const token = randomBytes(24).toString('base64url');
      const [row] = await trx('calendar_feeds')
        .insert({ resource_id: person.id, token_hash: hashOf(token), created_by: actor.userId })
        .returning(['id', 'created_at']);
      // A link that shows a person's work to whoever holds it: who made it is audited (never the token).
      await recordChange(trx, actor, 'calendar_feed', String(row.id), 'create', null, {
        resourceId: String(person.id),
        person: person.name,
      });
      return { url: `${this.publicUrl}/feeds/${token}.ics`, createdAt: row.createdAt.toISOString() };
    });
  }

  async revoke(actor: Actor, resourceId: string): Promise<void> {
    await this.knex.transaction(async (trx) => {
      const person = await this.person(actor, resourceId, trx);
      await this.stopLive(trx, actor, person);
    });
  }

  /** Stops the person's live feed (if any), audited: its link no longer works. */
  private async stopLive(trx: Knex.Transaction, actor: Actor, person: Resource): Promise<void> {
    const stopped: { id: string }[] = await trx('calendar_feeds')
      .where({ resource_id: person.id })
      .whereNull('revoked_at')
      .update({ revoked_at: new Date() })
      .returning('id');
    for (const feed of stopped)
      await recordChange(
        trx,
        actor,
        'calendar_feed',
        String(feed.id),
        'delete',
        { resourceId: String(person.id), person: person.name },
        null,
      );
  }

  /** The feed for a live token, or null (unknown and revoked tokens look the same). */
  async render(token: string, now = new Date()): Promise<string | null> {
    if (!/^[\w-]{20,64}$/.test(token)) return null;
    const feed = await this.knex('calendar_feeds as f')
      .join('resources as r', 'r.id', 'f.resource_id')
      .where('f.token_hash', hashOf(token))
      .whereNull('f.revoked_at')
      .first('r.id', 'r.name');
    if (!feed) return null;
    // The person's own bookings and their crews'; shown once sent to the firm.
    const ids: string[] = await this.knex('bookings as b')
      .where((w) =>
        w
          .where('b.resource_id', feed.id)
          .orWhereIn('b.resource_id', this.knex('crew_members').select('crew_id').where('person_id', feed.id)),
      )
      .whereIn('b.state', ['sent', 'confirmed', 'on_site', 'done'])
      .where(bookingDuring(this.knex, 'b', now.getTime() - 60 * DAY, now.getTime() + 400 * DAY))
      .orderBy('b.starts_at')
      .limit(1000)
      .pluck('b.id');
    // Every booking's facts in a fixed number of queries, however many bookings the feed holds.
    const factsOf = await loadBookingFactsMany(this.knex, ids.map(String));
    const events = [];
    for (const id of ids) {
      const facts = factsOf.get(String(id));
      if (!facts) continue;
      const cautions = cautionLines(facts.stage.kind);
      events.push({
        facts,
        // What the request e-mail says of the slot (the read policy's `forPartner`: whom to call,
        // the supply for electrical work, which way the unit faces for those who set it down).
        description: [
          `${facts.stage.name} for ${facts.installer.name} (job ${facts.job.reference})`,
          facts.booking.state === 'sent' ? 'Not yet confirmed.' : `State: ${facts.booking.state}.`,
          ...slotSections(facts).flatMap((s) => ['', `${s.heading}:`, ...s.lines]),
          ...(cautions.length ? ['', ...cautions.map((c) => `- ${c}`), CAUTION_NOTE] : []),
        ].join('\n'),
      });
    }
    return personFeed(`${feed.name} · Waterline`, events, now, this.publicUrl);
  }
}
