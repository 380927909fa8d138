'use client';

import { useMutation, useQuery } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useId, useState } from 'react';
import { Button } from '@/components/ui/button';
import { apiFetch } from './api';

type Person = { id: string; name: string; role: string };

/** Opens a live session on a machine: first the technician chooses who coaches (experts of the organisation). */
export function OpenSessionButton({ machineId, machineLabel }: { machineId: string; machineLabel?: string }) {
  const router = useRouter();
  const [choosing, setChoosing] = useState(false);
  const [experts, setExperts] = useState<string[]>([]);
  const headingId = useId();
  const people = useQuery({
    queryKey: ['people', 'expert'],
    queryFn: () => apiFetch<{ people: Person[] }>('/api/people?role=expert'),
    enabled: choosing,
    staleTime: 60_000,
  });
  const open = useMutation({
    mutationFn: () => apiFetch<{ session: { id: string } }>('/api/sessions', { method: 'POST', body: { machineId, experts } }),
    onSuccess: ({ session }) => router.push(`/sessions/${session.id}/field`),
  });

  if (!choosing) {
    return (
      <Button onClick={() => setChoosing(true)} aria-label={machineLabel ? `Start leveling ${machineLabel}` : undefined}>
        Start leveling
      </Button>
    );
  }
  const toggle = (id: string) => setExperts((list) => (list.includes(id) ? list.filter((x) => x !== id) : [...list, id]));
  return (
    <div role="group" aria-labelledby={headingId} className="grid w-full gap-3 rounded-lg border-2 border-spirit bg-paper p-3 sm:w-auto sm:min-w-80">
      <p id={headingId} className="font-bold">
        Who coaches this session?
      </p>
      {people.isPending && <p className="text-ink-soft">Loading experts…</p>}
      {people.error && <p role="alert" className="text-fail">{people.error.message}</p>}
      {people.data && people.data.people.length === 0 && <p className="text-ink-soft">No experts in your organisation yet; you can level alone and add one later.</p>}
      {people.data && people.data.people.length > 0 && (
        <ul className="grid gap-1">
          {people.data.people.map((p) => (
            <li key={p.id}>
              <label className="flex min-h-12 cursor-pointer items-center gap-3 rounded-lg px-2 hover:bg-card">
                <input type="checkbox" className="size-6 accent-spirit" checked={experts.includes(p.id)} onChange={() => toggle(p.id)} />
                <span className="text-lg">{p.name}</span>
              </label>
            </li>
          ))}
        </ul>
      )}
      <div className="flex flex-wrap gap-2">
        <Button onClick={() => open.mutate()} disabled={open.isPending || people.isPending}>
          {open.isPending ? 'Opening…' : experts.length === 0 ? 'Open without a coach' : `Open with ${experts.length} coach${experts.length === 1 ? '' : 'es'}`}
        </Button>
        <Button tone="plain" onClick={() => setChoosing(false)} disabled={open.isPending}>
          Cancel
        </Button>
      </div>
      {open.error && <p role="alert" className="text-fail">{open.error.message}</p>}
    </div>
  );
}
