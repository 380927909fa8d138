'use client';

import { useQuery } from '@tanstack/react-query';
import { useId, useState } from 'react';
import { inputClass } from '@/components/ui/form-field';
import { apiFetch } from '@/components/session/api';

export type MachineChoice = { id: string; model: string; serial: string; customerName: string; siteName: string };

/** GET /api/machines answers `{ rows }` with flat rows; older builds answered `{ machines }` with nested sites. Read both. */
function toChoices(data: unknown): MachineChoice[] {
  const d = (data ?? {}) as { rows?: unknown[]; machines?: unknown[] };
  const list = (Array.isArray(d.rows) ? d.rows : Array.isArray(d.machines) ? d.machines : []) as Record<string, unknown>[];
  return list.map((m) => {
    const site = (m.site ?? {}) as { name?: string; customer?: { name?: string } };
    return {
      id: String(m.id),
      model: String(m.model ?? ''),
      serial: String(m.serial ?? ''),
      customerName: String(m.customerName ?? site.customer?.name ?? ''),
      siteName: String(m.siteName ?? site.name ?? ''),
    };
  });
}

/** A searchable machine select fed by GET /api/machines?q=…; the choice is reported through `onChange`. */
export function MachinePicker({ value, onChange, invalid, labelId }: { value: MachineChoice | null; onChange: (m: MachineChoice | null) => void; invalid?: boolean; labelId?: string }) {
  const [q, setQ] = useState('');
  const [open, setOpen] = useState(false);
  const listId = useId();
  const { data, isFetching } = useQuery({
    queryKey: ['machines', 'picker', q],
    queryFn: () => apiFetch<unknown>(`/api/machines?${new URLSearchParams({ q, pageSize: '8', page: '1' })}`),
    enabled: open,
    select: toChoices,
  });
  const choices = (data ?? []).slice(0, 8);

  if (value && !open) {
    return (
      <div className="flex flex-wrap items-center justify-between gap-2 rounded-lg border-2 border-ink bg-card px-3 py-2" data-testid="chosen-machine">
        <span className="grid">
          <span className="font-semibold">
            {value.model} <span className="tabular font-normal">· {value.serial}</span>
          </span>
          <span className="text-sm font-normal text-ink-soft">
            {value.customerName} · {value.siteName}
          </span>
        </span>
        <button type="button" onClick={() => setOpen(true)} className="min-h-12 rounded-lg px-3 font-semibold underline underline-offset-4 hover:text-spirit">
          Change machine
        </button>
      </div>
    );
  }

  return (
    <div className="relative grid gap-1">
      <input
        type="search"
        role="combobox"
        aria-expanded={open}
        aria-controls={listId}
        aria-labelledby={labelId}
        aria-invalid={invalid || undefined}
        placeholder="Type a model, serial or customer"
        value={q}
        onFocus={() => setOpen(true)}
        onChange={(e) => {
          setQ(e.target.value);
          setOpen(true);
        }}
        className={inputClass}
      />
      {open && (
        <ul id={listId} role="listbox" aria-label="Machines" className="grid max-h-80 overflow-y-auto rounded-lg border-2 border-ink bg-card">
          {choices.map((m) => (
            <li key={m.id} role="option" aria-selected={value?.id === m.id}>
              <button
                type="button"
                onClick={() => {
                  onChange(m);
                  setOpen(false);
                }}
                className="grid min-h-12 w-full border-b border-rule px-3 py-2 text-left font-normal hover:bg-paper"
              >
                <span className="font-semibold">
                  {m.model} <span className="tabular font-normal">· {m.serial}</span>
                </span>
                <span className="text-sm text-ink-soft">
                  {m.customerName} · {m.siteName}
                </span>
              </button>
            </li>
          ))}
          {!isFetching && data && choices.length === 0 && <li className="px-3 py-3 font-normal text-ink-soft">No machine matches “{q}”.</li>}
          {isFetching && <li className="px-3 py-3 font-normal text-ink-soft">Searching…</li>}
        </ul>
      )}
    </div>
  );
}
