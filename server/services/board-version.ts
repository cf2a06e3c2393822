import { createHash, randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { visibleFirmIds } from '../models/base.ts';
import type { Actor } from './actor.ts';

/**
 * Without a release id (RELEASE_ID) a process tags its own: a new process may answer in another
 * shape, so its ETags never match an older one's, and several processes behind one address each
 * keep their own (a request may miss a 304 it could have had, never the other way round). With one,
 * every process of that release gives the same tags.
 */
const PROCESS_ID = randomUUID();
/** A 304 may hand back a board whose `now` is up to this old (the engine counts notice from it). */
export const BOARD_NOW_STEP_MS = 60_000;
/** Rows a change may commit behind (a transaction that took its id earlier but committed later). */
const LATE_COMMIT_WINDOW = 1000;

export interface BoardWindow {
  from: number;
  to: number;
  now: number;
}

/**
 * The weak ETag of a board window as this actor reads it, from one indexed query: the latest
 * `board_changes` row of the firms whose data the actor's board shows (their own and, for an
 * installer, its partners': `visibleFirmIds`, as the resource scope) and how many of the last
 * rows are visible yet, so a change that commits after a later one still counts. The triggers of
 * migration 20261224090000 write a row for every change to what the board reads. The tag is a hash:
 * it tells nothing of ids or counts, and another firm's change that the actor cannot see leaves it as it was.
 * Worked out before the board is loaded, so a change committed in between only costs one more 200.
 */
export async function boardEtag(
  knex: Knex,
  actor: Actor,
  window: BoardWindow,
  release: string = PROCESS_ID,
): Promise<string> {
  // Per firm, the newest row from the end of its index; then the recent rows of all of them.
  const { rows } = await knex.raw(
    `WITH f(firm_id) AS (?),
    t AS (SELECT max(m.id) AS top FROM f CROSS JOIN LATERAL (SELECT max(c.id) AS id FROM board_changes c WHERE c.firm_id = f.firm_id) m)
    SELECT t.top, (SELECT count(*) FROM board_changes c WHERE c.firm_id IN (SELECT firm_id FROM f) AND c.id > t.top - ?) AS recent FROM t`,
    [visibleFirmIds(knex, actor), LATE_COMMIT_WINDOW],
  );
  const version = rows[0] as { top: string | null; recent: string };
  const key = [
    release,
    actor.userId,
    actor.firmId,
    actor.role,
    window.from,
    window.to,
    Math.floor(window.now / BOARD_NOW_STEP_MS),
    version.top ?? 0,
    version.recent,
  ].join('|');
  return `W/"b-${createHash('sha256').update(key).digest('base64url').slice(0, 27)}"`;
}

/** Whether an If-None-Match header names this ETag (weak comparison, as RFC 9110 asks for GET). */
export function etagMatches(ifNoneMatch: string | undefined, etag: string): boolean {
  if (!ifNoneMatch) return false;
  if (ifNoneMatch.trim() === '*') return true;
  const opaque = (tag: string) => tag.trim().replace(/^W\//, '');
  return ifNoneMatch.split(',').some((tag) => opaque(tag) === opaque(etag));
}
