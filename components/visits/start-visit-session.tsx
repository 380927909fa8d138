'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { apiFetch } from '@/components/session/api';
import { Button } from '@/components/ui/button';

type Props = { visitId: string; machineId: string; expertId: string | null; levelDivisionUrad: number; levelLabel: string | null };

/** The visit's technician opens its leveling session, with the visit's expert as coach and the visit's level. */
export function StartVisitSession({ visitId, machineId, expertId, levelDivisionUrad, levelLabel }: Props) {
  const router = useRouter();
  const open = useMutation({
    mutationFn: () =>
      apiFetch<{ session: { id: string } }>('/api/sessions', {
        method: 'POST',
        body: { machineId, visitId, levelDivisionUrad, experts: expertId ? [expertId] : [] },
      }),
    onSuccess: ({ session }) => router.push(`/sessions/${session.id}/field`),
  });
  return (
    <div className="grid gap-2">
      <Button type="button" className="min-h-14 w-fit text-lg" disabled={open.isPending} onClick={() => open.mutate()}>
        {open.isPending ? 'Opening…' : 'Start the leveling session'}
      </Button>
      <p className="text-sm text-ink-soft">
        Level: {levelLabel ?? 'none chosen for this visit'} · {levelDivisionUrad} µrad per division{levelLabel ? '' : ' (Levelwire’s default: a 0.02 mm/m level)'}.
      </p>
      {open.error && (
        <p role="alert" className="font-semibold text-fail">
          {open.error.message}
        </p>
      )}
    </div>
  );
}
