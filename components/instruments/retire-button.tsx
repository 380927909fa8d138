'use client';

import { useMutation, useQueryClient } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { apiFetch } from '@/components/session/api';
import { Button } from '@/components/ui/button';
import { INSTRUMENTS_KEY } from './instruments-table';

/** Retires an instrument (it leaves the list and cannot be chosen for visits) or puts it back in use; asks once more before retiring. */
export function RetireButton({ instrumentId, active }: { instrumentId: string; active: boolean }) {
  const router = useRouter();
  const queryClient = useQueryClient();
  const [confirming, setConfirming] = useState(false);
  const change = useMutation({
    mutationFn: () => apiFetch(`/api/instruments/${instrumentId}`, { method: 'PATCH', body: { active: !active } }),
    onSuccess: async () => {
      setConfirming(false);
      await queryClient.invalidateQueries({ queryKey: INSTRUMENTS_KEY });
      router.refresh();
    },
  });
  return (
    <div className="flex flex-wrap items-center gap-3">
      {active && !confirming ? (
        <Button tone="plain" type="button" onClick={() => setConfirming(true)}>
          Retire instrument
        </Button>
      ) : (
        <Button tone={active ? 'primary' : 'plain'} type="button" onClick={() => change.mutate()} disabled={change.isPending} className={active ? 'bg-fail hover:bg-fail/90' : ''}>
          {active ? 'Yes, retire it' : 'Put back in use'}
        </Button>
      )}
      {confirming && (
        <Button tone="quiet" type="button" onClick={() => setConfirming(false)}>
          Keep it
        </Button>
      )}
      {change.error && (
        <p role="alert" className="font-semibold text-fail">
          {change.error.message}
        </p>
      )}
    </div>
  );
}
