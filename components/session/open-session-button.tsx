'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { Button } from '@/components/ui/button';
import { apiFetch } from './api';

export function OpenSessionButton({ machineId }: { machineId: string }) {
  const router = useRouter();
  const open = useMutation({
    mutationFn: () => apiFetch<{ session: { id: string } }>('/api/sessions', { method: 'POST', body: { machineId } }),
    onSuccess: ({ session }) => router.push(`/sessions/${session.id}/field`),
  });
  return (
    <div className="grid justify-items-end gap-1">
      <Button onClick={() => open.mutate()} disabled={open.isPending}>
        {open.isPending ? 'Opening…' : 'Start leveling'}
      </Button>
      {open.error && <p role="alert" className="text-fail">{open.error.message}</p>}
    </div>
  );
}
