'use client';

import { useState } from 'react';

/** "End session", asking first: once ended nothing more can be added by anyone. */
export function EndSession({ onEnd }: { onEnd: (reason: string | undefined) => Promise<void> }) {
  const [asking, setAsking] = useState(false);
  const [reason, setReason] = useState('');
  const [busy, setBusy] = useState(false);
  if (!asking) {
    return (
      <button type="button" onClick={() => setAsking(true)} className="min-h-10 rounded-lg border-2 border-fail bg-card px-4 font-semibold text-fail hover:bg-fail/10">
        End session
      </button>
    );
  }
  return (
    <div role="alertdialog" aria-labelledby="end-h" className="grid gap-2 rounded-xl border-2 border-fail bg-card p-3 text-sm">
      <p id="end-h" className="font-bold">
        End the session for everyone? Readings, moves and notes can no longer be added.
      </p>
      <label className="grid gap-1 font-semibold">
        Reason (optional)
        <input value={reason} maxLength={500} onChange={(e) => setReason(e.target.value)} className="min-h-10 rounded border-2 border-rule px-2 font-normal" />
      </label>
      <div className="flex gap-2">
        <button
          type="button"
          disabled={busy}
          className="min-h-10 rounded-lg bg-fail px-4 font-semibold text-white disabled:opacity-50"
          onClick={async () => {
            setBusy(true);
            try {
              await onEnd(reason.trim() || undefined);
              setAsking(false);
            } finally {
              setBusy(false);
            }
          }}
        >
          Yes, end the session
        </button>
        <button type="button" className="min-h-10 rounded-lg border-2 border-ink px-4 font-semibold" onClick={() => setAsking(false)}>
          Keep it open
        </button>
      </div>
    </div>
  );
}
