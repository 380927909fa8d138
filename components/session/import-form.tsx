'use client';

import { useMutation, useQuery } from '@tanstack/react-query';
import Link from 'next/link';
import { useEffect, useRef, useState } from 'react';
import type { MachineRow } from '@/db/queries/machines';
import type { Page } from '@/lib/list-query';
import { apiFetch } from './api';

type Imported = {
  session: { id: string; state: string; machineId: string; technicianFromLog: boolean; participants: number; events: number };
  verdict: { ok: true; count: number; head: string };
  replayUrl: string;
};
type Refusal = { status: number; detail: string; field?: string; brokenEvent?: { seq: number; type: string; reason: string } };

/** What the chosen file says of itself, read in the browser before anything is sent. */
type Preview = { name: string; sessionId: string | null; machineLabel: string | null; events: number | null; exportedAt: string | null } | { name: string; error: string };

function previewOf(name: string, text: string): Preview {
  try {
    const f = JSON.parse(text) as { session?: { id?: string; machine?: { label?: string | null } }; events?: { payload?: { machineLabel?: string } }[]; exportedAt?: string };
    return {
      name,
      sessionId: f.session?.id ?? null,
      machineLabel: f.session?.machine?.label ?? (Array.isArray(f.events) ? (f.events[0]?.payload?.machineLabel ?? null) : null),
      events: Array.isArray(f.events) ? f.events.length : null,
      exportedAt: f.exportedAt ?? null,
    };
  } catch {
    return { name, error: 'This file is not JSON: choose the JSON export of a session (not the CSV).' };
  }
}

/** Finds a machine of the organisation to file the session under, when the file's own machine is not one of ours. */
function MachineChoice({ value, onChange }: { value: MachineRow | null; onChange: (m: MachineRow | null) => void }) {
  const [q, setQ] = useState('');
  const { data } = useQuery({
    queryKey: ['machines', 'import', q],
    queryFn: () => apiFetch<Page<MachineRow>>(`/api/machines?${new URLSearchParams({ q, pageSize: '6', sort: 'model' })}`),
    enabled: q.trim().length > 0,
  });
  if (value) {
    return (
      <p className="flex flex-wrap items-center gap-2">
        File under <b>{value.model}</b> <span className="tabular">{value.serial}</span> ({value.customerName} · {value.siteName})
        <button type="button" onClick={() => onChange(null)} className="min-h-10 rounded-lg border-2 border-ink px-3 text-sm font-semibold">
          Use the file’s machine
        </button>
      </p>
    );
  }
  return (
    <div className="grid gap-2">
      <label className="grid gap-1 font-semibold">
        Another machine of yours (model, serial, customer or site)
        <input type="search" value={q} onChange={(e) => setQ(e.target.value)} className="min-h-12 rounded-lg border-2 border-ink bg-card px-3 text-lg font-normal" />
      </label>
      {data && data.rows.length > 0 && (
        <ul className="grid gap-1">
          {data.rows.map((m) => (
            <li key={m.id}>
              <button type="button" onClick={() => onChange(m)} className="min-h-11 w-full rounded-lg border-2 border-rule bg-card px-3 text-left hover:border-ink">
                <b>{m.model}</b> <span className="tabular">{m.serial}</span> <span className="text-ink-soft">· {m.customerName} · {m.siteName}</span>
              </button>
            </li>
          ))}
        </ul>
      )}
      {data && data.rows.length === 0 && <p className="text-ink-soft">No machine matches.</p>}
    </div>
  );
}

/**
 * An admin imports a session's record from its JSON export. The server checks the file's shape, then recomputes its
 * hash chain: a changed file is refused, naming the first bad event; a good one is stored as it is, in one go.
 */
export function ImportForm() {
  const [file, setFile] = useState<{ name: string; text: string } | null>(null);
  const [machine, setMachine] = useState<MachineRow | null>(null);
  const input = useRef<HTMLInputElement>(null);
  const run = useMutation({
    mutationFn: async ({ text, machineId }: { text: string; machineId: string | null }): Promise<Imported> => {
      const res = await fetch(`/api/sessions/import${machineId ? `?${new URLSearchParams({ machineId })}` : ''}`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: text,
        credentials: 'same-origin',
      });
      const data = (await res.json().catch(() => ({}))) as Imported & Partial<Refusal>;
      if (!res.ok) throw Object.assign(new Error(data.detail ?? `Refused (${res.status})`), { refusal: { status: res.status, detail: data.detail ?? `Refused (${res.status})`, field: data.field, brokenEvent: data.brokenEvent } });
      return data;
    },
  });
  const choose = async (chosen: File | undefined) => {
    run.reset();
    setFile(chosen ? { name: chosen.name, text: await chosen.text() } : null);
  };
  // A file chosen before the page finished loading fired its change before React listened: read it now, once.
  useEffect(() => {
    const early = input.current?.files?.[0];
    if (early) void choose(early);
  }, []);
  const refusal = (run.error as (Error & { refusal?: Refusal }) | null)?.refusal;
  const preview = file ? previewOf(file.name, file.text) : null;
  const machineRefused = refusal?.field === 'machineId';
  return (
    <div className="grid max-w-3xl gap-4">
      <label className="grid gap-1 font-semibold">
        Session file (the JSON export)
        <input
          type="file"
          accept=".json,application/json"
          className="min-h-12 w-full min-w-0 rounded-lg border-2 border-ink bg-card p-2 font-normal"
          ref={input}
          onChange={(e) => void choose(e.target.files?.[0])}
        />
      </label>
      {preview && 'error' in preview && (
        <p role="alert" className="font-semibold text-fail">
          {preview.error}
        </p>
      )}
      {preview && !('error' in preview) && (
        <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 rounded-xl border-2 border-rule bg-card p-3" data-testid="import-preview">
          <dt className="text-ink-soft">Session</dt>
          <dd className="tabular">{preview.sessionId ?? 'not named'}</dd>
          <dt className="text-ink-soft">Machine</dt>
          <dd>{preview.machineLabel ?? 'not named'}</dd>
          <dt className="text-ink-soft">Events</dt>
          <dd className="tabular">{preview.events ?? 'none'}</dd>
          {preview.exportedAt && (
            <>
              <dt className="text-ink-soft">Exported</dt>
              <dd className="tabular">{new Date(preview.exportedAt).toLocaleString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit' })}</dd>
            </>
          )}
        </dl>
      )}
      <details open={machineRefused || machine !== null} className="rounded-xl border-2 border-rule bg-card p-3">
        <summary className="min-h-10 cursor-pointer content-center font-semibold">Machine: the one the file names, unless you choose another</summary>
        <div className="mt-2">
          <MachineChoice value={machine} onChange={setMachine} />
        </div>
      </details>
      <div>
        <button
          type="button"
          disabled={!file || (preview !== null && 'error' in preview) || run.isPending || run.isSuccess}
          onClick={() => file && run.mutate({ text: file.text, machineId: machine?.id ?? null })}
          className="inline-flex min-h-12 items-center rounded-lg bg-spirit px-5 text-lg font-semibold text-white hover:bg-spirit-deep disabled:cursor-not-allowed disabled:bg-ink-soft/40"
        >
          {run.isPending ? 'Checking the chain…' : 'Verify and import'}
        </button>
      </div>
      {run.isSuccess && (
        <div role="status" className="grid gap-2 rounded-xl border-2 border-pass bg-card p-3" data-testid="import-result" data-status="ok">
          <p className="font-bold text-pass">
            Chain intact: {run.data.verdict.count} events, head <span className="tabular">{run.data.verdict.head.slice(0, 12)}…</span> · imported as {run.data.session.state.replace('_', ' ')}
          </p>
          <p className="text-sm text-ink-soft">
            {run.data.session.technicianFromLog ? 'Its technician has an account here.' : 'Its technician has no account here: you stand in as the session’s technician; the log still names its own people.'}{' '}
            {run.data.session.participants} participant{run.data.session.participants === 1 ? '' : 's'} linked to accounts here. Photos come as their records only, not their files.
          </p>
          <p>
            <Link href={run.data.replayUrl} className="inline-flex min-h-12 items-center rounded-lg bg-spirit px-4 font-semibold text-white hover:bg-spirit-deep">
              Open the replay
            </Link>
          </p>
        </div>
      )}
      {refusal && (
        <div role="alert" className="grid gap-1 rounded-xl bg-fail/10 p-3 text-fail" data-testid="import-result" data-status="refused">
          <p className="font-bold">Nothing was imported.</p>
          {refusal.brokenEvent ? (
            <p>
              The file was changed after it was written: the first bad event is <b className="tabular">#{refusal.brokenEvent.seq}</b> ({refusal.brokenEvent.type}):{' '}
              {refusal.brokenEvent.reason}.
            </p>
          ) : (
            <p>{refusal.detail}</p>
          )}
          {machineRefused && <p className="text-ink">Choose one of your machines above and try again.</p>}
        </div>
      )}
    </div>
  );
}
