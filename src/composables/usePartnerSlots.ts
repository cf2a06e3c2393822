import { computed, ref } from 'vue';
import { api, ApiError } from '@/api/client';
import { useApiResource } from '@/composables/useApiResource';
import type { PartnerAnswer, PartnerSlot } from '@shared/schemas/answers';

/**
 * A partner firm's upcoming slots (GET /api/partner/slots) and its answers to them. `busy` holds
 * the id of the slot being answered, so its buttons can show progress.
 * @example const { slots, loading, error, refresh, answer } = usePartnerSlots()
 */
export function usePartnerSlots() {
  // Kept for the tab: the electrician on site without a signal still has the slots, dated.
  const resource = useApiResource<{ items: PartnerSlot[] }>(() => ({ path: '/api/partner/slots' }), {
    keep: true,
    refreshOnReturn: true,
  });
  const { data, loading, error, refresh, stale } = resource;
  const busy = ref<string | null>(null);
  const slots = computed(() => data.value?.items ?? []);

  async function answer(slotId: string, body: PartnerAnswer): Promise<void> {
    busy.value = slotId;
    try {
      await api.post(`/api/partner/slots/${slotId}/answer`, body);
      await refresh();
    } catch (caught) {
      // The installer changed the slot meanwhile (or someone answered it): show it as it stands now.
      if (caught instanceof ApiError && caught.status === 409) await refresh();
      throw caught;
    } finally {
      busy.value = null;
    }
  }

  return { resource, slots, loading, error, refresh, stale, answer, busy };
}
