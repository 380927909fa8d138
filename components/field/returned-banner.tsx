'use client';

import Link from 'next/link';
import { useRef, useState } from 'react';
import type { ReviewState } from '@/lib/session/fold';
import { apiFetch, ApiError } from '@/components/session/api';

type Props = {
  sessionId: string;
  review: ReviewState;
  online: boolean;
};

const time = (iso: string) => new Date(iso).toLocaleString('en-GB', { day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit' });

/**
 * A returned session in the field view: the reviewer's reasons, big, and "Take it up again", which makes the session
 * live so the technician can retake readings and finish again. The view turns live when the resumed event comes back.
 */
export function ReturnedBanner({ sessionId, review, online }: Props) {
  const last = review.returns.at(-1);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const id = useRef<string | null>(null);
  if (!last) return null;
  const comments = review.comments.filter((c) => c.seq < last.seq);

  async function resume() {
    setBusy(true);
    setError(null);
    try {
      // One id until the server answers: pressing again after a lost answer takes it up once.
      await apiFetch(`/api/sessions/${sessionId}/resume`, { method: 'POST', body: { id: (id.current ??= crypto.randomUUID()) } });
    } catch (e) {
      setBusy(false);
      setError(e instanceof ApiError ? e.message : 'No connection to the server; try again when the link is back.');
    }
  }

  return (
    <section role="alert" aria-labelledby="returned-h" data-testid="returned-banner" className="grid gap-3 rounded-2xl border-4 border-fail bg-fail/5 p-4">
      <div>
        <p className="text-sm font-semibold uppercase tracking-wide text-fail">Returned for rework · {time(last.at)}</p>
        <h2 id="returned-h" className="text-2xl font-bold">
          The reviewer sent this session back
        </h2>
      </div>
      <ul className="grid list-disc gap-1 pl-6 text-lg font-semibold" data-testid="return-reasons">
        {last.reasons.map((r, i) => (
          <li key={i}>{r}</li>
        ))}
      </ul>
      {comments.length > 0 && (
        <details className="rounded-lg bg-card p-3">
          <summary className="min-h-10 cursor-pointer content-center font-bold">Comments on the record ({comments.length})</summary>
          <ol className="mt-1 grid gap-1">
            {comments.map((c) => (
              <li key={c.seq}>
                <span className="tabular text-sm text-ink-soft">at seq {c.atSeq}: </span>
                {c.text}
              </li>
            ))}
          </ol>
          <Link href={`/sessions/${sessionId}/replay`} className="mt-2 inline-block font-semibold underline underline-offset-4">
            See them in the replay
          </Link>
        </details>
      )}
      <p className="text-sm">Taking it up again makes the session live: retake the readings asked for and finish again. Before turning any screw, follow the stage’s cautions and the machine builder’s instructions.</p>
      <button
        type="button"
        onClick={() => void resume()}
        disabled={busy || !online}
        className="min-h-16 rounded-xl bg-fail text-xl font-bold text-white disabled:opacity-50"
      >
        {busy ? 'Taking it up again…' : 'Take it up again'}
      </button>
      {!online && !busy && <p className="font-semibold text-ink-soft">No connection to the server: take it up again once the link is back.</p>}
      {error && <p className="font-semibold text-fail">{error}</p>}
    </section>
  );
}
