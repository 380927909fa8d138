'use client';

import { useMemo, type ReactNode } from 'react';
import { signedTurns } from '@/components/coach/format';
import { formatLength, formatSlope, type UnitSystem } from '@/lib/leveling/units';
import type { SessionState } from '@/lib/session/fold';
import { STAGE_GUIDES } from '@/lib/session/stages';
import { summarizeSession, type InstrumentFact, type MeasureRow, type SummaryFacts } from '@/lib/session/summary';

type Props = {
  sessionId: string;
  state: SessionState;
  units: UnitSystem;
  /** The visit's instruments with their calibration dates (the panel judges them on the session's first day). */
  instruments?: InstrumentFact[];
  /** First and last event times and live stretches (summary's timesOf(events)); without them the state's own times serve. */
  times?: Pick<SummaryFacts, 'startedAt' | 'lastEventAt' | 'liveSpans'>;
};

type Verdict = 'pass' | 'fail' | 'warn' | 'none';
const chipLook: Record<Verdict, string> = { pass: 'bg-pass text-white', fail: 'bg-fail text-white', warn: 'bg-bubble text-ink', none: 'bg-rule text-ink' };

function Chip({ verdict, children }: { verdict: Verdict; children: ReactNode }) {
  return <span className={`inline-block whitespace-nowrap rounded-full px-2.5 py-0.5 text-xs font-bold ${chipLook[verdict]}`}>{children}</span>;
}

const verdictOf = (pass: boolean | null | undefined): Verdict => (pass === true ? 'pass' : pass === false ? 'fail' : 'none');

/** A measure's value in the user's units; signed measures carry their sign unless the digits shown are all zero. */
function figure(value: number, row: Pick<MeasureRow, 'unit' | 'signed'>, units: UnitSystem): string {
  const text = row.unit === 'urad' ? formatSlope(Math.abs(value), units) : formatLength(Math.abs(value), units);
  // Only the number counts: the unit "in/10 in" has digits of its own.
  return row.signed && /[1-9]/.test(text.split(' ')[0] ?? '') ? `${value > 0 ? '+' : '−'}${text}` : text;
}

function tolerance(row: MeasureRow, units: UnitSystem): string {
  if (row.tolerance === null) return 'shown only';
  const t = row.unit === 'urad' ? formatSlope(row.tolerance, units) : formatLength(row.tolerance, units);
  return row.signed ? `± ${t}` : `≤ ${t}`;
}

const heightText = (mm: number, units: UnitSystem) => (units === 'inch' ? formatLength(mm * 1000, 'inch') : `${mm.toFixed(3)} mm`);

function duration(ms: number | null): string {
  if (ms === null) return 'unknown';
  const minutes = Math.round(ms / 60_000);
  const h = Math.floor(minutes / 60);
  return h > 0 ? `${h} h ${String(minutes % 60).padStart(2, '0')} min` : `${minutes} min`;
}

const calibrationLook = {
  current: { label: 'In calibration', verdict: 'pass' },
  'due-soon': { label: 'Due soon', verdict: 'warn' },
  expired: { label: 'Past due', verdict: 'fail' },
} as const;

/**
 * The record's summary: as found against as left for every measure with its tolerance and verdict, screw heights,
 * rounds, duration, moves per screw, instruments and photos, in the user's units. Pure view of a folded state: it
 * fetches nothing (photo thumbnails load from the session's photo route).
 */
export function SummaryPanel({ sessionId, state, units, instruments, times }: Props) {
  const summary = useMemo(() => summarizeSession(state, { ...times, instruments }), [state, times, instruments]);
  const verdictText = { pass: 'As left: within tolerance', fail: 'As left: out of tolerance', incomplete: 'As left: incomplete' }[summary.asLeftVerdict];
  const lastRound = summary.measures.some((m) => m.asLeft.value !== null && 'source' in m.asLeft && m.asLeft.source === 'last-round');

  return (
    <section aria-labelledby="summary-h" data-testid="summary-panel" className="grid content-start gap-4 rounded-2xl border-2 border-rule bg-card p-4">
      <header className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="summary-h" className="text-xl font-bold">
          Summary
        </h2>
        <span data-testid="as-left-verdict" data-verdict={summary.asLeftVerdict} className={`rounded-full px-3 py-1 text-sm font-bold ${summary.asLeftVerdict === 'pass' ? 'bg-pass text-white' : summary.asLeftVerdict === 'fail' ? 'bg-fail text-white' : 'bg-bubble text-ink'}`}>
          {verdictText}
        </span>
      </header>

      <ul className="grid gap-2 sm:hidden" aria-label="As found and as left">
        {summary.measures.map((m) => (
          <li key={m.measure} data-measure={m.measure} className="grid gap-1 rounded-lg bg-paper px-3 py-2 text-sm">
            <span className="font-semibold">{m.label}</span>
            <span className="text-xs text-ink-soft">tolerance {tolerance(m, units)}</span>
            {(['as found', 'as left'] as const).map((side, i) => {
              const v = i === 0 ? m.asFound : m.asLeft;
              return (
                <span key={side} className="flex flex-wrap items-center gap-1.5">
                  <span className="w-16 text-xs text-ink-soft">{side}</span>
                  {v.value === null ? (
                    <span className="text-ink-soft">not measured</span>
                  ) : (
                    <>
                      <span className={`tabular ${v.pass === false ? 'font-bold text-fail' : ''}`}>{figure(v.value, m, units)}</span>
                      {v.pass !== null && <Chip verdict={verdictOf(v.pass)}>{v.pass ? 'pass' : 'fail'}</Chip>}
                    </>
                  )}
                </span>
              );
            })}
          </li>
        ))}
      </ul>

      <div className="hidden overflow-x-auto sm:block">
        <table className="w-full min-w-[36rem] border-collapse text-sm">
          <caption className="sr-only">As found and as left, with tolerances</caption>
          <thead>
            <tr className="border-b-2 border-ink text-left">
              <th scope="col" className="py-1.5 pr-2">Measure</th>
              <th scope="col" className="py-1.5 pr-2">Tolerance</th>
              <th scope="col" className="py-1.5 pr-2">As found</th>
              <th scope="col" className="py-1.5 pr-2">As left</th>
            </tr>
          </thead>
          <tbody>
            {summary.measures.map((m) => (
              <tr key={m.measure} data-measure={m.measure} className="border-b border-rule align-top">
                <th scope="row" className="py-1.5 pr-2 text-left font-semibold">{m.label}</th>
                <td className="tabular py-1.5 pr-2 whitespace-nowrap">{tolerance(m, units)}</td>
                {[m.asFound, m.asLeft].map((v, i) => (
                  <td key={i} className="py-1.5 pr-2" data-side={i === 0 ? 'as-found' : 'as-left'}>
                    {v.value === null ? (
                      <span className="text-ink-soft" title={v.reason}>
                        not measured
                      </span>
                    ) : (
                      <span className="flex flex-wrap items-center gap-1.5">
                        <span className={`tabular whitespace-nowrap ${v.pass === false ? 'font-bold text-fail' : ''}`}>{figure(v.value, m, units)}</span>
                        {v.pass !== null && <Chip verdict={verdictOf(v.pass)}>{v.pass ? 'pass' : 'fail'}</Chip>}
                        {'source' in v && v.source === 'last-round' && <span className="text-xs text-ink-soft">({STAGE_GUIDES[v.stage].title})</span>}
                      </span>
                    )}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="-mt-2 text-xs text-ink-soft">
        As found: each measure’s first completed round. As left: the last lock-and-as-left round{lastRound ? '; where it lacks a measure, its last round (stage named)' : ''}.
      </p>

      {summary.heights.length > 0 && (
        <div className="overflow-x-auto">
          <h3 className="mb-1 font-bold">Screw heights</h3>
          <table className="w-full border-collapse text-sm">
            <thead>
              <tr className="border-b-2 border-ink text-left">
                <th scope="col" className="py-1 pr-2">Screw</th>
                <th scope="col" className="hidden py-1 pr-2 sm:table-cell">Specified</th>
                <th scope="col" className="py-1 pr-2">As found</th>
                <th scope="col" className="py-1 pr-2">As left</th>
              </tr>
            </thead>
            <tbody>
              {summary.heights.map((h) => (
                <tr key={h.screwId} data-screw={h.label} className="border-b border-rule align-top">
                  <th scope="row" className="py-1 pr-2 text-left">
                    {h.label}
                    <span className="block text-xs font-normal text-ink-soft sm:hidden">{h.specifiedHeightMm === null ? 'no spec' : `spec ${heightText(h.specifiedHeightMm, units)}`}</span>
                  </th>
                  <td className="tabular hidden py-1 pr-2 whitespace-nowrap sm:table-cell">{h.specifiedHeightMm === null ? '—' : `${heightText(h.specifiedHeightMm, units)} ± ${heightText(h.toleranceMm, units)}`}</td>
                  {[h.asFound, h.asLeft].map((f, i) => (
                    <td key={i} className="py-1 pr-2">
                      {'heightMm' in f ? (
                        <span className="flex flex-wrap items-center gap-1.5">
                          <span className="tabular whitespace-nowrap">{heightText(f.heightMm, units)}</span>
                          {f.pass !== null && <Chip verdict={verdictOf(f.pass)}>{f.pass ? 'pass' : 'fail'}</Chip>}
                          {i === 1 && h.raisedSinceUm !== 0 && <span className="text-xs text-ink-soft">moved {formatLength(h.raisedSinceUm, units)} since</span>}
                        </span>
                      ) : (
                        <span className="text-ink-soft">not read</span>
                      )}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}

      <dl className="grid grid-cols-2 gap-2 text-sm sm:grid-cols-4">
        {[
          ['Adjustment rounds', String(summary.rounds.count)],
          ['Moves done', `${summary.moves.done} of ${summary.moves.sent}${summary.moves.cannot ? ` · ${summary.moves.cannot} can’t` : ''}`],
          ['Opening to last entry', duration(summary.duration.totalMs)],
          ['Time live', summary.duration.liveMs === null ? 'unknown' : duration(summary.duration.liveMs)],
        ].map(([k, v]) => (
          <div key={k} className="rounded-lg bg-paper px-3 py-2">
            <dt className="text-xs text-ink-soft">{k}</dt>
            <dd className="tabular text-lg font-bold" data-fact={k}>
              {v}
            </dd>
          </div>
        ))}
      </dl>

      {summary.moves.done > 0 && (
        <div>
          <h3 className="mb-1 font-bold">Moves made, per screw</h3>
          <ul className="flex flex-wrap gap-2 text-sm">
            {summary.moves.byScrew
              .filter((m) => m.done > 0)
              .map((m) => (
                <li key={m.screwId} className="rounded-lg border border-rule px-2.5 py-1">
                  <b>{m.label}</b> <span className="tabular">{signedTurns(m.turns)} turn</span> ·{' '}
                  <span className={m.raiseUm >= 0 ? 'text-pass' : 'text-fail'}>
                    {m.raiseUm >= 0 ? '▲ raise' : '▼ lower'} {formatLength(Math.abs(m.raiseUm), units)}
                  </span>
                </li>
              ))}
          </ul>
        </div>
      )}

      <div>
        <h3 className="mb-1 font-bold">Instruments</h3>
        {summary.instruments.length === 0 ? (
          <p className="text-sm text-ink-soft">No instruments recorded for this visit.</p>
        ) : (
          <ul className="grid gap-1 text-sm">
            {summary.instruments.map((i) => (
              <li key={`${i.kind}:${i.serial}`} className="flex flex-wrap items-center gap-2" data-instrument={i.serial}>
                <span className="font-semibold capitalize">{i.kind}</span>
                <span>
                  {i.model} · <span className="tabular">{i.serial}</span>
                </span>
                <span className="text-ink-soft">
                  calibrated {i.calibratedOn ?? 'date not recorded'}, due {i.calibrationDue}
                </span>
                {i.certificateLater ? (
                  <Chip verdict="warn">Unknown at the visit: the certificate on file is later</Chip>
                ) : (
                  <Chip verdict={calibrationLook[i.status].verdict}>{calibrationLook[i.status].label} at the visit</Chip>
                )}
                {i.overrideReason && <span className="text-xs text-ink-soft">override: {i.overrideReason}</span>}
              </li>
            ))}
          </ul>
        )}
      </div>

      <div>
        <h3 className="mb-1 font-bold">Photos</h3>
        {summary.photos.length === 0 ? (
          <p className="text-sm text-ink-soft">No photos.</p>
        ) : (
          <ul className="grid grid-cols-3 gap-2 sm:grid-cols-5">
            {summary.photos.map((p) => (
              <li key={p.photoId}>
                <a href={`/api/sessions/${sessionId}/photos/${p.photoId}`} target="_blank" rel="noreferrer" className="grid gap-1 rounded-lg text-xs hover:bg-paper">
                  <img src={`/api/sessions/${sessionId}/photos/${p.photoId}${p.hasThumb ? '?size=thumb' : ''}`} alt={p.caption || `Photo at ${STAGE_GUIDES[p.stage].title}`} className="aspect-square w-full rounded object-cover" loading="lazy" />
                  <span className="truncate font-semibold">{STAGE_GUIDES[p.stage].title}</span>
                  {p.caption && <span className="truncate text-ink-soft">{p.caption}</span>}
                </a>
              </li>
            ))}
          </ul>
        )}
      </div>
    </section>
  );
}
