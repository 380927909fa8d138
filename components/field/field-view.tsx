'use client';

import { useState } from 'react';
import { formatPosition } from '@/lib/display-units';
import { fromZod } from '@/lib/errors';
import { formatSlope, type UnitSystem } from '@/lib/leveling/units';
import { levelReadingInput } from '@/lib/session/commands';
import { LinkBadge } from '@/components/session/link-badge';
import { useLiveSession } from '@/components/session/use-live-session';
import { Button } from '@/components/ui/button';
import { SafetyNote } from '@/components/ui/safety-note';
import { VialScale } from './vial-scale';

type Axis = 'x' | 'y';
type Props = { sessionId: string; travelYMm: number; unitSystem: UnitSystem; machineLabel: string };

/** The technician's screen: enter level readings; each is stored and sent to the coach as it is taken. */
export function FieldView({ sessionId, travelYMm, unitSystem, machineLabel }: Props) {
  const { state, link, send: sendCommand } = useLiveSession(sessionId);
  const [axis, setAxis] = useState<Axis>('x');
  const stations = [
    { label: 'Front', mm: -travelYMm / 2 },
    { label: 'Middle', mm: 0 },
    { label: 'Back', mm: travelYMm / 2 },
  ];
  const [positionMm, setPositionMm] = useState(0);
  const [divisions, setDivisions] = useState<number | null>(null);
  const [typed, setTyped] = useState('');
  const [status, setStatus] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function send() {
    const value = typed.trim() !== '' ? Number(typed) : divisions;
    if (value === null) {
      setStatus({ tone: 'error', text: 'divisions: tap the vial or type where the bubble sits' });
      return;
    }
    const parsed = levelReadingInput.safeParse({ kind: 'level', axis, positionMm, divisions: value });
    if (!parsed.success) {
      setStatus({ tone: 'error', text: fromZod(parsed.error, 'reading').message });
      return;
    }
    setBusy(true);
    await sendCommand('reading:submit', { reading: parsed.data });
    setBusy(false);
    setStatus({ tone: 'ok', text: 'Reading queued and sent' });
    setTyped('');
    setDivisions(null);
  }

  const recent = state.readings.flatMap((r) => (r.kind === 'level' ? [r] : [])).slice(-8).reverse();
  const stationName = (mm: number) => stations.find((s) => s.mm === mm)?.label ?? 'Other';
  return (
    <main className="mx-auto grid max-w-3xl gap-5 p-4">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <div>
          <p className="text-sm font-semibold uppercase tracking-wide text-ink-soft">Field view</p>
          <h1 className="text-2xl font-bold">{machineLabel}</h1>
        </div>
        <LinkBadge link={link} />
      </div>

      <SafetyNote collapsible />

      <section aria-labelledby="reading-h" className="grid gap-4 rounded-2xl border-2 border-ink bg-card p-4">
        <h2 id="reading-h" className="text-xl font-bold">
          Level reading
        </h2>
        <fieldset className="grid gap-2">
          <legend className="font-semibold">Level lies along</legend>
          <div className="grid grid-cols-2 gap-2">
            {(['x', 'y'] as const).map((a) => (
              <button
                key={a}
                type="button"
                aria-pressed={axis === a}
                onClick={() => setAxis(a)}
                className={`min-h-14 rounded-lg border-2 border-ink text-lg font-bold ${axis === a ? 'bg-steel text-paper' : 'bg-card'}`}
              >
                {a === 'x' ? 'X · across' : 'Y · along'}
                <span className="block text-sm font-normal">{a === 'x' ? 'marked end to the right' : 'marked end to the back'}</span>
              </button>
            ))}
          </div>
        </fieldset>
        <fieldset className="grid gap-2">
          <legend className="font-semibold">Station along Y travel</legend>
          <div className="grid grid-cols-3 gap-2">
            {stations.map((s) => (
              <button
                key={s.label}
                type="button"
                aria-pressed={positionMm === s.mm}
                onClick={() => setPositionMm(s.mm)}
                className={`min-h-14 rounded-lg border-2 border-ink font-bold ${positionMm === s.mm ? 'bg-steel text-paper' : 'bg-card'}`}
              >
                {s.label}
                <span className="block text-sm font-normal tabular">{formatPosition(s.mm, unitSystem)}</span>
              </button>
            ))}
          </div>
        </fieldset>
        <div className="grid gap-2">
          <p className="font-semibold">Tap where the bubble sits</p>
          <VialScale value={typed.trim() !== '' && Number.isFinite(Number(typed)) ? Number(typed) : divisions} onChange={(d) => { setDivisions(d); setTyped(''); }} />
          <label className="flex flex-wrap items-center gap-3 font-semibold">
            or type divisions
            <input
              inputMode="decimal"
              name="divisions"
              value={typed}
              onChange={(e) => setTyped(e.target.value)}
              placeholder={divisions === null ? 'e.g. +1.5' : String(divisions)}
              className="min-h-12 w-36 rounded-lg border-2 border-ink px-3 text-lg tabular"
            />
          </label>
        </div>
        <Button onClick={send} disabled={busy} className="min-h-16 text-xl">
          {busy ? 'Sending…' : 'Record reading'}
        </Button>
        {status && (
          <p role={status.tone === 'error' ? 'alert' : 'status'} className={`rounded-lg p-3 font-semibold ${status.tone === 'error' ? 'bg-fail/10 text-fail' : 'bg-pass/10 text-pass'}`}>
            {status.text}
          </p>
        )}
      </section>

      <section aria-labelledby="log-h">
        <h2 id="log-h" className="text-xl font-bold">
          Readings so far
        </h2>
        <ol className="mt-2 grid gap-1" data-testid="reading-log">
          {recent.map((r) => (
            <li key={r.seq} className="grid grid-cols-[auto_1fr] gap-x-3 rounded-lg bg-card px-3 py-2">
              <span className="tabular row-span-2 self-center text-ink-soft">#{r.seq}</span>
              <span className="font-semibold">
                {r.axis.toUpperCase()} · {stationName(r.positionMm)} <span className="tabular font-normal text-ink-soft">({formatPosition(r.positionMm, unitSystem)})</span>
              </span>
              <span className="tabular">
                {r.divisions > 0 ? '+' : ''}
                {r.divisions} div → {formatSlope(r.slopeUrad, unitSystem)}
              </span>
            </li>
          ))}
          {recent.length === 0 && <li className="text-ink-soft">No readings yet.</li>}
        </ol>
      </section>
    </main>
  );
}
