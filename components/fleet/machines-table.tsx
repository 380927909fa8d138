'use client';

import type { ColumnDef } from '@tanstack/react-table';
import Link from 'next/link';
import { DataTable } from '@/components/ui/data-table';
import type { MachineRow } from '@/db/queries/machines';
import { CsvImport } from './csv-import';

const columns: ColumnDef<MachineRow, unknown>[] = [
  {
    id: 'model',
    header: 'Model',
    accessorKey: 'model',
    cell: ({ row }) => (
      <Link href={`/fleet/machines/${row.original.id}`} className="font-semibold text-spirit underline underline-offset-4">
        {row.original.model}
      </Link>
    ),
  },
  { id: 'serial', header: 'Serial', accessorKey: 'serial', cell: ({ getValue }) => <span className="tabular whitespace-nowrap">{String(getValue())}</span> },
  { id: 'customer', header: 'Customer', accessorKey: 'customerName' },
  { id: 'site', header: 'Site', accessorKey: 'siteName' },
  { id: 'screws', header: 'Screws', accessorKey: 'screwCount', cell: ({ getValue }) => <span className="tabular">{String(getValue())}</span> },
];

/** The fleet's machines: server-side sorted, filtered and paged; admins import and everyone exports CSV. */
export function MachinesTable({ mayWrite }: { mayWrite: boolean }) {
  return (
    <DataTable<MachineRow>
      endpoint="/api/machines"
      queryKey={['machines', 'list']}
      columns={columns}
      initialSort={[{ id: 'model', desc: false }]}
      filterLabel="Filter by model, serial, customer or site"
      toolbar={
        <div className="flex flex-wrap items-center gap-2">
          <a href="/api/machines/export" className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink bg-card px-4 font-semibold hover:bg-paper">
            Export CSV
          </a>
          {mayWrite && <CsvImport />}
          {mayWrite && (
            <Link href="/fleet/machines/new" className="inline-flex min-h-12 items-center rounded-lg bg-spirit px-4 font-semibold text-white hover:bg-spirit-deep">
              Add a machine
            </Link>
          )}
        </div>
      }
    />
  );
}
