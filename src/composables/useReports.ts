import { computed, ref, type Ref } from 'vue';
import { api } from '@/api/client';
import { useApiResource } from '@/composables/useApiResource';
import { withQuery } from '@/api/client';
import { worstProblems } from '@shared/reports/worst';
import { fixRequest } from '@shared/reports/fixes';
import type { ClashReport, HireReport, SuggestedFix, UtilisationReport } from '@shared/reports/types';
import type { WriteResultBody } from '@/components/reports/fix-result';

export interface ReportSpanQuery {
  from: string;
  to: string;
}

/** The CSV downloads: each is one table with one header; the utilisation totals are a file of their own. */
export type ReportCsv = 'clashes' | 'hire' | 'utilisation' | 'utilisation-summary' | 'risks';

/**
 * The three manager's reports over one span, the three worst problems across them, the CSV links
 * (the server writes the CSV from the same figures), and applying a suggested fix through the
 * board's own stage move (the guarded write path), after which the reports are read again.
 * @example const { clashes, hire, utilisation, worst, csv, applyFix } = useReports(span)
 */
export function useReports(span: Ref<ReportSpanQuery>) {
  const clashes = useApiResource<ClashReport>(() => ({ path: '/api/reports/clashes', query: { ...span.value } }));
  const hire = useApiResource<HireReport>(() => ({ path: '/api/reports/hire', query: { ...span.value } }));
  const utilisation = useApiResource<UtilisationReport>(() => ({
    path: '/api/reports/utilisation',
    query: { ...span.value },
  }));
  const worst = computed(() =>
    clashes.data.value && hire.data.value && utilisation.data.value
      ? worstProblems(clashes.data.value, hire.data.value, utilisation.data.value)
      : null,
  );
  const csv = (name: ReportCsv) => withQuery(`/api/reports/${name}.csv`, { ...span.value });
  const applying = ref(false);

  /** Applies a fix; a refusal (stale versions 409, broken rule 422) is thrown for the page to show. */
  async function applyFix(fix: SuggestedFix): Promise<WriteResultBody> {
    applying.value = true;
    try {
      const { path, body } = fixRequest(fix);
      const result = await api.post<WriteResultBody>(path, body);
      await Promise.all([clashes.refresh(), hire.refresh(), utilisation.refresh()]);
      return result;
    } finally {
      applying.value = false;
    }
  }
  return { clashes, hire, utilisation, worst, csv, applying, applyFix };
}
