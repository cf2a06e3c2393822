import type { Knex } from 'knex';

const DAY = 86_400_000;

export interface PruneSettings {
  now: Date;
  /** Outbox rows sent or failed, created more than this many days ago. */
  outboxKeepDays: number;
  /** Refused link attempts older than this. */
  linkAttemptsKeepDays: number;
  /** The board's change marks (board-version.ts) older than this. */
  boardChangesKeepDays: number;
  /** Rows deleted per statement, so no delete holds its locks for long. */
  batch?: number;
}

export interface PruneResult {
  outbox: number;
  linkAttempts: number;
  boardChanges: number;
}

/** Deletes the rows `pick` names, `batch` at a time, until none are left; returns how many went. */
async function deleteInBatches(
  knex: Knex,
  table: string,
  pick: (q: Knex.QueryBuilder) => Knex.QueryBuilder,
  batch: number,
): Promise<number> {
  let total = 0;
  for (;;) {
    const deleted = await knex(table)
      .whereIn('id', pick(knex(table).select('id')).limit(batch))
      .delete();
    total += deleted;
    if (deleted < batch) return total;
  }
}

/**
 * Removes rows nobody needs any more: outbox rows that are settled (sent, or failed for good) and
 * old, refused link attempts, and old board change marks. A pending or queued e-mail is never
 * removed, whatever its age. Each delete runs on its own index (migration 20261224090000).
 */
export async function pruneOldRows(knex: Knex, settings: PruneSettings): Promise<PruneResult> {
  const batch = settings.batch ?? 5000;
  const before = (days: number) => new Date(settings.now.getTime() - days * DAY);
  const outbox = await deleteInBatches(
    knex,
    'outbox',
    (q) => q.whereIn('status', ['sent', 'failed']).where('created_at', '<', before(settings.outboxKeepDays)),
    batch,
  );
  const linkAttempts = await deleteInBatches(
    knex,
    'link_attempts',
    (q) => q.where('at', '<', before(settings.linkAttemptsKeepDays)),
    batch,
  );
  const boardChanges = await deleteInBatches(
    knex,
    'board_changes',
    (q) => q.where('at', '<', before(settings.boardChangesKeepDays)),
    batch,
  );
  return { outbox, linkAttempts, boardChanges };
}
