import type { BaseModel, Tolerances } from '@/lib/leveling';
import type { UnitSystem } from '@/lib/leveling/units';
import { slopeNumber, slopeUnit } from './format';

type Props = { model: BaseModel | null; tolerances: Tolerances; unitSystem: UnitSystem };

const FIGURES = [
  { measure: 'tiltXUrad', label: 'Tilt X (across)', tol: 'levelUrad' },
  { measure: 'tiltYUrad', label: 'Tilt Y (along)', tol: 'levelUrad' },
  { measure: 'twistUrad', label: 'Twist over Y travel', tol: 'twistUrad' },
  { measure: 'bowUrad', label: 'Bow over Y travel', tol: 'bowUrad' },
] as const;

/** The base model's figures with ±1σ and pass or fail against the session's tolerances. */
export function BaseNumbers({ model, tolerances, unitSystem }: Props) {
  return (
    <section aria-labelledby="numbers-h" data-testid="base-numbers" className="grid content-start gap-2">
      <h2 id="numbers-h" className="grid text-lg font-bold leading-tight">
        Base model
        <span className="text-sm font-normal text-ink-soft">
          {model ? `from ${model.readingCount} reading${model.readingCount === 1 ? '' : 's'} · ± is 1σ` : 'no readings yet'}
        </span>
      </h2>
      <dl className="grid grid-cols-2 gap-2 md:grid-cols-4 xl:grid-cols-1">
        {FIGURES.map((f) => {
          const observed = model?.observed[f.measure] ?? false;
          const value = model?.state[f.measure] ?? 0;
          const sigma = model?.sigma[f.measure] ?? 0;
          const limit = tolerances[f.tol];
          const within = Math.abs(value) <= limit;
          const verdict = !observed ? 'unmeasured' : within ? 'pass' : 'fail';
          return (
            <div
              key={f.measure}
              data-measure={f.measure}
              data-verdict={verdict}
              className={`grid gap-0.5 rounded-xl border-l-8 bg-steel px-3 py-2 text-paper ${verdict === 'pass' ? 'border-pass' : verdict === 'fail' ? 'border-fail' : 'border-rule'}`}
            >
              <dt className="flex items-center justify-between gap-1 text-sm">
                {f.label}
                <span className={`rounded px-1.5 text-xs font-bold ${verdict === 'pass' ? 'bg-pass' : verdict === 'fail' ? 'bg-fail' : 'bg-ink-soft'}`}>
                  {verdict === 'pass' ? 'within' : verdict === 'fail' ? 'outside' : 'no data'}
                </span>
              </dt>
              <dd className="tabular whitespace-nowrap text-xl font-bold">
                {observed ? (value > 0 ? '+' : value < 0 ? '−' : '') + slopeNumber(Math.abs(value), unitSystem) : '—'}
                {observed && <span className="ml-1 text-xs font-normal">{slopeUnit(unitSystem)}</span>}
              </dd>
              <dd className="tabular text-xs text-paper/80">
                {observed ? `± ${slopeNumber(sigma, unitSystem)} · ` : ''}limit {slopeNumber(limit, unitSystem)}
              </dd>
            </div>
          );
        })}
      </dl>
    </section>
  );
}
