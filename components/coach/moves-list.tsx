import type { UnitSystem } from '@/lib/leveling/units';
import type { MoveState } from '@/lib/session/fold';
import type { SessionScrew } from '@/lib/session/events';
import { STAGE_GUIDES } from '@/lib/session/stages';
import { clock, raiseWords, signedDegrees, signedTurns } from './format';

/**
 * Every move sent, newest first, with its answer: pending, done (with what was turned), or can't (with why). With
 * `limit`, only the newest that many (the replay redraws the list at every seek; a long session has thousands).
 */
export function MovesList({ moves, screws, unitSystem, limit }: { moves: MoveState[]; screws: SessionScrew[]; unitSystem: UnitSystem; limit?: number }) {
  const label = (id: string) => screws.find((s) => s.id === id)?.label ?? 'a screw';
  const pending = moves.filter((m) => m.status === 'pending').length;
  return (
    <section aria-labelledby="moves-h" className="grid gap-2 rounded-2xl border-2 border-rule bg-card p-3">
      <h2 id="moves-h" className="flex items-baseline justify-between text-lg font-bold">
        Moves sent
        <span className="text-sm font-normal text-ink-soft">{pending > 0 ? `${pending} waiting for the technician` : `${moves.length} in all`}</span>
      </h2>
      {moves.length === 0 ? (
        <p className="text-ink-soft">No moves sent yet.</p>
      ) : (
        <ol className="grid max-h-72 gap-1 overflow-auto text-sm">
          {moves.slice(limit === undefined ? 0 : Math.max(0, moves.length - limit)).reverse().map((m) => (
            <li
              key={m.moveId}
              data-testid="move-row"
              data-move-id={m.moveId}
              data-status={m.status}
              className={`grid gap-0.5 rounded-lg border-l-8 bg-paper px-3 py-2 ${m.status === 'pending' ? 'border-bubble' : m.status === 'done' ? 'border-pass' : 'border-fail'}`}
            >
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <span>
                  <b>{label(m.screwId)}</b> <span className="tabular">{signedTurns(m.turns)} turn</span> ({signedDegrees(m.degrees)}, {raiseWords(m.raiseUm, unitSystem)})
                </span>
                <span className="text-xs text-ink-soft">
                  {STAGE_GUIDES[m.stage].title} · {clock(m.sentAt)} · {m.recommended ? 'engine' : 'written by the expert'}
                </span>
              </div>
              {m.note && <p className="text-ink-soft">“{m.note}”</p>}
              <p className="font-semibold">
                {m.status === 'pending' && <span className="text-[#8a5a00]">Pending: not answered yet</span>}
                {m.status === 'done' && (
                  <span className="text-pass">
                    Done{m.answeredAt ? ` at ${clock(m.answeredAt)}` : ''}: turned <span className="tabular">{signedTurns(m.doneTurns ?? 0)}</span>
                    {m.doneTurns !== null && Math.abs(m.doneTurns - m.turns) > 5e-4 ? ` (asked ${signedTurns(m.turns)})` : ''}
                  </span>
                )}
                {m.status === 'cannot' && <span className="text-fail">Can’t: {m.reason}</span>}
              </p>
            </li>
          ))}
          {limit !== undefined && moves.length > limit && (
            <li className="px-3 py-1 text-ink-soft" data-testid="moves-earlier">
              {moves.length - limit} earlier moves not listed
            </li>
          )}
        </ol>
      )}
    </section>
  );
}
