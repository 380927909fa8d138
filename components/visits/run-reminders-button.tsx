'use client';

import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { apiFetch } from '@/components/session/api';
import { Button } from '@/components/ui/button';

/** Runs the reminder job now (POST /api/reminders/run) and says what went out. */
export function RunRemindersButton({ refresh = false }: { refresh?: boolean }) {
  const router = useRouter();
  const mutation = useMutation({
    mutationFn: () => apiFetch<{ dueReminders: number; visitReminders: number }>('/api/reminders/run', { method: 'POST' }),
    onSuccess: () => {
      if (refresh) router.refresh();
    },
  });
  const r = mutation.data;
  return (
    <div className="flex flex-wrap items-center gap-3">
      <Button type="button" tone="plain" onClick={() => mutation.mutate()} disabled={mutation.isPending}>
        {mutation.isPending ? 'Sending reminders…' : 'Send due reminders now'}
      </Button>
      {r && (
        <span role="status" className="font-semibold">
          {r.dueReminders + r.visitReminders === 0
            ? 'Nothing new to remind: every reminder has already gone out.'
            : `Sent ${r.dueReminders} due reminder${r.dueReminders === 1 ? '' : 's'} and ${r.visitReminders} visit reminder${r.visitReminders === 1 ? '' : 's'}.`}
        </span>
      )}
      {mutation.error && (
        <span role="alert" className="font-semibold text-fail">
          {mutation.error.message}
        </span>
      )}
    </div>
  );
}
