'use client';

import { useMutation } from '@tanstack/react-query';
import { apiFetch } from '@/components/session/api';
import type { ChainVerdict } from '@/lib/session/hash-chain';

/** Asks the server to recompute the session's hash chain from what is stored, and shows the answer. */
export function ChainCheck({ sessionId }: { sessionId: string }) {
  const check = useMutation({
    mutationFn: () => apiFetch<{ verdict: ChainVerdict; checkedAt: string }>(`/api/sessions/${sessionId}/verify`),
  });
  const v = check.data?.verdict;
  return (
    <span className="flex flex-wrap items-center gap-2" data-testid="chain-check">
      <button type="button" onClick={() => check.mutate()} disabled={check.isPending} className="min-h-10 rounded-full border-2 border-ink px-3 font-semibold">
        {check.isPending ? 'Checking…' : 'Verify the record'}
      </button>
      {v?.ok === true && (
        <span role="status" data-status="ok" className="rounded-full bg-pass px-3 py-1 text-sm font-semibold text-white" title={`head ${v.head}`}>
          {v.count} events, chain intact · head {v.head.slice(0, 10)}…
        </span>
      )}
      {v?.ok === false && (
        <span role="alert" data-status="broken" className="rounded-full bg-fail px-3 py-1 text-sm font-semibold text-white">
          Broken at #{v.brokenAtSeq}: {v.reason}
        </span>
      )}
      {check.error && (
        <span role="alert" className="text-sm font-semibold text-fail">
          {check.error.message}
        </span>
      )}
    </span>
  );
}
