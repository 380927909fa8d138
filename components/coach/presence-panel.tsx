import type { Presence } from '@/lib/realtime/contract';
import type { ParticipantState } from '@/lib/session/fold';
import { clock } from './format';

/** Connection quality from the round trip: good under 150 ms, fair under 500 ms, poor above. */
export function quality(rttMs: number | null): { text: string; cls: string } {
  if (rttMs === null) return { text: 'measuring', cls: 'bg-rule' };
  if (rttMs < 150) return { text: 'good', cls: 'bg-pass' };
  if (rttMs < 500) return { text: 'fair', cls: 'bg-bubble' };
  return { text: 'poor', cls: 'bg-fail' };
}

/** Who is connected now (since when, and how well), and the participants who are not. */
export function PresencePanel({ presence, participants, selfId, simulated }: { presence: Presence[]; participants: ParticipantState[]; selfId: string; simulated: boolean }) {
  const partOf = (userId: string, role: string) => participants.find((p) => p.userId === userId)?.part ?? role;
  // A demo's technician is the simulator, working inside the server: never "not connected".
  const virtualTech = simulated ? participants.find((p) => p.part === 'technician') : undefined;
  const away = participants.filter((p) => !presence.some((c) => c.userId === p.userId) && p !== virtualTech);
  return (
    <section aria-labelledby="presence-h" data-testid="presence" className="grid gap-1 rounded-2xl border-2 border-rule bg-card p-3 text-sm">
      <h2 id="presence-h" className="text-lg font-bold">
        Who is here
      </h2>
      <ul className="grid gap-1">
        {presence.map((c) => {
          const q = quality(c.rttMs);
          return (
            <li key={c.userId} data-testid="presence-person" data-user-id={c.userId} className="flex flex-wrap items-center justify-between gap-2">
              <span>
                <span className={`mr-2 inline-block h-3 w-3 rounded-full ${q.cls}`} aria-hidden />
                <b>{c.name}</b>
                {c.userId === selfId && ' (you)'} · {partOf(c.userId, c.role)}
              </span>
              <span className="tabular text-xs text-ink-soft">
                since {clock(c.since)} · {q.text}
                {c.rttMs !== null ? ` ${c.rttMs} ms` : ''}
                {c.sockets > 1 ? ` · ${c.sockets} tabs` : ''}
              </span>
            </li>
          );
        })}
        {virtualTech && (
          <li className="flex flex-wrap items-center justify-between gap-2">
            <span>
              <span className="mr-2 inline-block h-3 w-3 rounded-full bg-pass" aria-hidden />
              <b>{virtualTech.name}</b> · technician
            </span>
            <span className="text-xs text-ink-soft">simulated in the server</span>
          </li>
        )}
        {presence.length === 0 && !virtualTech && <li className="text-ink-soft">Nobody connected (or this view is offline).</li>}
      </ul>
      {away.length > 0 && (
        <p className="text-ink-soft">
          Not connected: {away.map((p) => `${p.name} (${p.part})`).join(', ')}
        </p>
      )}
    </section>
  );
}
