'use client';

import { useState, type FormEvent, type ReactNode } from 'react';
import { formatLength, type UnitSystem } from '@/lib/leveling/units';
import type { MoveState } from '@/lib/session/fold';
import { STAGE_GUIDES } from '@/lib/session/stages';
import { checkCommand } from './command-schemas';
import { fieldError, formatTurns, moveWords, typedNumber } from './field-logic';
import { NumberField } from './number-field';

type Props = {
  move: MoveState;
  screwLabel: string;
  sessionId: string;
  unitSystem: UnitSystem;
  /** Queues the answer (a move:answer command body, with its id). */
  onAnswer: (body: Record<string, unknown>) => Promise<void>;
  /** The top view with this screw highlighted. */
  topView?: ReactNode;
};

/**
 * A move from the coach, at the top of the screen: which screw, raise or lower, by how many turns and degrees of
 * wrench swing. The technician answers Done (with what was actually turned) or Can't (with a reason).
 */
export function MoveCard({ move, screwLabel, sessionId, unitSystem, onAnswer, topView }: Props) {
  const words = moveWords(move);
  const [turns, setTurns] = useState(String(Math.round(move.turns * 10_000) / 10_000));
  const [reason, setReason] = useState('');
  const [problem, setProblem] = useState<{ field: string | null; message: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function answer(outcome: 'done' | 'cannot', e?: FormEvent) {
    e?.preventDefault();
    setProblem(null);
    const id = crypto.randomUUID();
    const t = typedNumber(turns);
    const body =
      outcome === 'done'
        ? { id, sessionId, moveId: move.moveId, outcome, turns: t === null ? Number.NaN : t }
        : { id, sessionId, moveId: move.moveId, outcome, reason };
    const parsed = await checkCommand('moveAnswer', body);
    if (!parsed.success) {
      setProblem(fieldError(parsed.error));
      return;
    }
    setBusy(true);
    try {
      await onAnswer(body);
    } finally {
      setBusy(false);
    }
  }

  const raise = words.direction === 'raise';
  return (
    <article
      data-testid="move-card"
      data-move-id={move.moveId}
      data-screw-id={move.screwId}
      aria-label={`Move: ${words.direction} ${screwLabel}`}
      className="grid gap-3 rounded-2xl border-4 border-bubble bg-card p-4 shadow-lg"
    >
      <p className="text-sm font-bold uppercase tracking-wide text-ink-soft">
        Move from the coach · {STAGE_GUIDES[move.stage].title}
      </p>
      <p className="flex flex-wrap items-baseline gap-x-3 text-3xl font-black leading-tight">
        <span className={raise ? 'text-spirit' : 'text-fail'}>{raise ? '▲ Raise' : '▼ Lower'}</span>
        <span className="rounded-lg bg-bubble px-2 text-ink">{screwLabel}</span>
      </p>
      <p className="text-xl font-bold tabular">
        {formatTurns(words.turns)} · {Math.round(words.degrees)}° of wrench swing
      </p>
      <p className="text-ink-soft">
        {raise ? 'Lifts' : 'Lowers'} the base at {screwLabel} by {formatLength(words.liftUm, unitSystem)}. Lift in small steps; hands clear of the pad.
      </p>
      {topView}
      {move.note && <p className="rounded-lg bg-paper p-2 text-lg">“{move.note}”</p>}
      <form onSubmit={(e) => answer('done', e)} noValidate className="grid gap-2">
        <NumberField name="turns" label="Turns actually made (+ raised, − lowered)" value={turns} onChange={setTurns} unit="turns" invalid={problem?.field === 'turns'} signed />
        <button type="submit" disabled={busy} className="min-h-16 rounded-xl bg-spirit text-2xl font-bold text-white disabled:opacity-50">
          Done
        </button>
      </form>
      <div className="grid gap-2 border-t-2 border-rule pt-3">
        <label className="grid gap-1 font-semibold">
          Can&apos;t make it? Say why
          <input
            name="reason"
            value={reason}
            onChange={(e) => setReason(e.target.value)}
            aria-invalid={problem?.field === 'reason' || undefined}
            placeholder="e.g. screw at the end of its travel"
            className={`min-h-12 rounded-lg border-2 px-3 text-lg ${problem?.field === 'reason' ? 'border-fail' : 'border-ink'}`}
          />
        </label>
        <button type="button" disabled={busy} onClick={() => answer('cannot')} className="min-h-12 rounded-xl border-2 border-ink bg-card text-lg font-bold disabled:opacity-50">
          Can&apos;t
        </button>
      </div>
      {problem && (
        <p role="alert" className="rounded-lg bg-fail/10 p-2 font-semibold text-fail">
          {problem.message}
        </p>
      )}
    </article>
  );
}
