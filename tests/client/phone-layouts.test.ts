import { describe, expect, it, vi } from 'vitest';
import { h, ref, shallowRef } from 'vue';
import { NDataTable } from 'naive-ui';
import TemplatesView from '@/views/TemplatesView.vue';
import { jobColumns } from '@/components/jobs/job-columns';
import { IN_GROUND_TEMPLATE } from '@shared/templates';
import type { JobRow } from '@/api/types';
import { renderHtml } from './render';

// The templates page without the network: Waterline's default in-ground template, as the API gives it.
vi.mock('@/composables/useApiResource', () => ({
  useApiResource: () => ({
    data: shallowRef({ items: [{ ...IN_GROUND_TEMPLATE, version: 0, isDefault: true }] }),
    loading: ref(false),
    error: ref(null),
    refresh: async () => {},
  }),
}));

// An invented job, as the jobs list receives it.
const job: JobRow = {
  id: 7,
  reference: 'TW-7001',
  customerName: 'Elin Marsh',
  siteTown: 'Keswick',
  unitName: 'Fellbrook 5',
  installationType: 'in_ground',
  status: 'planned',
  promisedFrom: '2026-06-08',
  promisedTo: '2026-06-12',
  orderedOn: '2026-05-02',
};

const headers = (html: string) =>
  [...html.matchAll(/<th\b[^>]*>([\s\S]*?)<\/th>/g)].map((m) => m[1]!.replace(/<[^>]+>/g, '').trim());

async function jobsTable(phone: boolean): Promise<string> {
  const columns = jobColumns({ sort: 'reference', order: 'asc', currentYear: 2026, phone });
  return renderHtml({ render: () => h(NDataTable, { columns, data: [job], rowKey: (r: JobRow) => r.id }) });
}

describe('the jobs list on a phone', () => {
  it('holds every fact of the six wide columns in two, so nothing is off to the side', async () => {
    const wide = await jobsTable(false);
    expect(headers(wide)).toEqual(['Job', 'Customer and site', 'Unit', 'Promised', 'State', 'Ordered']);
    const phone = await jobsTable(true);
    expect(headers(phone)).toEqual(['Job', 'Customer and site']);
    const text = phone.replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ');
    expect(text).toContain('TW-7001 Planned');
    expect(text).toContain('Elin Marsh Keswick · Fellbrook 5, in-ground Promised Mon 8 Jun – Fri 12 Jun');
  });

  it('says when a job has no promised dates yet', async () => {
    const columns = jobColumns({ sort: 'reference', order: 'asc', currentYear: 2026, phone: true });
    const html = await renderHtml({
      render: () => h(NDataTable, { columns, data: [{ ...job, promisedFrom: null, promisedTo: null }] }),
    });
    expect(headers(html)).toEqual(['Job', 'Customer and site']);
    expect(html).toContain('Not promised yet');
  });
});

describe('the stage templates on a phone', () => {
  it('names its column on every cell, since the header row is hidden where the table does not fit', async () => {
    const html = await renderHtml(TemplatesView);
    const grid = html.slice(html.indexOf('<table class="grid"'), html.indexOf('</table>'));
    const columns = headers(grid);
    expect(columns).toEqual([
      'Stage',
      'Minutes of work',
      'Needs',
      'Cure before the next stages',
      'Notice (working days)',
      'May continue next working day',
      'Just in time',
    ]);
    const rows = grid.split('<tr').slice(2); // the header row, then one per stage
    expect(rows).toHaveLength(IN_GROUND_TEMPLATE.stages.length);
    for (const row of rows) {
      const labels = [...row.matchAll(/<td\b[^>]*data-label="([^"]*)"/g)].map((m) => m[1]);
      expect(labels).toEqual(columns);
    }
  });
});
