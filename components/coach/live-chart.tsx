import { convertLength, convertSlope, type UnitSystem } from '@/lib/leveling/units';
import { SERIES_MEASURES, withinTolerance, type Series } from '@/lib/session/series';
import { STAGE_GUIDES } from '@/lib/session/stages';
import { clock } from './format';

const W = 280;
const H = 140;
const PAD = { left: 70, right: 10, top: 10, bottom: 22 };

/** A value in the user's units: slopes as in/10 in or mm/m, the sweep TIR as in or µm. */
function shown(series: Series, value: number, system: UnitSystem): number {
  if (series.unit === 'um') return system === 'inch' ? convertLength(value, 'um', 'in') : value;
  return convertSlope(value, 'urad', system === 'inch' ? 'in/10in' : 'mm/m');
}
const unitOf = (series: Series, system: UnitSystem) => (series.unit === 'um' ? (system === 'inch' ? 'in' : 'µm') : system === 'inch' ? 'in/10 in' : 'mm/m');
const places = (series: Series, system: UnitSystem) => (system === 'inch' ? (series.unit === 'um' ? 4 : 5) : series.unit === 'um' ? 1 : 3);

/** Labels of the tolerance lines and zero; when the band is too narrow to label each line apart, one ± label. */
function axisLabels(signed: boolean, tol: number, y: (v: number) => number, fmt: (v: number) => string): { y: number; text: string }[] {
  const apart = Math.abs(y(0) - y(tol)) >= 13;
  if (!apart) return [{ y: signed ? y(0) : y(tol), text: signed ? `±${fmt(tol)}` : fmt(tol) }];
  return [
    { y: y(tol), text: `${signed ? '+' : ''}${fmt(tol)}` },
    { y: y(0), text: '0' },
    ...(signed ? [{ y: y(-tol), text: fmt(-tol) }] : []),
  ];
}

function Chart({ series, system, t0, t1 }: { series: Series; system: UnitSystem; t0: number; t1: number }) {
  const pts = series.points;
  const tol = shown(series, series.tolerance, system);
  const values = pts.map((p) => shown(series, p.value, system));
  const top = Math.max(tol * 1.6, ...values.map((v) => Math.abs(v) * 1.15));
  const bottom = series.signed ? -top : 0;
  const x = (iso: string) => {
    const t = Date.parse(iso);
    return t1 > t0 ? PAD.left + ((t - t0) / (t1 - t0)) * (W - PAD.left - PAD.right) : (PAD.left + W - PAD.right) / 2;
  };
  const y = (v: number) => PAD.top + ((top - v) / (top - bottom)) * (H - PAD.top - PAD.bottom);
  const fmt = (v: number) => v.toFixed(places(series, system));
  const last = pts.at(-1);
  const lastOk = last ? withinTolerance(series, last.value) : null;
  return (
    <figure className="grid gap-1 rounded-xl bg-paper p-2" data-measure={series.measure}>
      <figcaption className="grid text-sm">
        <span className="font-semibold">{series.label}</span>
        <span className={`tabular font-bold ${lastOk === null ? 'text-ink-soft' : lastOk ? 'text-pass' : 'text-fail'}`}>
          {last ? `${fmt(values.at(-1)!)} ${unitOf(series, system)}` : 'no round yet'}
        </span>
      </figcaption>
      <svg viewBox={`0 0 ${W} ${H}`} className="w-full" role="img" aria-label={`${series.label}: ${pts.length} rounds, tolerance ${fmt(tol)} ${unitOf(series, system)}`}>
        {/* The tolerance band. */}
        <rect x={PAD.left} width={W - PAD.left - PAD.right} y={y(tol)} height={y(series.signed ? -tol : 0) - y(tol)} fill="#1b7a3d" opacity={0.14} />
        <line x1={PAD.left} x2={W - PAD.right} y1={y(tol)} y2={y(tol)} stroke="#1b7a3d" strokeDasharray="4 3" />
        {series.signed && <line x1={PAD.left} x2={W - PAD.right} y1={y(-tol)} y2={y(-tol)} stroke="#1b7a3d" strokeDasharray="4 3" />}
        <line x1={PAD.left} x2={W - PAD.right} y1={y(0)} y2={y(0)} stroke="#4a525c" strokeWidth={0.8} />
        <line x1={PAD.left} x2={PAD.left} y1={PAD.top} y2={H - PAD.bottom} stroke="#4a525c" strokeWidth={0.8} />
        {axisLabels(series.signed, tol, y, fmt).map((l) => (
          <text key={l.text} x={PAD.left - 4} y={l.y + 4} textAnchor="end" fontSize={12} fill="#4a525c" className="tabular">
            {l.text}
          </text>
        ))}
        {pts.length > 1 && <polyline points={pts.map((p, i) => `${x(p.at)},${y(values[i]!)}`).join(' ')} fill="none" stroke="#2b3440" strokeWidth={1.5} />}
        {pts.map((p, i) => i < pts.length - MAX_DOTS ? null : (
          <circle key={p.seq} cx={x(p.at)} cy={y(Math.max(bottom, Math.min(top, values[i]!)))} r={4} fill={withinTolerance(series, p.value) ? '#1b7a3d' : '#b3261e'} stroke="#fff">
            <title>{`#${p.seq} ${STAGE_GUIDES[p.stage].title} ${clock(p.at)}: ${fmt(values[i]!)} ${unitOf(series, system)}`}</title>
          </circle>
        ))}
        {pts.length > 0 && (
          <>
            <text x={PAD.left} y={H - 6} fontSize={12} fill="#4a525c">
              {clock(pts[0]!.at).slice(0, 5)}
            </text>
            <text x={W - PAD.right} y={H - 6} fontSize={12} fill="#4a525c" textAnchor="end">
              {new Date(t1).toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit' })}
            </text>
          </>
        )}
      </svg>
    </figure>
  );
}

/**
 * Each measure over the session's rounds, with its tolerance band (green): the live chart. `spanMs` fixes the time
 * axis (the replay passes the whole session's, so the axis stays put as the playhead moves); by default it runs from
 * the first point to the last.
 */
/** Rounds drawn as dots (the latest); earlier ones are on the line only, so a long session keeps a light chart. */
const MAX_DOTS = 80;

export function LiveChart({ series, unitSystem, spanMs }: { series: Record<(typeof SERIES_MEASURES)[number], Series>; unitSystem: UnitSystem; spanMs?: { t0: number; t1: number } }) {
  const times = SERIES_MEASURES.flatMap((m) => series[m].points.map((p) => Date.parse(p.at)));
  const t0 = spanMs ? spanMs.t0 : times.length > 0 ? Math.min(...times) : 0;
  const t1 = spanMs ? spanMs.t1 : times.length > 0 ? Math.max(...times) : 0;
  return (
    <section aria-labelledby="chart-h" className="grid gap-2" data-testid="live-chart">
      <h2 id="chart-h" className="flex flex-wrap items-baseline justify-between gap-2 text-lg font-bold">
        Measures by round
        <span className="text-sm font-normal text-ink-soft">one point per completed round · green band = tolerance · red point = outside</span>
      </h2>
      <div className="grid grid-cols-2 gap-2 xl:grid-cols-3">
        {SERIES_MEASURES.map((m) => (
          <Chart key={m} series={series[m]} system={unitSystem} t0={t0} t1={t1} />
        ))}
      </div>
    </section>
  );
}
