'use client';

import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import type { MachineRow } from '@/db/queries/machines';
import type { Page } from '@/lib/list-query';
import { apiFetch } from './api';
import { OpenSessionButton } from './open-session-button';

/** Find a machine by model, serial, customer or site and start leveling it. */
export function MachinePicker({ mayOpen }: { mayOpen: boolean }) {
  const [q, setQ] = useState('');
  const { data, error } = useQuery({
    queryKey: ['machines', 'picker', q],
    queryFn: () => apiFetch<Page<MachineRow>>(`/api/machines?${new URLSearchParams({ q, pageSize: '8', sort: 'model' })}`),
    placeholderData: (prev) => prev,
  });
  return (
    <div className="grid gap-3">
      <label className="grid gap-1 font-semibold">
        Find a machine (model, serial, customer or site)
        <input type="search" value={q} onChange={(e) => setQ(e.target.value)} className="min-h-12 rounded-lg border-2 border-ink bg-card px-3 text-lg font-normal" />
      </label>
      {error && <p role="alert" className="text-fail">{error.message}</p>}
      <ul className="grid gap-2">
        {data?.rows.map((m) => (
          <li key={m.id} className="flex flex-wrap items-center justify-between gap-3 rounded-xl border-2 border-rule bg-card p-3">
            <div>
              <p className="font-bold">{m.model}</p>
              <p className="text-ink-soft">
                {m.customerName} · {m.siteName} · serial <span className="tabular">{m.serial}</span> · {m.screwCount} screws
              </p>
            </div>
            {mayOpen && <OpenSessionButton machineId={m.id} machineLabel={`${m.model} (${m.serial})`} />}
          </li>
        ))}
      </ul>
      {data && <p className="text-sm text-ink-soft">{data.total > data.rows.length ? `Showing ${data.rows.length} of ${data.total.toLocaleString('en')}: type to narrow.` : `${data.total} machine${data.total === 1 ? '' : 's'}.`}</p>}
    </div>
  );
}
