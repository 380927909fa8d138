'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { apiFetch } from '@/components/session/api';
import type { UnitSystem } from '@/lib/leveling/units';

/** The user's unit system, inch or metric: applied to every value shown or typed. */
export function UnitSwitch({ current }: { current: UnitSystem }) {
  const router = useRouter();
  const save = useMutation({
    mutationFn: (unitSystem: UnitSystem) => apiFetch('/api/me', { method: 'PATCH', body: { unitSystem } }),
    onSuccess: () => router.refresh(),
  });
  return (
    <fieldset className="grid gap-2">
      <legend className="font-semibold">Units</legend>
      <div className="grid max-w-md grid-cols-2 gap-2">
        {(['inch', 'metric'] as const).map((u) => (
          <button key={u} type="button" aria-pressed={current === u} onClick={() => save.mutate(u)} className={`min-h-14 rounded-lg border-2 border-ink text-lg font-bold ${current === u ? 'bg-steel text-paper' : 'bg-card'}`}>
            {u === 'inch' ? 'Inch (in, in/10 in)' : 'Metric (mm, mm/m)'}
          </button>
        ))}
      </div>
      {save.error && <p role="alert" className="text-fail">{save.error.message}</p>}
    </fieldset>
  );
}
