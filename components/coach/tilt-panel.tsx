'use client';

import { useState } from 'react';
import type { UnitSystem } from '@/lib/leveling/units';
import { HeightLegend } from '@/components/viewer/dom/height-legend';
import { EXAGGERATIONS, baseExtentMm, fittingExaggeration, heightRangeUm, type BaseShape } from '@/components/viewer/surface';
import { TiltView, type SceneMove, type SceneScrew } from '@/components/viewer/tilt-view';

type Props = {
  screws: SceneScrew[];
  table: { lengthMm: number; widthMm: number };
  travelMm: number;
  shape: BaseShape | null;
  level: { axis: 'x' | 'y'; positionMm: number } | null;
  sweep: { diameterMm: number; label: string } | null;
  moves: SceneMove[];
  unitSystem: UnitSystem;
};

/** The tilt view with its exaggeration slider, colour key and "reset view". */
export function TiltPanel({ screws, table, travelMm, shape, level, sweep, moves, unitSystem }: Props) {
  const { halfX, halfY } = baseExtentMm(screws, table);
  const range = heightRangeUm(shape, travelMm, halfX, halfY);
  const peakUm = Math.max(Math.abs(range.minUm), Math.abs(range.maxUm));
  // Until the expert picks one, the exaggeration follows the model so its shape is always plain to see.
  const [chosen, setChosen] = useState<number | null>(null);
  const exaggeration = chosen ?? fittingExaggeration(range, Math.max(halfX, halfY));
  const [resetKey, setResetKey] = useState(0);
  const step = Math.max(0, EXAGGERATIONS.findIndex((e) => e >= exaggeration));
  return (
    <section aria-labelledby="tilt-h" className="grid gap-2">
      <h2 id="tilt-h" className="sr-only">
        Tilt view
      </h2>
      <div className="relative h-[27rem] overflow-hidden rounded-2xl border-2 border-ink bg-[#e9e6dc]">
        <TiltView screws={screws} table={table} travelMm={travelMm} shape={shape} exaggeration={exaggeration} level={level} sweep={sweep} moves={moves} resetKey={resetKey} />
        <p className="pointer-events-none absolute left-3 top-2 max-w-[calc(100%-9rem)] rounded bg-paper/90 px-2 py-1 text-sm leading-snug">
          Heights drawn <b className="tabular">×{exaggeration.toLocaleString('en')}</b>
          {chosen === null && ' (fitted)'} · dashed = level · drag to turn
        </p>
        {!shape && (
          <p className="pointer-events-none absolute inset-x-0 top-1/3 mx-auto w-fit rounded-lg bg-paper/95 px-4 py-2 text-ink-soft">
            No level readings yet: the base is drawn flat.
          </p>
        )}
        <button
          type="button"
          onClick={() => setResetKey((k) => k + 1)}
          className="absolute right-2 top-2 min-h-10 rounded-lg border-2 border-ink bg-card px-3 font-semibold hover:bg-paper"
        >
          Reset view
        </button>
      </div>
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div className="flex flex-wrap items-center gap-3">
        <label className="flex items-center gap-3 font-semibold" htmlFor="exaggeration">
          Exaggeration
        </label>
        <input
          id="exaggeration"
          type="range"
          min={0}
          max={EXAGGERATIONS.length - 1}
          step={1}
          value={step}
          aria-valuetext={`×${exaggeration}`}
          onChange={(e) => setChosen(EXAGGERATIONS[Number(e.target.value)] ?? exaggeration)}
          className="w-40 accent-spirit"
        />
        <span className="tabular">×{exaggeration.toLocaleString('en')}</span>
        {chosen !== null && (
          <button type="button" className="text-sm underline underline-offset-4 hover:text-spirit" onClick={() => setChosen(null)}>
            Fit to the model
          </button>
        )}
        </div>
        <HeightLegend peakUm={peakUm} unitSystem={unitSystem} />
      </div>
    </section>
  );
}
