import { afterEach, describe, expect, it, vi } from 'vitest';
import { effectScope, ref } from 'vue';
import { useProgressTimes } from '@/composables/useProgressTimes';
import { stubFetch } from './fake-fetch';

afterEach(() => {
  vi.unstubAllGlobals();
});

/** The job's stages as GET /api/jobs/:id/stages answers them, with only what the times need. */
const stagesAnswer = (bookings: { id: string; arrivedAt?: string | null; doneAt?: string | null }[]) => ({
  status: 200,
  body: { items: [{ id: 's1', bookings }] },
});

describe("the board's job panel: when crews were on site and done", () => {
  it("reads the job's stages only while a booking is on site or done, and again when one gets there", async () => {
    const sent = stubFetch(() =>
      stagesAnswer([
        { id: 'b1', arrivedAt: '2026-06-01T07:59:00.000Z', doneAt: null },
        { id: 'b2', arrivedAt: null, doneAt: null },
      ]),
    );
    const bookings = ref([
      { id: 'b1', state: 'confirmed' as string },
      { id: 'b2', state: 'pencilled' as string },
    ]);
    const jobId = ref<string | null>('12');
    const scope = effectScope();
    const times = scope.run(() =>
      useProgressTimes(
        () => jobId.value,
        () => bookings.value as never,
      ),
    )!;
    // Nothing on site yet: nothing asked, nothing known.
    await vi.waitFor(() => expect(sent).toEqual([]));
    expect(times.value.size).toBe(0);

    bookings.value = [{ ...bookings.value[0]!, state: 'on_site' }, bookings.value[1]!];
    await vi.waitFor(() =>
      expect(times.value.get('b1')).toEqual({ arrivedAt: '2026-06-01T07:59:00.000Z', doneAt: null }),
    );
    expect(sent.map((r) => r.url)).toEqual(['/api/jobs/12/stages']);

    // The same states again (the board's stream sent another change): not read again.
    bookings.value = bookings.value.map((b) => ({ ...b }));
    bookings.value = [{ ...bookings.value[0]!, state: 'done' }, bookings.value[1]!];
    await vi.waitFor(() => expect(sent).toHaveLength(2));

    // The panel closed: what was read is let go.
    jobId.value = null;
    await vi.waitFor(() => expect(times.value.size).toBe(0));
    expect(sent).toHaveLength(2);
    scope.stop();
  });

  it('keeps to the last job asked for when an earlier answer comes late', async () => {
    let release: (() => void) | undefined;
    stubFetch(async (r) => {
      if (r.url.includes('/12/')) await new Promise<void>((resolve) => (release = resolve));
      return stagesAnswer([{ id: r.url.includes('/12/') ? 'old' : 'new', arrivedAt: '2026-06-01T08:00:00.000Z' }]);
    });
    const jobId = ref<string | null>('12');
    const scope = effectScope();
    const times = scope.run(() =>
      useProgressTimes(
        () => jobId.value,
        () => [{ id: jobId.value === '12' ? 'old' : 'new', state: 'on_site' }] as never,
      ),
    )!;
    await vi.waitFor(() => expect(release).toBeDefined());
    jobId.value = '13';
    await vi.waitFor(() => expect([...times.value.keys()]).toEqual(['new']));
    release!();
    await new Promise((resolve) => setTimeout(resolve, 0));
    expect([...times.value.keys()]).toEqual(['new']);
    scope.stop();
  });
});
