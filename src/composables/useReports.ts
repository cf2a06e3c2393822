import { computed, type Ref } from 'vue';
import { useApiResource } from '@/composables/useApiResource';
import { withQuery } from '@/api/client';
import { worstProblems } from '@shared/reports/worst';
import type { ClashReport, HireReport, UtilisationReport } from '@shared/reports/types';

export interface ReportSpanQuery { from: string; to: string }

/**
 * The three manager's reports over one span, the three worst problems across them, and the
 * CSV links (the server writes the CSV from the same figures).
 * @example const { clashes, hire, utilisation, worst, csv } = useReports(span)
 */
export function useReports(span: Ref<ReportSpanQuery>) {
  const clashes = useApiResource<ClashReport>(() => ({ path: '/api/reports/clashes', query: { ...span.value } }));
  const hire = useApiResource<HireReport>(() => ({ path: '/api/reports/hire', query: { ...span.value } }));
  const utilisation = useApiResource<UtilisationReport>(() => ({ path: '/api/reports/utilisation', query: { ...span.value } }));
  const worst = computed(() => (clashes.data.value && hire.data.value && utilisation.data.value
    ? worstProblems(clashes.data.value, hire.data.value, utilisation.data.value)
    : null));
  const csv = (name: 'clashes' | 'hire' | 'utilisation' | 'risks') => withQuery(`/api/reports/${name}.csv`, { ...span.value });
  return { clashes, hire, utilisation, worst, csv };
}
