'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useState, useTransition } from 'react';
import { CalibrationChip } from '@/components/instruments/calibration-chip';
import { apiFetch } from '@/components/session/api';
import { Button } from '@/components/ui/button';
import { FormField, inputClass } from '@/components/ui/form-field';
import type { CalibrationStatus } from '@/lib/fleet/calibration';

type Chosen = {
  instrumentId: string;
  kind: 'level' | 'indicator';
  model: string;
  serial: string;
  calibrationDue: string;
  status: CalibrationStatus;
  overrideReason: string | null;
  overrideByName: string | null;
  overrideAt: string | null;
};
type Available = { id: string; kind: 'level' | 'indicator'; model: string; serial: string; calibrationDue: string; status: CalibrationStatus };

/**
 * The instruments chosen for a visit with their calibration, and (for an admin or the visit's technician) the
 * control to add or remove one. An expired instrument needs an admin's written reason; the server decides.
 */
export function VisitInstruments({
  visitId,
  chosen,
  available,
  today,
  mayChange,
  isAdmin,
}: {
  visitId: string;
  chosen: Chosen[];
  available: Available[];
  today: string;
  mayChange: boolean;
  isAdmin: boolean;
}) {
  const router = useRouter();
  const [refreshing, startRefresh] = useTransition();
  const [instrumentId, setInstrumentId] = useState('');
  const [reason, setReason] = useState('');
  const picked = available.find((a) => a.id === instrumentId);
  const add = useMutation({
    mutationFn: () => apiFetch(`/api/visits/${visitId}/instruments`, { method: 'POST', body: { instrumentId, ...(reason.trim() ? { overrideReason: reason } : {}) } }),
    onSuccess: () => {
      setInstrumentId('');
      setReason('');
      startRefresh(() => router.refresh());
    },
  });
  const remove = useMutation({
    mutationFn: (id: string) => apiFetch(`/api/visits/${visitId}/instruments/${id}`, { method: 'DELETE' }),
    onSuccess: () => startRefresh(() => router.refresh()),
  });
  const chosenIds = new Set(chosen.map((c) => c.instrumentId));
  const addErr = add.error as (Error & { field?: string }) | null;

  return (
    <section aria-labelledby="instruments-h" className="grid gap-4 rounded-xl border-2 border-rule bg-card p-4">
      <h2 id="instruments-h" className="text-xl font-bold">
        Instruments
      </h2>
      {chosen.length === 0 ? (
        <p className="text-ink-soft">No instruments chosen yet.</p>
      ) : (
        <ul className="grid gap-2">
          {chosen.map((c) => (
            <li key={c.instrumentId} className="flex flex-wrap items-center justify-between gap-3 rounded-lg border-2 border-rule p-3" data-testid="visit-instrument">
              <span className="grid gap-1">
                <span className="font-semibold">
                  {c.model} <span className="tabular font-normal">· {c.serial}</span>
                </span>
                <span className="flex flex-wrap items-center gap-2 text-sm">
                  Calibration due <span className="tabular">{c.calibrationDue}</span>
                  <CalibrationChip status={c.status} dueOn={c.calibrationDue} today={today} />
                </span>
                {c.overrideReason && (
                  <span className="text-sm">
                    <strong>Allowed past due</strong> by {c.overrideByName ?? 'an admin'}
                    {c.overrideAt ? ` on ${c.overrideAt.slice(0, 10)}` : ''}: “{c.overrideReason}”
                  </span>
                )}
              </span>
              {mayChange && (
                <Button type="button" tone="plain" disabled={remove.isPending || refreshing} onClick={() => remove.mutate(c.instrumentId)} aria-label={`Remove ${c.serial}`}>
                  Remove
                </Button>
              )}
            </li>
          ))}
        </ul>
      )}
      {remove.error && (
        <p role="alert" className="font-semibold text-fail">
          {remove.error.message}
        </p>
      )}
      {mayChange && (
        <form
          className="grid gap-3"
          onSubmit={(e) => {
            e.preventDefault();
            if (instrumentId) add.mutate();
          }}
        >
          <div className="grid gap-3 sm:grid-cols-[2fr_1fr] sm:items-end">
            <FormField label="Add an instrument" error={addErr?.field === 'instrumentId' ? addErr.message : undefined}>
              <select value={instrumentId} onChange={(e) => setInstrumentId(e.target.value)} className={inputClass}>
                <option value="">Choose…</option>
                {available
                  .filter((a) => !chosenIds.has(a.id))
                  .map((a) => (
                    <option key={a.id} value={a.id}>
                      {a.kind === 'level' ? 'Level' : 'Indicator'} {a.serial} — {a.model} (due {a.calibrationDue}
                      {a.status === 'expired' ? ', EXPIRED' : a.status === 'due-soon' ? ', due soon' : ''})
                    </option>
                  ))}
              </select>
            </FormField>
            <Button type="submit" disabled={!instrumentId || add.isPending || refreshing}>
              {add.isPending ? 'Adding…' : refreshing ? 'Updating…' : 'Add instrument'}
            </Button>
          </div>
          {picked?.status === 'expired' &&
            (isAdmin ? (
              <FormField
                label="Reason for using it past its calibration due date"
                hint="At least 10 characters; stored with your name and the time."
                error={addErr?.field === 'overrideReason' ? addErr.message : undefined}
              >
                <textarea value={reason} onChange={(e) => setReason(e.target.value)} rows={2} className={`${inputClass} py-2`} />
              </FormField>
            ) : (
              <p className="rounded-lg bg-fail/10 p-3 font-semibold text-fail">
                {picked.serial} was due for calibration on {picked.calibrationDue}. Only an admin may allow it, with a written reason.
              </p>
            ))}
          {add.error && !(addErr?.field === 'instrumentId' || (addErr?.field === 'overrideReason' && picked?.status === 'expired' && isAdmin)) && (
            <p role="alert" className="font-semibold text-fail">
              {add.error.message}
            </p>
          )}
        </form>
      )}
    </section>
  );
}
