'use client';

import { useState } from 'react';
import type { ScrewMove } from '@/lib/leveling';
import type { UnitSystem } from '@/lib/leveling/units';
import { moveSend } from '@/lib/session/commands';
import { moveOfTurns } from '@/lib/session/derive';
import type { SessionScrew } from '@/lib/session/events';
import { Button } from '@/components/ui/button';
import { raiseWords, signedDegrees, signedTurns } from './format';

export type SendMove = (move: { screwId: string; turns: number; recommended: boolean; note?: string }) => Promise<void>;

/** The turns field checked with the command's own rule; the error names the field. */
function checkTurns(text: string): { turns: number } | { error: string } {
  const parsed = moveSend.shape.turns.safeParse(text.trim() === '' ? NaN : Number(text));
  return parsed.success ? { turns: parsed.data } : { error: `turns: ${parsed.error.issues[0]?.message ?? 'not a number'}` };
}

type RecommendedProps = {
  moves: ScrewMove[];
  screws: SessionScrew[];
  unitSystem: UnitSystem;
  /** Why there are none, in words (shown when `moves` is empty). */
  emptyReason: string;
  canSend: boolean;
  busy: boolean;
  onSend: SendMove;
};

/** The engine's moves for this round: sent as they are, or with the turns edited first. */
export function RecommendedMoves({ moves, screws, unitSystem, emptyReason, canSend, busy, onSend }: RecommendedProps) {
  const [edits, setEdits] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const screwOf = (id: string) => screws.find((s) => s.id === id);

  const rowMove = (m: ScrewMove) => {
    const text = edits[m.id];
    if (text === undefined) return { turns: m.turns, recommended: true as const };
    const checked = checkTurns(text);
    if ('error' in checked) return checked;
    return { turns: checked.turns, recommended: Math.abs(checked.turns - m.turns) < 5e-4 };
  };

  async function send(list: ScrewMove[]) {
    const ready = list.map((m) => ({ m, r: rowMove(m) }));
    const bad = ready.find((x) => 'error' in x.r);
    if (bad) {
      setError(`${screwOf(bad.m.id)?.label ?? 'Screw'} ${(bad.r as { error: string }).error}`);
      return;
    }
    setError(null);
    for (const { m, r } of ready) await onSend({ screwId: m.id, ...(r as { turns: number; recommended: boolean }) });
  }

  return (
    <section aria-labelledby="rec-h" data-testid="recommended-moves" className="grid gap-2 rounded-2xl border-2 border-rule bg-card p-3">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="rec-h" className="text-lg font-bold">
          Recommended moves
        </h2>
        {moves.length > 0 && canSend && (
          <Button className="min-h-10 px-4 text-base" disabled={busy} onClick={() => void send(moves)}>
            Send all recommended
          </Button>
        )}
      </div>
      {moves.length === 0 ? (
        <p className="text-ink-soft">{emptyReason}</p>
      ) : (
        <table className="w-full text-left text-sm">
          <thead className="text-ink-soft">
            <tr>
              <th className="py-1 font-semibold">Screw</th>
              <th className="py-1 font-semibold">Turns</th>
              <th className="py-1 font-semibold">Wrench</th>
              <th className="py-1 font-semibold">Base at screw</th>
              <th className="py-1" />
            </tr>
          </thead>
          <tbody>
            {moves.map((m) => {
              const screw = screwOf(m.id);
              const r = rowMove(m);
              const shown = 'error' in r || !screw ? m : moveOfTurns(screw, r.turns);
              const edited = edits[m.id] !== undefined && !('error' in r) && !r.recommended;
              return (
                <tr key={m.id} data-testid="recommended-move" data-screw-id={m.id} className="border-t border-rule align-middle">
                  <td className="py-1 font-bold">{screw?.label ?? '?'}</td>
                  <td className="py-1">
                    <input
                      type="number"
                      step={0.005}
                      min={-5}
                      max={5}
                      aria-label={`Turns for ${screw?.label ?? 'screw'}`}
                      className={`tabular w-24 rounded border-2 px-2 py-1 ${'error' in r ? 'border-fail' : edited ? 'border-bubble' : 'border-rule'}`}
                      value={edits[m.id] ?? m.turns.toFixed(3)}
                      disabled={!canSend}
                      onChange={(e) => setEdits((x) => ({ ...x, [m.id]: e.target.value }))}
                    />
                    {edited && <span className="ml-1 text-xs text-ink-soft">edited</span>}
                  </td>
                  <td className="tabular py-1">{signedDegrees(shown.degrees)}</td>
                  <td className="py-1">{raiseWords(shown.raiseUm, unitSystem)}</td>
                  <td className="py-1 text-right">
                    {canSend && (
                      <button
                        type="button"
                        disabled={busy}
                        onClick={() => void send([m])}
                        className="min-h-9 rounded-lg border-2 border-ink px-3 font-semibold hover:bg-paper disabled:opacity-50"
                      >
                        Send
                      </button>
                    )}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
      {error && (
        <p role="alert" className="font-semibold text-fail">
          {error}
        </p>
      )}
    </section>
  );
}

type ManualProps = { screws: SessionScrew[]; unitSystem: UnitSystem; busy: boolean; onSend: SendMove };

/** A move the expert writes: one screw, turns (+ raises), and a comment for the technician. */
export function ManualMove({ screws, unitSystem, busy, onSend }: ManualProps) {
  const [screwId, setScrewId] = useState(screws[0]?.id ?? '');
  const [turns, setTurns] = useState('');
  const [comment, setComment] = useState('');
  const [error, setError] = useState<string | null>(null);
  const screw = screws.find((s) => s.id === screwId);
  const checked = turns.trim() === '' ? null : checkTurns(turns);
  const preview = screw && checked && 'turns' in checked ? moveOfTurns(screw, checked.turns) : null;

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    if (!screw) return setError('screw: choose one of the machine’s screws');
    const c = checkTurns(turns);
    if ('error' in c) return setError(c.error);
    const note = comment.trim();
    if (note.length > 500) return setError('comment: must be at most 500 characters');
    setError(null);
    await onSend({ screwId: screw.id, turns: c.turns, recommended: false, ...(note ? { note } : {}) });
    setTurns('');
    setComment('');
  }

  return (
    <details className="rounded-2xl border-2 border-rule bg-card p-3">
      <summary className="min-h-8 cursor-pointer text-lg font-bold">Write a move</summary>
      <form onSubmit={(e) => void submit(e)} className="mt-2 grid gap-2 text-sm" noValidate>
        <div className="grid grid-cols-[1fr_1fr] gap-2">
          <label className="grid gap-1 font-semibold">
            Screw
            <select value={screwId} onChange={(e) => setScrewId(e.target.value)} className="min-h-10 rounded border-2 border-rule bg-card px-2 font-normal">
              {screws.map((s) => (
                <option key={s.id} value={s.id}>
                  {s.label} ({s.kind})
                </option>
              ))}
            </select>
          </label>
          <label className="grid gap-1 font-semibold">
            Turns (+ raises, − lowers)
            <input
              type="number"
              step={0.005}
              min={-5}
              max={5}
              value={turns}
              onChange={(e) => setTurns(e.target.value)}
              className="tabular min-h-10 rounded border-2 border-rule px-2 font-normal"
            />
          </label>
        </div>
        <label className="grid gap-1 font-semibold">
          Comment for the technician (optional)
          <input value={comment} onChange={(e) => setComment(e.target.value)} maxLength={500} className="min-h-10 rounded border-2 border-rule px-2 font-normal" />
        </label>
        <p className="text-ink-soft" aria-live="polite">
          {preview ? `${signedTurns(preview.turns)} turn = ${signedDegrees(preview.degrees)} of wrench swing: ${raiseWords(preview.raiseUm, unitSystem)} at ${screw?.label}` : 'Type the turns to see the wrench swing and the lift.'}
        </p>
        {error && (
          <p role="alert" className="font-semibold text-fail">
            {error}
          </p>
        )}
        <Button type="submit" tone="plain" className="min-h-10 justify-self-start px-4 text-base" disabled={busy}>
          Send move
        </Button>
      </form>
    </details>
  );
}
