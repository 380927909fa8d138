'use client';

import type { Link, Rejected } from '@/components/session/use-live-session';

const look: Record<Link, { text: string; cls: string }> = {
  connecting: { text: 'Connecting…', cls: 'bg-rule text-ink' },
  live: { text: 'Live', cls: 'bg-pass text-white' },
  offline: { text: 'Offline', cls: 'bg-fail text-white' },
};

const commandWords: Record<string, string> = {
  'reading:submit': 'Reading',
  'stage:enter': 'Stage change',
  'check:mark': 'Checklist mark',
  'move:answer': 'Answer to a move',
  'note:post': 'Note',
  'session:end': 'End of session',
};

type Props = { link: Link; pending: number; rejected: Rejected[]; onDismiss: (id: string) => void };

/** The link to the session and what waits to be sent, always at the top; refused commands with the server's reason. */
export function LinkStrip({ link, pending, rejected, onDismiss }: Props) {
  return (
    <div className="grid gap-2">
      <div className="flex flex-wrap items-center gap-2">
        <span role="status" data-testid="link-state" data-link={link} className={`rounded-full px-4 py-2 text-base font-bold ${look[link].cls}`}>
          {look[link].text}
        </span>
        <span className={`rounded-full px-4 py-2 text-base font-semibold ${pending > 0 ? 'bg-bubble text-ink' : 'bg-card text-ink-soft'}`}>
          <span data-testid="outbox-count" className="tabular font-bold">
            {pending}
          </span>{' '}
          {pending === 1 ? 'entry waits' : 'entries wait'} to be sent
        </span>
      </div>
      {link === 'offline' && (
        <p className="rounded-lg bg-steel p-2 text-paper">
          No link. Keep working: readings, checks, answers, notes and photos stay on this device and go out when the link is back.
        </p>
      )}
      {rejected.map((r) => (
        <div key={r.id} role="alert" data-testid="rejected" className="flex items-start justify-between gap-2 rounded-lg border-2 border-fail bg-fail/10 p-2">
          <p>
            <span className="font-bold">{commandWords[r.name] ?? r.name} refused:</span> {r.error.message}
          </p>
          <button type="button" onClick={() => onDismiss(r.id)} className="min-h-12 shrink-0 rounded-lg border-2 border-ink bg-card px-3 font-semibold">
            Dismiss
          </button>
        </div>
      ))}
    </div>
  );
}
