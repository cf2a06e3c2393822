import { afterEach, describe, expect, it, vi } from 'vitest';
import { effectScope } from 'vue';
import { proposeAutoPlace, searchSlots } from '@/api/placement';
import { usePlanProgress, usePlanRequest } from '@/composables/usePlanning';
import type { SlotAnswer } from '@shared/schemas/placement';

afterEach(() => {
  vi.unstubAllGlobals();
});

const flush = () => new Promise((resolve) => setTimeout(resolve, 0));

/** A fetch whose answers the test releases by hand, honouring AbortSignal like the browser's. */
function manualFetch() {
  const waiting: { url: string; method: string; body: unknown; release: (body: unknown, status?: number) => void }[] =
    [];
  vi.stubGlobal(
    'fetch',
    (url: string, init: RequestInit = {}) =>
      new Promise<Response>((resolve, reject) => {
        init.signal?.addEventListener('abort', () => reject(new DOMException('Aborted', 'AbortError')));
        waiting.push({
          url,
          method: init.method ?? 'GET',
          body: typeof init.body === 'string' ? JSON.parse(init.body) : undefined,
          release: (body, status = 200) =>
            resolve(
              new Response(JSON.stringify(body), {
                status,
                headers: { 'content-type': status >= 400 ? 'application/problem+json' : 'application/json' },
              }),
            ),
        });
      }),
  );
  return waiting;
}

const answer = (stageId: string, start: number): SlotAnswer => ({
  stageId,
  horizonDays: 120,
  kinds: [
    {
      kind: 'dumper',
      slots: [
        {
          resourceId: '12',
          start,
          end: start + 7_200_000,
          cost: { extraHireDays: 0, extraHirePence: 0, floatUsedMinutes: 0, delaysJob: false },
        },
      ],
    },
  ],
});

describe('planning on the server', () => {
  it('asks the server for slots and auto-place: the board no longer plans on the week it holds', async () => {
    const waiting = manualFetch();
    void searchSlots({ stageId: '41', resourceKind: 'dumper' });
    void proposeAutoPlace({ jobIds: ['7'] });
    expect(waiting.map((w) => [w.method, w.url, w.body])).toEqual([
      ['POST', '/api/plan/slots', { stageId: '41', resourceKind: 'dumper' }],
      ['POST', '/api/plan/auto-place', { jobIds: ['7'] }],
    ]);
  });

  it('keeps the newest answer: an older search that arrives late is dropped', async () => {
    const waiting = manualFetch();
    const scope = effectScope();
    const plan = scope.run(() => usePlanRequest<SlotAnswer>())!;
    const older = plan.run((signal) => searchSlots({ stageId: '41' }, signal));
    const newer = plan.run((signal) => searchSlots({ stageId: '42' }, signal));
    expect(plan.loading.value).toBe(true);
    waiting[1]!.release(answer('42', 2_000));
    waiting[0]!.release(answer('41', 1_000));
    expect(await older).toBeNull();
    expect((await newer)?.stageId).toBe('42');
    await flush();
    expect(plan.result.value?.kinds[0]?.slots[0]?.start).toBe(2_000);
    expect(plan.loading.value).toBe(false);
    scope.stop();
  });

  it("shows the server's problem, and clears it with the answer", async () => {
    const waiting = manualFetch();
    const scope = effectScope();
    const plan = scope.run(() => usePlanRequest<SlotAnswer>())!;
    const refused = plan.run((signal) => searchSlots({ stageId: '999' }, signal));
    waiting[0]!.release({ type: 'about:blank', title: 'Not found', status: 404, detail: 'No such stage.' }, 404);
    expect(await refused).toBeNull();
    expect(plan.error.value).toMatchObject({ status: 404, detail: 'No such stage.' });
    expect(plan.loading.value).toBe(false);
    plan.clear();
    expect(plan.error.value).toBeNull();
    scope.stop();
  });
});

/** A stand-in EventSource: the test opens it and sends events by hand. */
class FakeEventSource extends EventTarget {
  static last: FakeEventSource | null = null;
  closed = false;
  constructor(readonly url: string) {
    super();
    FakeEventSource.last = this;
  }
  close() {
    this.closed = true;
  }
  send(type: string, data: unknown) {
    this.dispatchEvent(new MessageEvent(type, { data: JSON.stringify(data) }));
  }
}

describe("auto-place's progress", () => {
  it('counts the plans tried of its own run only, from the board stream, and closes the stream after', async () => {
    vi.stubGlobal('EventSource', FakeEventSource);
    const scope = effectScope();
    const progress = scope.run(() => usePlanProgress())!;
    const opened = progress.listen('run-aaaa-1');
    const source = FakeEventSource.last!;
    expect(source.url).toBe('/api/board/stream');
    source.dispatchEvent(new Event('open'));
    await opened;
    source.send('plan-progress', { planId: 'run-aaaa-1', phase: 'single-pass', schedules: 1, used: 0 });
    source.send('plan-progress', { planId: 'run-aaaa-1', phase: 'search', schedules: 240, used: 0.4 });
    // Another tab's run on the same session: not ours.
    source.send('plan-progress', { planId: 'run-bbbb-2', phase: 'placing', schedules: 900, used: 1 });
    expect(progress.schedules.value).toBe(240);
    expect(progress.phase.value).toBe('search');
    progress.stop();
    expect(source.closed).toBe(true);
    scope.stop();
  });
});
