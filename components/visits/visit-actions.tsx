'use client';

import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useState, useTransition } from 'react';
import { DUE_KEY } from '@/components/due/due-table';
import { apiFetch } from '@/components/session/api';
import { Button } from '@/components/ui/button';
import { FormField, inputClass } from '@/components/ui/form-field';
import { VISIT_TRANSITIONS, type VisitState } from '@/lib/fleet/visits';
import { VISITS_KEY } from './visits-table';

const actionLabel: Partial<Record<VisitState, string>> = { in_progress: 'Start the visit', completed: 'Mark completed', cancelled: 'Cancel the visit' };

function localInputValue(d: Date): string {
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}`;
}

/** The admin's controls on a visit: move its state, reschedule, edit notes (PATCH /api/visits/[id]). */
export function VisitActions({ visitId, state, scheduledFor, notes }: { visitId: string; state: VisitState; scheduledFor: string; notes: string }) {
  const router = useRouter();
  const [, startRefresh] = useTransition();
  const queryClient = useQueryClient();
  const [when, setWhen] = useState(() => localInputValue(new Date(scheduledFor)));
  const [text, setText] = useState(notes);
  const [message, setMessage] = useState<string | null>(null);
  const mutation = useMutation({
    mutationFn: (body: Record<string, unknown>) => apiFetch<{ noticeSent: boolean }>(`/api/visits/${visitId}`, { method: 'PATCH', body }),
    onSuccess: async (res, body) => {
      setMessage(body.scheduledFor ? (res.noticeSent ? 'Rescheduled; the technician and expert were e-mailed.' : 'Rescheduled; the notice e-mail could not be sent.') : 'Saved.');
      await Promise.all([queryClient.invalidateQueries({ queryKey: VISITS_KEY }), queryClient.invalidateQueries({ queryKey: DUE_KEY })]);
      startRefresh(() => router.refresh());
    },
  });
  const err = mutation.error as (Error & { field?: string }) | null;
  const fieldError = (f: string) => (err?.field === f ? err.message.replace(new RegExp(`^${f}: `), '') : undefined);
  const moves = VISIT_TRANSITIONS[state];

  return (
    <section aria-labelledby="actions-h" className="grid gap-4 rounded-xl border-2 border-rule bg-card p-4">
      <h2 id="actions-h" className="text-xl font-bold">
        Change the visit
      </h2>
      {moves.length > 0 ? (
        <div className="flex flex-wrap gap-3">
          {moves.map((to) => (
            <Button key={to} type="button" tone={to === 'cancelled' ? 'plain' : 'primary'} disabled={mutation.isPending} onClick={() => mutation.mutate({ state: to })}>
              {actionLabel[to]}
            </Button>
          ))}
        </div>
      ) : (
        <p className="text-ink-soft">This visit is {state}; its state no longer changes.</p>
      )}
      {state === 'scheduled' && (
        <form
          className="flex flex-wrap items-end gap-3"
          onSubmit={(e) => {
            e.preventDefault();
            const d = new Date(when);
            mutation.mutate({ scheduledFor: Number.isNaN(d.getTime()) ? when : d.toISOString() });
          }}
        >
          <div className="min-w-64">
            <FormField label="New date and time (your local time)" error={fieldError('scheduledFor')}>
              <input type="datetime-local" value={when} onChange={(e) => setWhen(e.target.value)} aria-invalid={Boolean(fieldError('scheduledFor'))} className={inputClass} />
            </FormField>
          </div>
          <Button type="submit" tone="plain" disabled={mutation.isPending}>
            Reschedule
          </Button>
        </form>
      )}
      <form
        className="grid gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          mutation.mutate({ notes: text });
        }}
      >
        <FormField label="Notes" error={fieldError('notes')}>
          <textarea value={text} onChange={(e) => setText(e.target.value)} rows={3} aria-invalid={Boolean(fieldError('notes'))} className={`${inputClass} py-2`} />
        </FormField>
        <div>
          <Button type="submit" tone="plain" disabled={mutation.isPending}>
            Save notes
          </Button>
        </div>
      </form>
      {message && !mutation.isError && (
        <p role="status" className="font-semibold text-pass">
          {message}
        </p>
      )}
      {err && !['scheduledFor', 'notes'].includes(err.field ?? '') && (
        <p role="alert" className="font-semibold text-fail">
          {err.message}
        </p>
      )}
    </section>
  );
}
