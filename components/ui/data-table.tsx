'use client';

import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { flexRender, getCoreRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import { useEffect, useState, type ReactNode } from 'react';
import { apiFetch } from '@/components/session/api';
import type { Page } from '@/lib/list-query';

type Props<T> = {
  /** The list route, e.g. `/api/machines`; it takes q, sort, dir, page and pageSize. */
  endpoint: string;
  /** react-query key prefix; mutations invalidate it to refresh the list without a reload. */
  queryKey: readonly unknown[];
  columns: ColumnDef<T, unknown>[];
  initialSort: SortingState;
  filterLabel: string;
  pageSize?: number;
  toolbar?: ReactNode;
  empty?: ReactNode;
  /** Extra query parameters (for example a state filter). */
  params?: Record<string, string>;
};

/** A list whose sorting, filtering and paging run on the server (the tables must stay fast at 10,000 rows). */
export function DataTable<T>({ endpoint, queryKey, columns, initialSort, filterLabel, pageSize = 25, toolbar, empty, params = {} }: Props<T>) {
  const [sorting, setSorting] = useState<SortingState>(initialSort);
  const [q, setQ] = useState('');
  const [page, setPage] = useState(1);
  // A new outside filter starts again at page 1 (page 7 of the old filter may not exist).
  const paramsKey = JSON.stringify(params);
  useEffect(() => setPage(1), [paramsKey]);
  const sort = sorting[0];
  const search = new URLSearchParams({ q, page: String(page), pageSize: String(pageSize), ...(sort ? { sort: sort.id, dir: sort.desc ? 'desc' : 'asc' } : {}), ...params });
  const { data, isFetching, error } = useQuery({
    queryKey: [...queryKey, search.toString()],
    queryFn: () => apiFetch<Page<T>>(`${endpoint}?${search}`),
    placeholderData: keepPreviousData,
  });
  const table = useReactTable({
    data: data?.rows ?? [],
    columns,
    state: { sorting },
    manualSorting: true,
    manualPagination: true,
    enableSortingRemoval: false,
    onSortingChange: (next) => {
      setSorting(next);
      setPage(1);
    },
    getCoreRowModel: getCoreRowModel(),
  });
  const pages = data ? Math.max(1, Math.ceil(data.total / data.pageSize)) : 1;

  return (
    <div className="grid gap-3">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <label className="grid gap-1 font-semibold">
          {filterLabel}
          <input
            type="search"
            value={q}
            onChange={(e) => {
              setQ(e.target.value);
              setPage(1);
            }}
            className="min-h-12 w-72 max-w-full rounded-lg border-2 border-ink bg-card px-3 text-lg font-normal"
          />
        </label>
        {toolbar}
      </div>
      {error && <p role="alert" className="rounded-lg bg-fail/10 p-3 font-semibold text-fail">{error.message}</p>}
      <div className="relative overflow-x-auto rounded-xl border-2 border-rule bg-card">
        <table className="w-full border-collapse text-left">
          <thead className="bg-steel text-paper">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th key={h.id} scope="col" aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined} className="px-3 py-2 font-semibold">
                      {h.column.getCanSort() ? (
                        <button type="button" onClick={h.column.getToggleSortingHandler()} className="inline-flex min-h-10 items-center gap-1 underline-offset-4 hover:underline">
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden="true">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}</span>
                        </button>
                      ) : (
                        flexRender(h.column.columnDef.header, h.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="border-t border-rule">
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="px-3 py-2 align-top">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {data && data.rows.length === 0 && (
              <tr>
                <td colSpan={columns.length} className="px-3 py-6 text-center text-ink-soft">
                  {empty ?? 'Nothing matches.'}
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>
      <nav aria-label="Pages" className="flex flex-wrap items-center justify-between gap-3">
        <span className="tabular text-ink-soft" role="status">
          {data ? `${data.total.toLocaleString('en')} in all · page ${data.page} of ${pages}` : 'Loading…'}
          {isFetching && data ? ' · updating…' : ''}
        </span>
        <span className="flex gap-2">
          <button type="button" onClick={() => setPage((p) => Math.max(1, p - 1))} disabled={page <= 1} className="min-h-12 rounded-lg border-2 border-ink px-4 font-semibold disabled:opacity-40">
            Previous
          </button>
          <button type="button" onClick={() => setPage((p) => Math.min(pages, p + 1))} disabled={page >= pages} className="min-h-12 rounded-lg border-2 border-ink px-4 font-semibold disabled:opacity-40">
            Next
          </button>
        </span>
      </nav>
    </div>
  );
}
