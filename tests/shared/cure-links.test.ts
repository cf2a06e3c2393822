import { describe, expect, it } from 'vitest';
import {
  analyseBoard,
  createBoardIndex,
  findSlots,
  formatInstant,
  jobCriticalPath,
  unbookedStageTimes,
  type Board,
  type Booking,
  type Violation,
} from '../../shared/scheduler/index.js';
import { IN_GROUND_TEMPLATE, planFromTemplate } from '../../shared/templates/index.js';
import { at, LONDON } from './scheduler/scenario.js';
import { plannedBoard } from './scheduler/in-ground.js';

// An in-ground job planned from the default template, today Fri 29 May 2026 09:00 BST. Booked so far:
//   survey Fri 29 May 10:00–12:00, excavation Mon 1 Jun 08:00 – Tue 2 Jun 11:00 (12 h, may run over),
//   base pour Wed 3 Jun 08:00–13:00.
// The walls wait for an overnight set only (16 elapsed hours: Thu 4 Jun 05:00, so the next working
// start is Thu 4 Jun 08:00). The lift loads the base: it waits for 70 % of 28-day strength, ACI 209R-92
// t = 4·0.7 / (1 − 0.85·0.7) = 6.9136 days after Wed 3 Jun 13:00 = Wed 10 Jun 10:56.
const NOW = at(2026, 5, 29, 9);
const when = (t: number | undefined) => (t === undefined ? '' : formatInstant(t, LONDON));
const b = (id: string, stageId: string, resourceId: string, start: number, end: number): Booking => ({
  id,
  stageId,
  resourceId,
  start,
  end,
  state: 'confirmed',
  installerFirmId: 'tideway',
});

function pouredBoard(extra: Booking[] = []): Board {
  const board = plannedBoard();
  return {
    ...board,
    bookings: [
      b('survey-1', 'survey', 'crew-heron', at(2026, 5, 29, 10), at(2026, 5, 29, 12)),
      ...['gang', 'digger', 'dumper'].map((r) => b(`dig-${r}`, 'excavation', r, at(2026, 6, 1, 8), at(2026, 6, 2, 11))),
      b('pour-1', 'base_pour', 'gang', at(2026, 6, 3, 8), at(2026, 6, 3, 13)),
      ...extra,
    ],
  };
}

const sequencing = (vs: Violation[], stageId: string) =>
  vs.filter((v) => ['order', 'lag', 'cure', 'unbooked_predecessor'].includes(v.kind) && v.stageIds.includes(stageId));

describe('the default in-ground template', () => {
  it('puts the walls after an overnight set and makes only what loads the base wait for the cure', () => {
    const links = planFromTemplate(IN_GROUND_TEMPLATE, { craneNeeded: true, excavationMinutes: null }).links;
    const out = links.filter((l) => l.fromKind === 'base_pour');
    expect(out).toEqual([
      {
        fromKind: 'base_pour',
        toKind: 'walls',
        type: 'FS',
        lagAmount: 16,
        lagUnit: 'elapsed_hours',
        waitsForCure: false,
      },
      { fromKind: 'base_pour', toKind: 'lift', type: 'FS', lagAmount: 0, lagUnit: 'working_hours', waitsForCure: true },
    ]);
  });
});

describe('walls on a base that has set overnight', () => {
  it('can be booked the next working day after the pour', () => {
    const walls = [b('walls-1', 'walls', 'gang', at(2026, 6, 4, 8), at(2026, 6, 5, 15))];
    const { violations } = analyseBoard(pouredBoard(walls), { now: NOW, skipCriticalPath: true });
    expect(sequencing(violations, 'walls')).toEqual([]);
  });

  it('are refused the same afternoon, for the overnight set and not for the cure', () => {
    const walls = [b('walls-1', 'walls', 'gang', at(2026, 6, 3, 14), at(2026, 6, 4, 13))];
    const { violations } = analyseBoard(pouredBoard(walls), { now: NOW, skipCriticalPath: true });
    expect(sequencing(violations, 'walls').map((v) => v.message)).toEqual([
      "'Block retaining walls' can't start before Thu 4 Jun 05:00: it must wait 16 elapsed hours after 'Pour reinforced base' finishes",
    ]);
  });

  it('are offered, planned and placed from the next working day, not after the cure', () => {
    const index = createBoardIndex(pouredBoard(), { now: NOW });
    expect(when(unbookedStageTimes(index, 'walls')?.start)).toBe('Thu 4 Jun 08:00');
    expect(
      when(
        findSlots(index, { stageId: 'walls', resourceKind: 'groundworks_crew', earliest: NOW }, { alternatives: 0 })[0]
          ?.start,
      ),
    ).toBe('Thu 4 Jun 08:00');
    expect(when(jobCriticalPath(index, 'job').stages.find((s) => s.stageId === 'walls')?.es)).toBe('Thu 4 Jun 08:00');
  });
});

describe('the lift, which loads the base', () => {
  const lift = (day: number, hour: number) =>
    ['crane', 'crew-heron', 'pt-1', 'pt-2', 'rollers'].map((r) =>
      b(`lift-${r}`, 'lift', r, at(2026, 6, day, hour), at(2026, 6, day, hour + 4)),
    );

  it('is refused before the cure releases the base, and the refusal names the cure', () => {
    const { violations } = analyseBoard(pouredBoard(lift(9, 8)), { now: NOW, skipCriticalPath: true });
    const cure = violations.filter((v) => v.kind === 'cure');
    expect(cure.map((v) => v.message)).toEqual([
      "'Crane lift into pit' can't start before the base has cured: 70% strength is reached at Wed 10 Jun 10:56",
    ]);
    expect(cure[0]?.severity).toBe('error');
  });

  it('is not held by the cure once the base has its strength', () => {
    const { violations } = analyseBoard(pouredBoard(lift(10, 11)), { now: NOW, skipCriticalPath: true });
    expect(violations.filter((v) => v.kind === 'cure')).toEqual([]);
  });

  it('is planned, while unbooked, from the cure release', () => {
    const index = createBoardIndex(pouredBoard(), { now: NOW });
    expect(unbookedStageTimes(index, 'lift')?.heldBy).toMatchObject({ kind: 'predecessor', stageId: 'base_pour' });
    expect(when(unbookedStageTimes(index, 'lift')?.start)).toBe('Wed 10 Jun 11:00');
  });
});
