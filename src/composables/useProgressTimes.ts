import { ref, watch, type Ref } from 'vue';
import { jobWork } from '@/api/job-work';
import type { BoardBooking } from '@shared/board-data';

/** When one booking's crew were marked on site and done (ISO 8601; null when not known). */
export interface BookingProgressTimes {
  arrivedAt: string | null;
  doneAt: string | null;
}

/**
 * When the crews of a job's bookings were marked on site and done, for the board's job panel: read
 * from the job's stages (the same read policy and figures as the job page) only while one of the
 * job's bookings is on site or done, and read again when one of them gets there. The board's own
 * data stays as it is: these times are a fact of a few bookings, not of the whole window.
 * @example const times = useProgressTimes(() => jobId, () => jobsBookings); times.value.get('41')?.arrivedAt
 */
export function useProgressTimes(
  jobId: () => string | null,
  /** The job's bookings on the board. */
  bookings: () => readonly Pick<BoardBooking, 'id' | 'state'>[],
): Ref<Map<string, BookingProgressTimes>> {
  const times = ref(new Map<string, BookingProgressTimes>());
  let asked = 0;
  // What decides whether the times need reading: the job, and which of its bookings are on site or done.
  const key = () => {
    const id = jobId();
    if (id === null) return '';
    const progressed = bookings()
      .filter((b) => b.state === 'on_site' || b.state === 'done')
      .map((b) => `${b.id}:${b.state}`)
      .sort();
    return progressed.length === 0 ? '' : `${id}|${progressed.join(',')}`;
  };
  watch(
    key,
    async (k) => {
      const id = jobId();
      const mine = ++asked;
      if (k === '' || id === null) {
        times.value = new Map();
        return;
      }
      try {
        const { items } = await jobWork.stages(id);
        if (mine !== asked) return;
        const found = new Map<string, BookingProgressTimes>();
        for (const s of items)
          for (const b of s.bookings ?? [])
            found.set(b.id, { arrivedAt: b.arrivedAt ?? null, doneAt: b.doneAt ?? null });
        times.value = found;
      } catch {
        // Without them the panel still says each booking's state; the times are an extra.
        if (mine === asked) times.value = new Map();
      }
    },
    { immediate: true },
  );
  return times;
}
