'use client';

import { useState } from 'react';
import { formatPosition } from '@/lib/display-units';
import { formatSlope, type UnitSystem } from '@/lib/leveling/units';
import { LinkBadge } from '@/components/session/link-badge';
import { useLiveSession } from '@/components/session/use-live-session';
import { TiltView } from '@/components/viewer/tilt-view';
import type { SceneScrew } from '@/components/viewer/canvas/base-scene';

type Props = { sessionId: string; screws: SceneScrew[]; unitSystem: UnitSystem; machineLabel: string; technicianName: string };

/** The expert's screen: the live tilt view and the readings as they arrive. */
export function CoachView({ sessionId, screws, unitSystem, machineLabel, technicianName }: Props) {
  const { state, link } = useLiveSession(sessionId);
  const [exaggeration, setExaggeration] = useState(2000);
  const levels = state.readings.flatMap((r) => (r.kind === 'level' ? [r] : []));
  const last = levels.at(-1);
  // Readings are taken on the table's centre line, at a station along Y.
  const levelAt = last ? { xMm: 0, yMm: last.positionMm, axis: last.axis } : null;

  return (
    <main className="grid gap-4 p-4 lg:grid-cols-[minmax(0,1fr)_26rem]">
      <section aria-labelledby="tilt-h" className="grid gap-3">
        <div className="flex flex-wrap items-center justify-between gap-3">
          <div>
            <p className="text-sm font-semibold uppercase tracking-wide text-ink-soft">Coach view · technician {technicianName}</p>
            <h1 id="tilt-h" className="text-2xl font-bold">{machineLabel}</h1>
          </div>
          <LinkBadge link={link} />
        </div>
        <div className="relative h-[60vh] min-h-80 overflow-hidden rounded-2xl border-2 border-ink bg-[#e9e6dc]">
          <p className="pointer-events-none absolute left-3 top-2 z-10 rounded bg-paper/85 px-2 py-1 text-sm">
            Heights ×{exaggeration.toLocaleString('en')} · black bar = front (operator side) · +X to the right · green block = the level · drag to turn
          </p>
          <TiltView screws={screws} slopeXUrad={state.slopeXUrad ?? 0} slopeYUrad={state.slopeYUrad ?? 0} exaggeration={exaggeration} levelAt={levelAt} />
        </div>
        <label className="flex flex-wrap items-center gap-3 font-semibold">
          Exaggeration
          <input type="range" min={100} max={10000} step={100} value={exaggeration} onChange={(e) => setExaggeration(Number(e.target.value))} className="w-64 accent-spirit" />
          <span className="tabular">×{exaggeration.toLocaleString('en')}</span>
        </label>
      </section>

      <aside className="grid content-start gap-4">
        <div className="grid grid-cols-2 gap-3">
          {([
            ['Slope X (across)', state.slopeXUrad],
            ['Slope Y (along)', state.slopeYUrad],
          ] as const).map(([label, v]) => (
            <div key={label} className="rounded-xl bg-steel p-3 text-paper">
              <p className="text-sm">{label}</p>
              <p className="tabular whitespace-nowrap text-lg font-bold" data-testid={label.startsWith('Slope X') ? 'slope-x' : 'slope-y'}>
                {v === null ? '—' : formatSlope(v, unitSystem)}
              </p>
            </div>
          ))}
        </div>
        <section aria-labelledby="feed-h" className="rounded-2xl border-2 border-rule bg-card p-3">
          <h2 id="feed-h" className="text-lg font-bold">Readings, live</h2>
          <ol className="mt-2 grid max-h-[50vh] gap-1 overflow-auto" data-testid="reading-feed">
            {[...levels].reverse().map((r) => (
              <li key={r.seq} className="flex justify-between gap-2 rounded-lg bg-paper px-3 py-2 tabular">
                <span>#{r.seq} {r.axis.toUpperCase()} @ {formatPosition(r.positionMm, unitSystem)}</span>
                <span>{r.divisions > 0 ? '+' : ''}{r.divisions} div</span>
              </li>
            ))}
            {levels.length === 0 && <li className="text-ink-soft">Waiting for the technician’s first reading.</li>}
          </ol>
        </section>
      </aside>
    </main>
  );
}
