/**
 * The measures of a session over time, for the coach view's live chart: one point per completed round of a stage.
 * Pure; reads a folded SessionState only.
 */
import { analyzeSweep, analyzeTravel, type TravelPoint } from '@/lib/leveling';
import { readingKey, stagePlan, tolerancesOf } from './derive';
import type { RecordedReading, SessionState } from './fold';
import { SESSION_STAGES, type SessionStage } from './stages';

export const SERIES_MEASURES = ['tiltX', 'tiltY', 'twist', 'bow', 'sweepTir'] as const;
export type SeriesMeasure = (typeof SERIES_MEASURES)[number];

/** One value of a measure: the seq and server time of the reading that completed (or last changed) its round. */
export type SeriesPoint = { seq: number; at: string; value: number; stage: SessionStage };

export type Series = {
  measure: SeriesMeasure;
  label: string;
  /** 'urad' for slopes and slope changes, 'um' for the sweep's TIR. */
  unit: 'urad' | 'um';
  /** Within tolerance when |value| ≤ tolerance (tilt, signed) or value ≤ tolerance (twist, bow, TIR: never negative). */
  tolerance: number;
  signed: boolean;
  points: SeriesPoint[];
};

/** A completed round of one stage: the latest reading per planned point, all of them taken. */
export type Round = { stage: SessionStage; readings: RecordedReading[]; seq: number; at: string };

/**
 * Every completed round, in the order it completed. A stage's rounds are split by its moves answered done (as
 * currentRound does); within a round a retaken reading replaces the earlier one at the same point.
 */
export function completedRounds(s: SessionState): Round[] {
  const rounds: Round[] = [];
  for (const stage of SESSION_STAGES) {
    const plan = stagePlan(stage, s);
    if (plan.length === 0) continue;
    const wanted = plan.map(readingKey);
    const cuts = s.moves
      .filter((m) => m.stage === stage && m.status === 'done' && m.answeredSeq !== null)
      .map((m) => m.answeredSeq!)
      .sort((a, b) => a - b);
    const groups = new Map<number, Map<string, RecordedReading>>();
    for (const r of s.readings) {
      if (r.stage !== stage) continue;
      const round = countBelow(cuts, r.seq);
      const latest = groups.get(round) ?? new Map<string, RecordedReading>();
      latest.set(readingKey(r), r);
      groups.set(round, latest);
    }
    for (const latest of groups.values()) {
      if (!wanted.every((k) => latest.has(k))) continue;
      const readings = wanted.map((k) => latest.get(k)!);
      const last = [...latest.values()].reduce((a, b) => (b.seq > a.seq ? b : a));
      rounds.push({ stage, readings, seq: last.seq, at: last.serverTs });
    }
  }
  return rounds.sort((a, b) => a.seq - b.seq);
}

/** How many of the ascending `sorted` are below `x` (binary search: a long session has thousands of moves). */
function countBelow(sorted: readonly number[], x: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid]! < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Tilt X and Y at the centre (µrad), twist and bow over the travel (µrad), sweep TIR (µm) of one round, where it has them. */
export function roundMeasures(round: Round): Partial<Record<SeriesMeasure, number>> {
  const out: Partial<Record<SeriesMeasure, number>> = {};
  const along = (axis: 'x' | 'y'): TravelPoint[] =>
    round.readings.flatMap((r) => (r.kind === 'level' && r.axis === axis ? [{ posMm: r.positionMm, slopeUrad: r.slopeUrad }] : []));
  const xs = along('x');
  const ys = along('y');
  const centre = (points: TravelPoint[]) => points.find((p) => Math.round(p.posMm) === 0)?.slopeUrad;
  const tiltX = centre(xs);
  const tiltY = centre(ys);
  if (tiltX !== undefined) out.tiltX = tiltX;
  if (tiltY !== undefined) out.tiltY = tiltY;
  // A change along the travel needs readings at two stations or more.
  if (new Set(xs.map((p) => Math.round(p.posMm))).size >= 2) out.twist = analyzeTravel(xs).changeUrad;
  if (new Set(ys.map((p) => Math.round(p.posMm))).size >= 2) out.bow = analyzeTravel(ys).changeUrad;
  const sweep = round.readings.find((r) => r.kind === 'sweep');
  if (sweep && sweep.kind === 'sweep') out.sweepTir = analyzeSweep(sweep).tirUm;
  return out;
}

/** The live chart's series: each measure per completed round, with its tolerance from the session. */
export function sessionSeries(s: SessionState): Record<SeriesMeasure, Series> {
  const tol = tolerancesOf(s);
  const series: Record<SeriesMeasure, Series> = {
    tiltX: { measure: 'tiltX', label: 'Tilt X (across) at the centre', unit: 'urad', tolerance: tol.levelUrad, signed: true, points: [] },
    tiltY: { measure: 'tiltY', label: 'Tilt Y (along) at the centre', unit: 'urad', tolerance: tol.levelUrad, signed: true, points: [] },
    twist: { measure: 'twist', label: 'Twist over the Y travel', unit: 'urad', tolerance: tol.twistUrad, signed: false, points: [] },
    bow: { measure: 'bow', label: 'Bow over the Y travel', unit: 'urad', tolerance: tol.bowUrad, signed: false, points: [] },
    sweepTir: { measure: 'sweepTir', label: 'Spindle sweep TIR', unit: 'um', tolerance: tol.sweepTirUm, signed: false, points: [] },
  };
  for (const round of completedRounds(s)) {
    const values = roundMeasures(round);
    for (const m of SERIES_MEASURES) {
      const value = values[m];
      if (value !== undefined) series[m].points.push({ seq: round.seq, at: round.at, value, stage: round.stage });
    }
  }
  return series;
}

/** Whether a value of a series is within its tolerance. */
export function withinTolerance(series: Pick<Series, 'tolerance' | 'signed'>, value: number): boolean {
  return (series.signed ? Math.abs(value) : value) <= series.tolerance;
}
