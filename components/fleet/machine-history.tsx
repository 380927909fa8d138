import Link from 'next/link';
import { DueChip } from '@/components/due/due-chip';
import { ExportLinks } from '@/components/session/export-links';
import { convertLength, convertSlope, type UnitSystem } from '@/lib/leveling/units';
import type { SessionStatus } from '@/lib/session/fold';
import type { HistoryPoint, HistoryRow, HistorySeries, MachineDue } from '@/lib/session/history';
import { SERIES_MEASURES, type SeriesMeasure } from '@/lib/session/series';

const W = 300;
const H = 150;
const PAD = { left: 70, right: 14, top: 10, bottom: 24 };
const GREEN = '#1b7a3d';
const RED = '#b3261e';
const INK_SOFT = '#4a525c';

/** A value in the user's units: slopes as in/10 in or mm/m, the sweep TIR as in or µm. */
function shown(unit: HistorySeries['unit'], value: number, system: UnitSystem): number {
  if (unit === 'um') return system === 'inch' ? convertLength(value, 'um', 'in') : value;
  return convertSlope(value, 'urad', system === 'inch' ? 'in/10in' : 'mm/m');
}
const unitText = (unit: HistorySeries['unit'], system: UnitSystem) => (unit === 'um' ? (system === 'inch' ? 'in' : 'µm') : system === 'inch' ? 'in/10 in' : 'mm/m');
const places = (unit: HistorySeries['unit'], system: UnitSystem) => (system === 'inch' ? (unit === 'um' ? 4 : 5) : unit === 'um' ? 1 : 3);
const figure = (unit: HistorySeries['unit'], value: number, system: UnitSystem) => shown(unit, value, system).toFixed(places(unit, system));

const day = (iso: string) => new Date(iso).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });
const dayOf = (date: string) => day(`${date}T00:00:00Z`);

const stateLook: Record<SessionStatus, { text: string; cls: string }> = {
  live: { text: 'Live', cls: 'bg-rule text-ink' },
  ended: { text: 'Ended, not reviewed', cls: 'bg-rule text-ink' },
  in_review: { text: 'In review', cls: 'bg-bubble text-ink' },
  returned: { text: 'Returned', cls: 'bg-fail text-white' },
  approved: { text: 'Approved', cls: 'bg-pass text-white' },
};

function StateChip({ status }: { status: SessionStatus }) {
  return <span className={`inline-block rounded-full px-3 py-1 text-sm font-bold whitespace-nowrap ${stateLook[status].cls}`}>{stateLook[status].text}</span>;
}

const replayHref = (sessionId: string) => `/sessions/${sessionId}/replay`;

/** A point's marker; a link to the session's replay when the viewer may open it. */
function Marker({ p, kind, cx, cy, label }: { p: HistoryPoint; kind: 'found' | 'left'; cx: number; cy: number; label: string }) {
  const colour = p.within ? GREEN : RED;
  const shape =
    kind === 'found' ? (
      <circle cx={cx} cy={cy} r={5} fill={colour} stroke="#fff" strokeWidth={1.5} />
    ) : (
      <rect x={cx - 4.5} y={cy - 4.5} width={9} height={9} transform={`rotate(45 ${cx} ${cy})`} fill="#fff" stroke={colour} strokeWidth={2.5} />
    );
  const body = (
    <>
      {shape}
      <title>{label}</title>
    </>
  );
  return p.mayOpen ? (
    <a href={replayHref(p.sessionId)} aria-label={label} data-point={kind} data-session={p.sessionId}>
      {body}
    </a>
  ) : (
    <g data-point={kind} data-session={p.sessionId}>
      {body}
    </g>
  );
}

function HistoryChart({ series, system, t0, t1 }: { series: HistorySeries; system: UnitSystem; t0: number; t1: number }) {
  const unit = unitText(series.unit, system);
  const tol = shown(series.unit, series.tolerance, system);
  const all = [...series.asFound, ...series.asLeft].map((p) => shown(series.unit, p.value, system));
  const top = Math.max(tol * 1.6, ...all.map((v) => Math.abs(v) * 1.15));
  const bottom = series.signed ? -top : 0;
  const span = t1 - t0;
  const x = (iso: string) => (span > 0 ? PAD.left + 8 + ((Date.parse(iso) - t0) / span) * (W - PAD.left - PAD.right - 16) : (PAD.left + W - PAD.right) / 2);
  const y = (v: number) => PAD.top + ((top - Math.max(bottom, Math.min(top, v))) / (top - bottom)) * (H - PAD.top - PAD.bottom);
  const fmt = (v: number) => v.toFixed(places(series.unit, system));
  const labelsApart = Math.abs(y(0) - y(tol)) >= 13;
  const axisLabels = labelsApart
    ? [{ y: y(tol), text: `${series.signed ? '+' : ''}${fmt(tol)}` }, { y: y(0), text: '0' }, ...(series.signed ? [{ y: y(-tol), text: fmt(-tol) }] : [])]
    : [{ y: series.signed ? y(0) : y(tol), text: series.signed ? `±${fmt(tol)}` : fmt(tol) }];
  const pointLabel = (p: HistoryPoint, what: string) =>
    `${what} ${day(p.at)}: ${fmt(shown(series.unit, p.value, system))} ${unit} (${p.within ? 'within' : 'outside'} tolerance)${p.approved ? ', approved' : ''}${p.mayOpen ? ' — open the replay' : ''}`;
  const lastFound = series.asFound.at(-1);
  const lastLeft = series.asLeft.at(-1);
  return (
    <figure className="grid gap-1 rounded-xl border-2 border-rule bg-card p-2" data-measure={series.measure}>
      <figcaption className="grid text-sm">
        <span className="font-semibold">{series.label}</span>
        <span className="tabular text-ink-soft">
          {lastFound && lastLeft ? (
            <>
              last visit: found <b className={lastFound.within ? 'text-pass' : 'text-fail'}>{fmt(shown(series.unit, lastFound.value, system))}</b>, left{' '}
              <b className={lastLeft.within ? 'text-pass' : 'text-fail'}>{fmt(shown(series.unit, lastLeft.value, system))}</b> {unit}
            </>
          ) : (
            'not measured yet'
          )}
        </span>
      </figcaption>
      <svg viewBox={`0 0 ${W} ${H}`} className="w-full" role="img" aria-label={`${series.label} across visits: ${series.asFound.length} sessions, tolerance ${fmt(tol)} ${unit}`}>
        <rect x={PAD.left} width={W - PAD.left - PAD.right} y={y(tol)} height={y(series.signed ? -tol : 0) - y(tol)} fill={GREEN} opacity={0.14} />
        <line x1={PAD.left} x2={W - PAD.right} y1={y(tol)} y2={y(tol)} stroke={GREEN} strokeDasharray="4 3" />
        {series.signed && <line x1={PAD.left} x2={W - PAD.right} y1={y(-tol)} y2={y(-tol)} stroke={GREEN} strokeDasharray="4 3" />}
        <line x1={PAD.left} x2={W - PAD.right} y1={y(0)} y2={y(0)} stroke={INK_SOFT} strokeWidth={0.8} />
        <line x1={PAD.left} x2={PAD.left} y1={PAD.top} y2={H - PAD.bottom} stroke={INK_SOFT} strokeWidth={0.8} />
        {axisLabels.map((l) => (
          <text key={l.text} x={PAD.left - 4} y={l.y + 4} textAnchor="end" fontSize={12} fill={INK_SOFT} className="tabular">
            {l.text}
          </text>
        ))}
        {series.asLeft.length > 1 && (
          <polyline points={series.asLeft.map((p) => `${x(p.at)},${y(shown(series.unit, p.value, system))}`).join(' ')} fill="none" stroke={INK_SOFT} strokeWidth={1.2} strokeDasharray="3 3" />
        )}
        {series.asFound.length > 1 && (
          <polyline points={series.asFound.map((p) => `${x(p.at)},${y(shown(series.unit, p.value, system))}`).join(' ')} fill="none" stroke="#2b3440" strokeWidth={1.8} />
        )}
        {series.asLeft.map((p) => (
          <Marker key={`l${p.sessionId}`} p={p} kind="left" cx={x(p.at)} cy={y(shown(series.unit, p.value, system))} label={pointLabel(p, 'As-left')} />
        ))}
        {series.asFound.map((p) => (
          <Marker key={`f${p.sessionId}`} p={p} kind="found" cx={x(p.at)} cy={y(shown(series.unit, p.value, system))} label={pointLabel(p, 'As-found')} />
        ))}
        {span > 0 && (
          <>
            <text x={PAD.left} y={H - 6} fontSize={12} fill={INK_SOFT}>
              {day(new Date(t0).toISOString())}
            </text>
            <text x={W - PAD.right} y={H - 6} fontSize={12} fill={INK_SOFT} textAnchor="end">
              {day(new Date(t1).toISOString())}
            </text>
          </>
        )}
      </svg>
    </figure>
  );
}

function EndsCell({ row, measure, unit, system }: { row: HistoryRow; measure: SeriesMeasure; unit: HistorySeries['unit']; system: UnitSystem }) {
  const { asFound, asLeft } = row.measures[measure];
  if (!asFound || !asLeft) return <td className="px-2 py-2 text-ink-soft">—</td>;
  return (
    <td className="tabular px-2 py-2 whitespace-nowrap">
      <span className={`block ${asFound.within ? 'text-pass' : 'text-fail'}`} title="as-found">
        {figure(unit, asFound.value, system)}
      </span>
      <span className={`block font-bold ${asLeft.within ? 'text-pass' : 'text-fail'}`} title="as-left">
        {figure(unit, asLeft.value, system)}
      </span>
    </td>
  );
}

export type MachineHistoryProps = {
  rows: HistoryRow[];
  series: Record<SeriesMeasure, HistorySeries>;
  due: MachineDue;
  checkIntervalMonths: number;
  unitSystem: UnitSystem;
  /** Admins may import a session's record from a file. */
  mayImport?: boolean;
};

/**
 * The machine across visits: each ended session's as-found (dots, solid line) and as-left (diamonds, dashed line)
 * per measure on a chart with the tolerance band, so a floor or foundation settling shows as a drift of the as-found
 * values; the sessions in a table; the next due date. Server-renderable; every figure in the user's units.
 */
export function MachineHistory({ rows, series, due, checkIntervalMonths, unitSystem, mayImport = false }: MachineHistoryProps) {
  const times = SERIES_MEASURES.flatMap((m) => [...series[m].asFound, ...series[m].asLeft].map((p) => Date.parse(p.at)));
  const t0 = times.length > 0 ? Math.min(...times) : 0;
  const t1 = times.length > 0 ? Math.max(...times) : 0;
  return (
    <section aria-labelledby="history-h" className="grid gap-3 rounded-xl border-2 border-rule bg-paper p-4" data-testid="machine-history">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h2 id="history-h" className="text-xl font-bold">
          Leveling history
        </h2>
        <p className="flex flex-wrap items-center gap-2" data-testid="history-due">
          <span>
            Next check{' '}
            <b className="tabular">{due.nextDueOn ? dayOf(due.nextDueOn) : 'now'}</b>
            <span className="text-ink-soft">
              {due.lastLeveledOn ? ` · every ${checkIntervalMonths} months from the last leveling, ${dayOf(due.lastLeveledOn)}` : ' · never leveled on record'}
            </span>
          </span>
          <DueChip status={due.status} neverLeveled={due.lastLeveledOn === null} />
        </p>
      </div>
      {rows.length === 0 ? (
        <p className="text-ink-soft">No ended session for this machine yet. Once a session ends, its as-found and as-left show here.</p>
      ) : (
        <>
          <p className="text-sm text-ink-soft">
            One point per session: <span aria-hidden>●</span> as-found (first round), <span aria-hidden>◇</span> as-left (last round); green band = tolerance of the
            latest session; red = outside. A drift of the as-found values from visit to visit points at the floor or foundation settling.
          </p>
          <div className="grid grid-cols-1 gap-2 sm:grid-cols-2 xl:grid-cols-3">
            {SERIES_MEASURES.map((m) => (
              <HistoryChart key={m} series={series[m]} system={unitSystem} t0={t0} t1={t1} />
            ))}
          </div>
          <div className="overflow-x-auto rounded-xl border-2 border-rule bg-card">
            <table className="w-full text-left">
              <caption className="sr-only">Sessions of this machine, oldest first: as-found above as-left per measure</caption>
              <thead className="border-b-2 border-rule text-sm">
                <tr>
                  <th className="px-3 py-2 align-bottom">
                    Session <span className="block font-normal text-ink-soft">each measure: as-found, then as-left (bold)</span>
                  </th>
                  {SERIES_MEASURES.map((m) => (
                    <th key={m} className="px-2 py-2 align-bottom">
                      {shortLabel[m]}
                      <span className="block font-normal text-ink-soft">{unitText(series[m].unit, unitSystem)}</span>
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {rows.map((r) => (
                  <tr key={r.sessionId} className="border-b border-rule align-top last:border-0" data-session={r.sessionId}>
                    <td className="grid min-w-80 gap-1 px-3 py-2">
                      <span className="flex flex-wrap items-center gap-2">
                        <b className="tabular whitespace-nowrap">{r.openedAt ? day(r.openedAt) : '—'}</b>
                        <StateChip status={r.status} />
                      </span>
                      <span className="text-sm text-ink-soft">{r.technicianName ?? '—'}</span>
                      {r.mayOpen ? (
                        <span className="flex flex-wrap gap-2">
                          <Link href={replayHref(r.sessionId)} className="inline-flex min-h-10 items-center rounded-lg bg-spirit px-3 text-sm font-semibold text-white hover:bg-spirit-deep">
                            Replay
                          </Link>
                          <ExportLinks sessionId={r.sessionId} compact />
                        </span>
                      ) : (
                        <span className="text-sm text-ink-soft">You took no part in this session.</span>
                      )}
                    </td>
                    {SERIES_MEASURES.map((m) => (
                      <EndsCell key={m} row={r} measure={m} unit={series[m].unit} system={unitSystem} />
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </>
      )}
      {mayImport && (
        <p className="text-sm">
          <Link href="/sessions/import" className="font-semibold underline underline-offset-4 hover:text-spirit">
            Import a session’s record from a file
          </Link>
        </p>
      )}
    </section>
  );
}

const shortLabel: Record<SeriesMeasure, string> = { tiltX: 'Tilt X', tiltY: 'Tilt Y', twist: 'Twist', bow: 'Bow', sweepTir: 'Sweep TIR' };
