import { formatPosition } from '@/lib/display-units';
import { analyzeSweep } from '@/lib/leveling/sweep';
import { formatLength, formatSlope, type UnitSystem } from '@/lib/leveling/units';
import { readingKey, tolerancesOf, type PlannedReading, type Verdict } from '@/lib/session/derive';
import type { RecordedReading, SessionState } from '@/lib/session/fold';
import { formatIndicator, keyOfInput, type PendingReading } from './field-logic';

type Props = {
  state: SessionState;
  plan: PlannedReading[];
  stored: RecordedReading[];
  /** Seqs of the readings that make up the current round. */
  roundSeqs: ReadonlySet<number>;
  pending: PendingReading[];
  verdict: Verdict;
  unitSystem: UnitSystem;
};

const signed = (n: number) => `${n > 0 ? '+' : ''}${n}`;

function labelOf(r: PendingReading['reading'] | RecordedReading, plan: PlannedReading[], state: SessionState, system: UnitSystem): string {
  const planned = plan.find((p) => readingKey(p) === ('seq' in r ? readingKey(r) : keyOfInput(r)));
  if (planned) return planned.label;
  switch (r.kind) {
    case 'level':
      return `${r.axis === 'x' ? 'X across' : 'Y along'} · ${formatPosition(r.positionMm, system)}`;
    case 'reversal':
      return `Reversal ${r.axis.toUpperCase()}`;
    case 'height':
      return `Height at ${state.screws.find((s) => s.id === r.screwId)?.label ?? 'a screw'}`;
    case 'sweep':
      return 'Spindle sweep';
  }
}

/** A stored reading's value and what it means, in the user's units. */
function valueOf(r: RecordedReading, state: SessionState, system: UnitSystem, sweepLimitUm: number): string {
  switch (r.kind) {
    case 'level':
      return `${signed(r.divisions)} div → ${formatSlope(r.slopeUrad, system)}`;
    case 'reversal': {
      const div = state.levelDivisionUrad ?? 0;
      return `${signed(r.firstDiv)} / ${signed(r.secondDiv)} div → slope ${formatSlope(r.slopeDiv * div, system)}, zero error ${signed(Number(r.zeroErrorDiv.toFixed(2)))} div: ${r.repeats ? 'repeats' : 'does not repeat'}`;
    }
    case 'height':
      return formatLength(r.heightMm * 1000, system);
    case 'sweep': {
      const a = analyzeSweep(r, sweepLimitUm);
      return `L ${formatIndicator(r.leftUm, system)} · F ${formatIndicator(r.frontUm, system)} · R ${formatIndicator(r.rightUm, system)} · B ${formatIndicator(r.backUm, system)} → TIR ${formatIndicator(a.tirUm, system)}, tilt ${formatSlope(a.tiltUrad, system)}`;
    }
  }
}

/** What a queued reading holds, before the server has converted it. */
function pendingValueOf(r: PendingReading['reading'], state: SessionState, system: UnitSystem): string {
  switch (r.kind) {
    case 'level':
      return `${signed(r.divisions)} div${state.levelDivisionUrad ? ` → ${formatSlope(r.divisions * state.levelDivisionUrad, system)}` : ''}`;
    case 'reversal':
      return `${signed(r.firstDiv)} / ${signed(r.secondDiv)} div`;
    case 'height':
      return formatLength(r.heightMm * 1000, system);
    case 'sweep':
      return `L ${formatIndicator(r.leftUm, system)} · F ${formatIndicator(r.frontUm, system)} · R ${formatIndicator(r.rightUm, system)} · B ${formatIndicator(r.backUm, system)}`;
  }
}

const verdictLook: Record<Verdict['status'], { text: string; cls: string }> = {
  pass: { text: 'This round passes', cls: 'bg-pass/10 text-pass border-pass' },
  fail: { text: 'This round fails', cls: 'bg-fail/10 text-fail border-fail' },
  incomplete: { text: 'Round not complete', cls: 'bg-paper text-ink border-rule' },
};

/** The stage's readings, newest first: the ones still waiting to be sent, then the stored ones with their meaning. */
export function StageReadings({ state, plan, stored, roundSeqs, pending, verdict, unitSystem }: Props) {
  const sweepLimitUm = tolerancesOf(state).sweepTirUm;
  const look = verdictLook[verdict.status];
  return (
    <section aria-labelledby="readings-h" className="grid gap-2">
      <h3 id="readings-h" className="text-lg font-bold">
        Readings in this stage
      </h3>
      <div className={`rounded-lg border-2 p-2 ${look.cls}`}>
        <p className="font-bold">{look.text}</p>
        {verdict.detail.length > 0 && (
          <ul className="list-disc pl-5 text-sm text-ink">
            {verdict.detail.map((d) => (
              <li key={d}>{d}</li>
            ))}
          </ul>
        )}
      </div>
      <ol className="grid gap-1" data-testid="reading-log">
        {[...pending].reverse().map((p) => (
          <li key={p.id} data-testid="reading-pending" className="grid gap-0.5 rounded-lg border-2 border-dashed border-bubble bg-card px-3 py-2">
            <span className="flex justify-between gap-2 font-semibold">
              {labelOf(p.reading, plan, state, unitSystem)}
              <span className="rounded bg-bubble px-2 text-sm font-bold">pending</span>
            </span>
            <span className="tabular">{pendingValueOf(p.reading, state, unitSystem)}</span>
          </li>
        ))}
        {[...stored].reverse().map((r) => (
          <li key={r.seq} data-testid="reading" className={`grid grid-cols-[auto_1fr] gap-x-3 rounded-lg px-3 py-2 ${roundSeqs.has(r.seq) ? 'bg-card' : 'bg-paper text-ink-soft'}`}>
            <span className="tabular row-span-2 self-center text-ink-soft">#{r.seq}</span>
            <span className="flex flex-wrap justify-between gap-x-2 font-semibold">
              {labelOf(r, plan, state, unitSystem)}
              {!roundSeqs.has(r.seq) && <span className="text-sm font-normal">earlier round</span>}
            </span>
            <span className="tabular text-[0.95rem]">{valueOf(r, state, unitSystem, sweepLimitUm)}</span>
          </li>
        ))}
        {stored.length + pending.length === 0 && <li className="text-ink-soft">No readings in this stage yet.</li>}
      </ol>
    </section>
  );
}
