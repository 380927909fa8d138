'use client';

import type { ColumnDef } from '@tanstack/react-table';
import Link from 'next/link';
import { useState } from 'react';
import { DataTable } from '@/components/ui/data-table';
import type { VisitRow } from '@/lib/fleet/visits';
import { LocalTime } from '@/components/ui/local-time';
import { VisitStateChip } from './visit-state-chip';

/** The react-query key of every visit list; scheduling or changing a visit invalidates it. */
export const VISITS_KEY = ['visits'] as const;

const selectClass = 'min-h-12 rounded-lg border-2 border-ink bg-card px-3 text-lg font-normal';

/** The organisation's visits, sorted, filtered and paged by the server. */
export function VisitsTable() {
  const [state, setState] = useState('open');
  const columns: ColumnDef<VisitRow, unknown>[] = [
    { id: 'scheduledFor', accessorKey: 'scheduledFor', header: 'When', cell: ({ row }) => <LocalTime iso={row.original.scheduledFor} /> },
    {
      id: 'machine',
      accessorKey: 'machineModel',
      header: 'Machine',
      cell: ({ row }) => (
        <Link href={`/visits/${row.original.id}`} className="grid min-h-12 content-center">
          <span className="font-semibold text-spirit underline underline-offset-4">{row.original.machineModel}</span>
          <span className="tabular text-sm text-ink-soft">{row.original.machineSerial}</span>
        </Link>
      ),
    },
    {
      id: 'where',
      header: 'Customer · site',
      enableSorting: false,
      cell: ({ row }) => (
        <span className="grid">
          <span>{row.original.customerName}</span>
          <span className="text-sm text-ink-soft">{row.original.siteName}</span>
        </span>
      ),
    },
    {
      id: 'people',
      header: 'Technician · expert',
      enableSorting: false,
      cell: ({ row }) => (
        <span className="grid">
          <span>{row.original.technicianName}</span>
          <span className="text-sm text-ink-soft">{row.original.expertName ?? 'no expert'}</span>
        </span>
      ),
    },
    { id: 'state', accessorKey: 'state', header: 'State', cell: ({ row }) => <VisitStateChip state={row.original.state} /> },
  ];
  return (
    <DataTable<VisitRow>
      endpoint="/api/visits"
      queryKey={VISITS_KEY}
      columns={columns}
      initialSort={[{ id: 'scheduledFor', desc: false }]}
      filterLabel="Find by machine, customer, site or technician"
      params={{ state }}
      empty="No visits match."
      toolbar={
        <label className="grid gap-1 font-semibold">
          Show
          <select value={state} onChange={(e) => setState(e.target.value)} className={selectClass}>
            <option value="open">Scheduled and in progress</option>
            <option value="scheduled">Scheduled</option>
            <option value="in_progress">In progress</option>
            <option value="completed">Completed</option>
            <option value="cancelled">Cancelled</option>
            <option value="all">All visits</option>
          </select>
        </label>
      }
    />
  );
}
