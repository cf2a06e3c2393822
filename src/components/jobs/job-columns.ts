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

/**
 * The jobs table's columns; sorting is done by the server, so each sortable column only shows the
 * current order. On a phone (`phone: true`) two columns hold the same facts, stacked, so the list
 * reads without scrolling sideways: the job and its state, then the customer, site, unit and dates.
 */
export function jobColumns(options: {
  sort: JobSortKey;
  order: 'asc' | 'desc';
  currentYear: number;
  phone?: boolean;
}): DataTableColumns<JobRow> {
  const sortOrder = (key: JobSortKey): DataTableSortState['order'] =>
    options.sort === key ? (options.order === 'asc' ? 'ascend' : 'descend') : false;
  const dates = { currentYear: options.currentYear };
  const state = (row: JobRow) =>
    h(ColourTag, {
      label: JOB_STATUS_LABELS[row.status] ?? row.status,
      colours: statusColours[row.status] ?? statusColours.enquiry,
    });
  const promised = (row: JobRow) => formatCalendarRange(row.promisedFrom, row.promisedTo, dates);
  const type = (row: JobRow) => INSTALLATION_TYPE_LABELS[row.installationType] ?? row.installationType;
  if (options.phone) {
    return [
      {
        key: 'reference',
        title: 'Job',
        sorter: true,
        sortOrder: sortOrder('reference'),
        width: 112,
        render: (row) =>
          h('div', { style: 'display: grid; gap: 0.3rem; justify-items: start' }, [
            h(RouterLink, { to: `/jobs/${row.id}` }, () => row.reference),
            state(row),
          ]),
      },
      {
        key: 'customerName',
        title: 'Customer and site',
        sorter: true,
        sortOrder: sortOrder('customerName'),
        render: (row) =>
          h('div', [
            h('div', row.customerName),
            h(
              'div',
              { class: 'wl-small wl-muted' },
              [row.siteTown, row.unitName ? `${row.unitName}, ${type(row).toLowerCase()}` : type(row)]
                .filter(Boolean)
                .join(' · '),
            ),
            h('div', { class: 'wl-small' }, promised(row) ? `Promised ${promised(row)}` : 'Not promised yet'),
          ]),
      },
    ];
  }
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
      render: (row) => h('div', [h('div', row.unitName), h('div', { class: 'wl-small wl-muted' }, type(row))]),
    },
    {
      key: 'promisedFrom',
      title: 'Promised',
      sorter: true,
      sortOrder: sortOrder('promisedFrom'),
      render: (row) => promised(row) || h('span', { class: 'wl-muted' }, 'Not promised yet'),
    },
    {
      key: 'status',
      title: 'State',
      sorter: true,
      sortOrder: sortOrder('status'),
      render: state,
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
