'use client';

import { useState } from 'react';
import { notePost } from '@/lib/session/commands';
import type { NoteState, ParticipantState } from '@/lib/session/fold';
import { clock } from './format';

type Props = { notes: NoteState[]; participants: ParticipantState[]; selfId: string; canPost: boolean; onPost: (text: string) => Promise<void> };

/** Notes and chat: everyone taking part may post; readers only read. */
export function NotesPanel({ notes, participants, selfId, canPost, onPost }: Props) {
  const [text, setText] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const nameOf = (n: NoteState) => (n.actorId === selfId ? 'You' : (participants.find((p) => p.userId === n.actorId)?.name ?? n.actorRole));

  async function post(e: React.FormEvent) {
    e.preventDefault();
    const parsed = notePost.shape.text.safeParse(text);
    if (!parsed.success) return setError(`note: ${parsed.error.issues[0]?.message ?? 'not valid'}`);
    setError(null);
    setBusy(true);
    try {
      await onPost(parsed.data);
      setText('');
    } finally {
      setBusy(false);
    }
  }

  return (
    <section aria-labelledby="notes-h" className="grid gap-2 rounded-2xl border-2 border-rule bg-card p-3 text-sm">
      <h2 id="notes-h" className="text-lg font-bold">
        Notes and chat
      </h2>
      <ol className="grid max-h-64 gap-1 overflow-auto" aria-live="polite">
        {notes.map((n) => (
          <li key={n.seq} data-testid="note" className={`rounded-lg px-3 py-2 ${n.actorId === selfId ? 'bg-spirit/10' : 'bg-paper'}`}>
            <p className="flex justify-between gap-2 text-xs text-ink-soft">
              <b className="text-ink">{nameOf(n)}</b>
              <span className="tabular">{clock(n.at)}</span>
            </p>
            <p className="whitespace-pre-wrap">{n.text}</p>
          </li>
        ))}
        {notes.length === 0 && <li className="text-ink-soft">No notes yet.</li>}
      </ol>
      {canPost && (
        <form onSubmit={(e) => void post(e)} className="grid gap-2" noValidate>
          <label className="grid gap-1 font-semibold">
            Note
            <textarea
              name="note"
              rows={2}
              value={text}
              maxLength={2000}
              onChange={(e) => setText(e.target.value)}
              onKeyDown={(e) => {
                if (e.key === 'Enter' && (e.ctrlKey || e.metaKey)) void post(e);
              }}
              className="rounded border-2 border-rule px-2 py-1 font-normal"
            />
          </label>
          {error && (
            <p role="alert" className="font-semibold text-fail">
              {error}
            </p>
          )}
          <button type="submit" disabled={busy} className="min-h-10 justify-self-start rounded-lg bg-spirit px-4 font-semibold text-white hover:bg-spirit-deep disabled:opacity-50">
            Post note
          </button>
        </form>
      )}
    </section>
  );
}
