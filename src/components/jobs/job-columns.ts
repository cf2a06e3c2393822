import { h } from 'vue';
import { RouterLink } from 'vue-router';
import type { DataTableColumns, DataTableSortState } from 'naive-ui';
import type { JobRow } from '@/api/types';
import type { JobSortKey } from '@/composables/useJobList';
import { statusColours } from '@/styles/palette';
import { formatCalendarDate, formatCalendarRange } from '@/utils/dates';
import { INSTALLATION_TYPE_LABELS, JOB_STATUS_LABELS } from '@/utils/labels';
import ColourTag from '../ColourTag.vue';

export const SORTABLE: readonly JobSortKey[] = ['reference', 'customerName', 'promisedFrom', 'status', 'orderedOn'];

export function isSortKey(key: unknown): key is JobSortKey {
  return typeof key === 'string' && (SORTABLE as readonly string[]).includes(key);
}

/** The jobs table's columns; sorting is done by the server, so each sortable column only shows the current order. */
export function jobColumns(options: {
  sort: JobSortKey;
  order: 'asc' | 'desc';
  currentYear: number;
}): DataTableColumns<JobRow> {
  const sortOrder = (key: JobSortKey): DataTableSortState['order'] =>
    options.sort === key ? (options.order === 'asc' ? 'ascend' : 'descend') : false;
  const dates = { currentYear: options.currentYear };
  return [
    {
      key: 'reference',
      title: 'Job',
      sorter: true,
      sortOrder: sortOrder('reference'),
      width: 120,
      render: (row) => h(RouterLink, { to: `/jobs/${row.id}` }, () => row.reference),
    },
    {
      key: 'customerName',
      title: 'Customer and site',
      sorter: true,
      sortOrder: sortOrder('customerName'),
      render: (row) => h('div', [h('div', row.customerName), h('div', { class: 'wl-small wl-muted' }, row.siteTown)]),
    },
    {
      key: 'unitName',
      title: 'Unit',
      render: (row) =>
        h('div', [
          h('div', row.unitName),
          h(
            'div',
            { class: 'wl-small wl-muted' },
            INSTALLATION_TYPE_LABELS[row.installationType] ?? row.installationType,
          ),
        ]),
    },
    {
      key: 'promisedFrom',
      title: 'Promised',
      sorter: true,
      sortOrder: sortOrder('promisedFrom'),
      render: (row) =>
        formatCalendarRange(row.promisedFrom, row.promisedTo, dates) ||
        h('span', { class: 'wl-muted' }, 'Not promised yet'),
    },
    {
      key: 'status',
      title: 'State',
      sorter: true,
      sortOrder: sortOrder('status'),
      render: (row) =>
        h(ColourTag, {
          label: JOB_STATUS_LABELS[row.status] ?? row.status,
          colours: statusColours[row.status] ?? statusColours.enquiry,
        }),
    },
    {
      key: 'orderedOn',
      title: 'Ordered',
      sorter: true,
      sortOrder: sortOrder('orderedOn'),
      render: (row) => formatCalendarDate(row.orderedOn, dates),
    },
  ];
}
