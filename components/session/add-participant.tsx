'use client';

import { useMutation, useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import type { ParticipantState } from '@/lib/session/fold';
import { apiFetch, ApiError } from './api';

type Person = { id: string; name: string; role: string };

/**
 * Calls someone into a live session: an expert to coach or anyone of the organisation to watch (the session's
 * technician, or an admin). The server checks who may add whom; the new participant appears through the log.
 */
export function AddParticipant({ sessionId, participants, large = false }: { sessionId: string; participants: ParticipantState[]; large?: boolean }) {
  const [open, setOpen] = useState(false);
  const [userId, setUserId] = useState('');
  const [part, setPart] = useState<'expert' | 'observer'>('expert');
  const people = useQuery({
    queryKey: ['people'],
    queryFn: () => apiFetch<{ people: Person[] }>('/api/people').then((r) => r.people),
    enabled: open,
    staleTime: 60_000,
  });
  const add = useMutation({
    mutationFn: () => apiFetch(`/api/sessions/${sessionId}/participants`, { method: 'POST', body: { userId, part } }),
    onSuccess: () => setUserId(''),
  });
  const candidates = (people.data ?? []).filter((p) => !participants.some((x) => x.userId === p.id) && (part === 'observer' || p.role === 'expert'));
  const control = large ? 'min-h-14 text-lg' : 'min-h-11';
  return (
    <details className="rounded-2xl border-2 border-rule bg-card p-3" onToggle={(e) => setOpen((e.target as HTMLDetailsElement).open)}>
      <summary className={`cursor-pointer font-bold ${large ? 'text-lg' : ''}`}>Call someone in</summary>
      <form
        className="mt-3 grid gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          if (userId) add.mutate();
        }}
      >
        <fieldset className="flex flex-wrap gap-3">
          <legend className="sr-only">As</legend>
          {(['expert', 'observer'] as const).map((p) => (
            <label key={p} className={`flex items-center gap-2 ${control}`}>
              <input type="radio" name="part" value={p} checked={part === p} onChange={() => setPart(p)} className="h-5 w-5" />
              {p === 'expert' ? 'to coach (expert)' : 'to watch (observer)'}
            </label>
          ))}
        </fieldset>
        <label className="grid gap-1 font-semibold">
          Person
          <select value={userId} onChange={(e) => setUserId(e.target.value)} className={`rounded-lg border-2 border-ink bg-card px-3 ${control}`}>
            <option value="">{people.isLoading ? 'Loading…' : candidates.length === 0 ? 'Nobody else to call in' : 'Choose…'}</option>
            {candidates.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name} ({p.role})
              </option>
            ))}
          </select>
        </label>
        <button type="submit" disabled={!userId || add.isPending} className={`rounded-xl bg-steel px-4 font-bold text-paper disabled:opacity-50 ${control}`}>
          {add.isPending ? 'Adding…' : 'Add to the session'}
        </button>
        {add.isSuccess && (
          <p role="status" className="font-semibold text-pass">
            Added. They see the session on their start page.
          </p>
        )}
        {add.error && (
          <p role="alert" className="font-semibold text-fail">
            {add.error instanceof ApiError ? add.error.message : 'Could not add them'}
          </p>
        )}
      </form>
    </details>
  );
}
