'use client';

import type { ColumnDef } from '@tanstack/react-table';
import Link from 'next/link';
import { useState } from 'react';
import { DataTable } from '@/components/ui/data-table';
import type { InstrumentView } from '@/lib/fleet/instruments';
import type { UnitSystem } from '@/lib/leveling';
import { CalibrationChip } from './calibration-chip';
import { describeIndicator, describeSensitivity } from './format';

/** The react-query key of every instrument list; mutations invalidate it. */
export const INSTRUMENTS_KEY = ['instruments'] as const;

const selectClass = 'min-h-12 rounded-lg border-2 border-ink bg-card px-3 text-lg font-normal';

/** The organisation's instruments, sorted, filtered and paged by the server. */
export function InstrumentsTable({ unitSystem, today }: { unitSystem: UnitSystem; today: string }) {
  const [kind, setKind] = useState('');
  const [status, setStatus] = useState('');
  const columns: ColumnDef<InstrumentView, unknown>[] = [
    { id: 'kind', accessorKey: 'kind', header: 'Kind', cell: ({ row }) => (row.original.kind === 'level' ? 'Level' : 'Indicator') },
    {
      id: 'model',
      accessorKey: 'model',
      header: 'Model',
      cell: ({ row }) => (
        <Link href={`/instruments/${row.original.id}`} className="font-semibold text-spirit underline underline-offset-4">
          {row.original.model}
        </Link>
      ),
    },
    { id: 'serial', accessorKey: 'serial', header: 'Serial', cell: ({ row }) => <span className="tabular whitespace-nowrap">{row.original.serial}</span> },
    {
      id: 'reading',
      header: 'Sensitivity or resolution',
      enableSorting: false,
      cell: ({ row }) => (row.original.kind === 'level' ? describeSensitivity(row.original, unitSystem) : describeIndicator(row.original, unitSystem)),
    },
    {
      id: 'calibrationDue',
      accessorKey: 'calibrationDue',
      header: 'Calibration due',
      cell: ({ row }) => (
        <span className="grid gap-1">
          <span className="tabular">{row.original.calibrationDue}</span>
          {row.original.active ? <CalibrationChip status={row.original.status} dueOn={row.original.calibrationDue} today={today} /> : <span className="text-sm font-bold text-ink-soft">Retired</span>}
        </span>
      ),
    },
    {
      id: 'certificate',
      header: 'Certificate',
      enableSorting: false,
      cell: ({ row }) =>
        row.original.certificate ? (
          <a href={`/api/instruments/${row.original.id}/certificate`} download className="font-semibold text-spirit underline underline-offset-4">
            Download
          </a>
        ) : (
          <span className="text-ink-soft">None on file</span>
        ),
    },
  ];
  return (
    <DataTable<InstrumentView>
      endpoint="/api/instruments"
      queryKey={INSTRUMENTS_KEY}
      columns={columns}
      initialSort={[{ id: 'calibrationDue', desc: false }]}
      filterLabel="Find by model or serial"
      params={{ ...(kind ? { kind } : {}), ...(status ? { status } : {}) }}
      empty="No instruments match."
      toolbar={
        <div className="flex flex-wrap gap-3">
          <label className="grid gap-1 font-semibold">
            Kind
            <select value={kind} onChange={(e) => setKind(e.target.value)} className={selectClass}>
              <option value="">All kinds</option>
              <option value="level">Levels</option>
              <option value="indicator">Indicators</option>
            </select>
          </label>
          <label className="grid gap-1 font-semibold">
            Calibration
            <select value={status} onChange={(e) => setStatus(e.target.value)} className={selectClass}>
              <option value="">All in use</option>
              <option value="expired">Expired</option>
              <option value="due-soon">Due within 30 days</option>
              <option value="current">Current</option>
              <option value="retired">Retired</option>
            </select>
          </label>
        </div>
      }
    />
  );
}
