'use client';

import { useState } from 'react';
import type { Verdict } from '@/lib/session/derive';

type Props = {
  verdict: Verdict;
  /** Entries still in the outbox: the session cannot end before they reach the server. */
  waiting: number;
  online: boolean;
  onFinish: (reason: string | undefined) => Promise<void>;
};

/**
 * The last stage's way out: the technician finishes the session once the as-left figures are in. Held back while
 * entries wait to be sent (after the end they would be refused); asks first, and says so when as-left does not pass.
 */
export function FinishSession({ verdict, waiting, online, onFinish }: Props) {
  const [asking, setAsking] = useState(false);
  const [reason, setReason] = useState('');
  const [busy, setBusy] = useState(false);
  const blocked = waiting > 0 ? `${waiting} ${waiting === 1 ? 'entry still waits' : 'entries still wait'} to reach the server.` : !online ? 'No connection to the server.' : null;
  if (!asking) {
    return (
      <div className="grid gap-2 border-t-2 border-rule pt-3">
        <button
          type="button"
          disabled={blocked !== null}
          onClick={() => setAsking(true)}
          className={`min-h-16 rounded-xl text-xl font-bold disabled:opacity-50 ${verdict.status === 'pass' ? 'bg-spirit text-white' : 'border-2 border-ink bg-card'}`}
        >
          Finish the session
          <span className="block text-sm font-normal">the record goes for review</span>
        </button>
        {blocked && <p className="font-semibold text-ink-soft">{blocked} Finish once it is sent.</p>}
      </div>
    );
  }
  return (
    <div role="alertdialog" aria-labelledby="finish-h" className="grid gap-2 rounded-xl border-2 border-ink bg-card p-3">
      <p id="finish-h" className="text-lg font-bold">
        {verdict.status === 'pass' ? 'Finish the session? Nothing more can be recorded afterwards.' : `As-left ${verdict.status === 'fail' ? 'is out of tolerance' : 'is not complete'}. Finish anyway?`}
      </p>
      {verdict.status !== 'pass' && (
        <ul className="list-disc pl-5">
          {verdict.detail.map((d) => (
            <li key={d}>{d}</li>
          ))}
        </ul>
      )}
      <label className="grid gap-1 font-semibold">
        {verdict.status === 'pass' ? 'Note for the record (optional)' : 'Why (goes in the record)'}
        <input name="finish-reason" value={reason} maxLength={500} onChange={(e) => setReason(e.target.value)} className="min-h-12 rounded-lg border-2 border-ink px-3 font-normal" />
      </label>
      <div className="grid grid-cols-2 gap-2">
        <button type="button" onClick={() => setAsking(false)} className="min-h-14 rounded-xl border-2 border-ink bg-card text-lg font-bold">
          Not yet
        </button>
        <button
          type="button"
          disabled={busy || (verdict.status !== 'pass' && reason.trim() === '')}
          onClick={async () => {
            setBusy(true);
            try {
              await onFinish(reason.trim() || undefined);
              setAsking(false);
            } finally {
              setBusy(false);
            }
          }}
          className="min-h-14 rounded-xl bg-spirit text-lg font-bold text-white disabled:opacity-50"
        >
          Finish
        </button>
      </div>
    </div>
  );
}
