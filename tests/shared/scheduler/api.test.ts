import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import {
  analyseBoard,
  checkMove,
  createBoardIndex,
  jobCriticalPath,
  SchedulerError,
} from '../../../shared/scheduler/index.js';
import { at, booking, dep, emptyBoard } from './scenario.js';

const NOW = at(2026, 5, 1, 9);

describe('refusals with typed errors', () => {
  it('a move for a stage that is not on the board', () => {
    const index = createBoardIndex(emptyBoard(), { now: NOW });
    expect(() => checkMove(index, { stageId: 'ghost', start: NOW })).toThrowError(
      expect.objectContaining({ code: 'unknown_stage' }),
    );
  });
  it('a move of an unbooked stage without a resource', () => {
    const index = createBoardIndex(emptyBoard(), { now: NOW });
    expect(() => checkMove(index, { stageId: 'lift', start: NOW })).toThrow(SchedulerError);
  });
  it('a critical path through a cycle', () => {
    const b = emptyBoard();
    b.dependencies = [...b.dependencies, dep('connect', 'dig')];
    expect(() => jobCriticalPath(createBoardIndex(b, { now: NOW }), 'job-1')).toThrowError(
      expect.objectContaining({ code: 'cycle' }),
    );
    expect(analyseBoard(b, { now: NOW }).criticalPaths).toEqual([]);
  });
});

describe('lead time counted from the order date', () => {
  it('a delivery needing 15 working days from an order placed on Fri 1 May', () => {
    const b = emptyBoard();
    b.jobs = [{ id: 'job-1', firmId: 'installer-1', orderedAt: at(2026, 5, 1, 9) }];
    b.stages = [
      ...b.stages,
      {
        id: 'deliver',
        jobId: 'job-1',
        kind: 'delivery',
        name: 'Delivery',
        durationMinutes: 120,
        requirements: [{ kind: 'install_crew', count: 1 }],
      },
    ];
    b.leadTimeRules = [{ appliesTo: { stageKind: 'delivery' }, workingDays: 15, from: 'order' }];
    b.bookings = [booking('d', 'deliver', 'crew-a', at(2026, 5, 20, 8), at(2026, 5, 20, 10), { state: 'pencilled' })];
    const lead = analyseBoard(b, { now: at(2026, 5, 4, 9) }).violations.filter((v) => v.kind === 'lead_time');
    // 15 working days from Fri 1 May 09:00, skipping Mon 4 May and Mon 25 May (bank holidays):
    // May 5–8 (4), 11–15 (9), 18–22 (14), 26 (15) → Tue 26 May 09:00.
    expect(lead[0]?.message).toBe(
      "'Delivery' needs 15 working days' notice from the order date: the earliest start is Tue 26 May 09:00",
    );
  });
});

describe('the engine is bundled for the browser too', () => {
  it('imports nothing from Node and reads no clock', () => {
    const dir = join(import.meta.dirname, '../../../shared/scheduler');
    const files: string[] = [];
    const walk = (d: string): void => {
      for (const f of readdirSync(d)) {
        const p = join(d, f);
        if (statSync(p).isDirectory()) walk(p);
        else if (p.endsWith('.ts')) files.push(p);
      }
    };
    walk(dir);
    expect(files.length).toBeGreaterThan(20);
    for (const f of files) {
      const src = readFileSync(f, 'utf8');
      expect(src, f).not.toMatch(/from ['"]node:|require\(|\bprocess\.|Date\.now\(|new Date\(\)|performance\.now/);
    }
  });
});
