'use client';

import { useState, type FormEvent } from 'react';
import type { NoteState, ParticipantState } from '@/lib/session/fold';
import { Button } from '@/components/ui/button';
import { checkCommand } from './command-schemas';
import { fieldError } from './field-logic';

type Props = {
  sessionId: string;
  notes: NoteState[];
  pending: { id: string; text: string }[];
  participants: ParticipantState[];
  disabled: boolean;
  onPost: (body: Record<string, unknown>) => Promise<void>;
};

/** The session's notes, newest last, and a box to post one; notes typed offline show as waiting. */
export function NotesPanel({ sessionId, notes, pending, participants, disabled, onPost }: Props) {
  const [text, setText] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const nameOf = (n: NoteState) => participants.find((p) => p.userId === n.actorId)?.name ?? n.actorRole;

  async function post(e: FormEvent) {
    e.preventDefault();
    setProblem(null);
    const body = { id: crypto.randomUUID(), sessionId, text };
    const parsed = await checkCommand('notePost', body);
    if (!parsed.success) return setProblem(fieldError(parsed.error).message.replace(/^text:/, 'note:'));
    await onPost({ id: body.id, text: parsed.data.text });
    setText('');
  }

  return (
    <section aria-labelledby="notes-h" className="grid grid-cols-[minmax(0,1fr)] gap-3 rounded-2xl border-2 border-rule bg-card p-4">
      <h2 id="notes-h" className="text-xl font-bold">
        Notes
      </h2>
      <ol className="grid max-h-80 gap-2 overflow-auto">
        {notes.map((n) => (
          <li key={n.seq} data-testid="note" className="rounded-lg bg-paper p-2">
            <p className="text-sm text-ink-soft">
              <span className="font-semibold">{nameOf(n)}</span> · {new Date(n.at).toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' })}
            </p>
            <p className="whitespace-pre-wrap">{n.text}</p>
          </li>
        ))}
        {pending.map((n) => (
          <li key={n.id} data-testid="note-pending" className="rounded-lg border-2 border-dashed border-bubble p-2">
            <p className="text-sm font-semibold text-ink-soft">You · waiting to be sent</p>
            <p className="whitespace-pre-wrap">{n.text}</p>
          </li>
        ))}
        {notes.length + pending.length === 0 && <li className="text-ink-soft">No notes yet.</li>}
      </ol>
      <form onSubmit={post} noValidate className="grid gap-2">
        <label className="grid gap-1 font-semibold">
          Note to the coach
          <textarea name="note" value={text} onChange={(e) => setText(e.target.value)} rows={2} className="rounded-lg border-2 border-ink p-2 text-lg" />
        </label>
        {problem && (
          <p role="alert" className="font-semibold text-fail">
            {problem}
          </p>
        )}
        <Button type="submit" tone="plain" disabled={disabled}>
          Post note
        </Button>
      </form>
    </section>
  );
}
