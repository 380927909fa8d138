'use client';

import type { ColumnDef } from '@tanstack/react-table';
import Link from 'next/link';
import { useState } from 'react';
import { DataTable } from '@/components/ui/data-table';
import type { DueRow } from '@/lib/fleet/due';
import { DueChip } from './due-chip';

/** The react-query key of the due list; scheduling a visit invalidates it. */
export const DUE_KEY = ['due'] as const;

const selectClass = 'min-h-12 rounded-lg border-2 border-ink bg-card px-3 text-lg font-normal';
const dayFmt = (iso: string) => new Date(`${iso}T00:00:00Z`).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });

function daysWords(dueOn: string, today: string): string {
  const days = Math.round((Date.parse(`${dueOn}T00:00:00Z`) - Date.parse(`${today}T00:00:00Z`)) / 86_400_000);
  if (days === 0) return 'due today';
  const n = Math.abs(days);
  return days < 0 ? `${n} day${n === 1 ? '' : 's'} past` : `in ${n} day${n === 1 ? '' : 's'}`;
}

/** Machines by next check, overdue first; sorted, filtered and paged by the server. */
export function DueTable({ soonDays, canSchedule, today }: { soonDays: number; canSchedule: boolean; today: string }) {
  const [status, setStatus] = useState('all');
  const columns: ColumnDef<DueRow, unknown>[] = [
    {
      id: 'model',
      accessorKey: 'model',
      header: 'Machine',
      cell: ({ row }) => (
        <span className="grid">
          <span className="font-semibold">{row.original.model}</span>
          <span className="tabular text-sm text-ink-soft">{row.original.serial}</span>
        </span>
      ),
    },
    {
      id: 'customer',
      accessorKey: 'customerName',
      header: 'Customer · site',
      cell: ({ row }) => (
        <span className="grid">
          <span>{row.original.customerName}</span>
          <span className="text-sm text-ink-soft">{row.original.siteName}</span>
        </span>
      ),
    },
    {
      id: 'lastLeveledOn',
      header: 'Last leveled',
      enableSorting: false,
      cell: ({ row }) => (row.original.lastLeveledOn ? <span className="tabular whitespace-nowrap">{dayFmt(row.original.lastLeveledOn)}</span> : <span className="text-ink-soft">Never</span>),
    },
    {
      id: 'nextDue',
      accessorKey: 'nextDueOn',
      header: 'Next due',
      cell: ({ row }) => (
        <span className="grid">
          <span className="tabular font-semibold whitespace-nowrap">{row.original.nextDueOn ? dayFmt(row.original.nextDueOn) : 'Now'}</span>
          <span className="text-sm text-ink-soft">every {row.original.checkIntervalMonths} months</span>
        </span>
      ),
    },
    {
      id: 'status',
      header: 'Status',
      enableSorting: false,
      cell: ({ row }) => (
        <span className="grid justify-items-start gap-1">
          <DueChip status={row.original.status} neverLeveled={row.original.lastLeveledOn === null} />
          {row.original.nextDueOn && <span className="text-sm whitespace-nowrap text-ink-soft">{daysWords(row.original.nextDueOn, today)}</span>}
        </span>
      ),
    },
    {
      id: 'visit',
      header: 'Visit',
      enableSorting: false,
      cell: ({ row }) =>
        row.original.nextVisitAt ? (
          <span className="text-sm">
            Booked for{' '}
            <span className="tabular font-semibold">
              {new Date(row.original.nextVisitAt).toLocaleString('en-GB', { day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit' })}
            </span>
          </span>
        ) : canSchedule ? (
          <Link
            href={`/visits?machine=${row.original.machineId}#schedule`}
            className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink px-3 font-semibold whitespace-nowrap hover:bg-paper"
          >
            Schedule visit
          </Link>
        ) : (
          <span className="text-sm text-ink-soft">None booked</span>
        ),
    },
  ];
  return (
    <DataTable<DueRow>
      endpoint="/api/due"
      queryKey={DUE_KEY}
      columns={columns}
      initialSort={[{ id: 'nextDue', desc: false }]}
      filterLabel="Find by machine, serial, customer or site"
      params={{ status, soonDays: String(soonDays) }}
      empty="No machines match."
      toolbar={
        <label className="grid gap-1 font-semibold">
          Show
          <select value={status} onChange={(e) => setStatus(e.target.value)} className={selectClass}>
            <option value="all">All machines</option>
            <option value="overdue">Overdue or never leveled</option>
            <option value="due-soon">Due within {soonDays} days</option>
            <option value="ok">Not due yet</option>
          </select>
        </label>
      }
    />
  );
}
