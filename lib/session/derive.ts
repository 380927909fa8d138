/**
 * What the views and the server read off a folded session: the plan of readings for a stage and the stage's
 * verdict (the base model and the engine's recommended moves are in advice.ts, which the field view does not load).
 * Imports single engine modules, not its index, to keep the field view's bundle small. Pure; no clock, no I/O.
 */
import type { Reading } from '@/lib/leveling/base-model';
import { checkHeights, type Screw } from '@/lib/leveling/footprint';
import { DEFAULT_TOLERANCES, stageWithinTolerance, type AdjustStage, type Tolerances } from '@/lib/leveling/stages';
import { DEFAULT_SWEEP_DIAMETER_MM, analyzeSweep } from '@/lib/leveling/sweep';
import { screwMove, type ScrewMove } from '@/lib/leveling/tilt-solve';
import { analyzeTravel } from '@/lib/leveling/travel';
import { formatLength, formatSlope, type UnitSystem } from '@/lib/leveling/units';
import type { SessionScrew } from './events';
import type { RecordedReading, SessionState } from './fold';
import { PREPARE_ITEMS, jamItem, padItem, type SessionStage } from './stages';

/** Height tolerance at a screw, mm, when the builder gives none: Levelwire's default, no published source. */
export const HEIGHT_TOLERANCE_MM = 0.5;

/** A reading the stage asks for: a level at a Y station, a reversal, a height at a screw, or a sweep. */
export type PlannedReading =
  | { kind: 'level'; axis: 'x' | 'y'; positionMm: number; label: string }
  | { kind: 'reversal'; axis: 'x' | 'y'; label: string }
  | { kind: 'height'; screwId: string; label: string }
  | { kind: 'sweep'; diameterMm: number; label: string };

export function tolerancesOf(s: SessionState): Tolerances {
  return s.tolerances ?? DEFAULT_TOLERANCES;
}

export function engineScrews(screws: SessionScrew[]): Screw[] {
  return screws.map((s) => ({
    id: s.id,
    kind: s.kind,
    xMm: s.xMm,
    yMm: s.yMm,
    liftPerTurnMm: s.liftPerTurnMm,
    ...(s.specifiedHeightMm !== null ? { specifiedHeightMm: s.specifiedHeightMm } : {}),
  }));
}

/** Y stations along the travel, mm from the centre, both ends and evenly between, with names. */
export function stations(travelMm: number, count: 3 | 5): { positionMm: number; label: string }[] {
  const names = count === 3 ? ['front', 'middle', 'back'] : ['front', 'front-middle', 'middle', 'middle-back', 'back'];
  return names.map((label, i) => ({ positionMm: Math.round(-travelMm / 2 + (i * travelMm) / (count - 1)), label }));
}

const across3 = (travelMm: number): PlannedReading[] =>
  stations(travelMm, 3).map((st) => ({ kind: 'level', axis: 'x', positionMm: st.positionMm, label: `X across · ${st.label}` }));
const along5 = (travelMm: number): PlannedReading[] =>
  stations(travelMm, 5).map((st) => ({ kind: 'level', axis: 'y', positionMm: st.positionMm, label: `Y along · ${st.label}` }));
const centreY: PlannedReading = { kind: 'level', axis: 'y', positionMm: 0, label: 'Y along · centre' };
const sweep: PlannedReading = { kind: 'sweep', diameterMm: DEFAULT_SWEEP_DIAMETER_MM, label: 'Spindle sweep' };

/** The readings a stage asks for, in the order to take them. */
export function stagePlan(stage: SessionStage, s: Pick<SessionState, 'travelMm' | 'screws'>): PlannedReading[] {
  const travelMm = s.travelMm ?? 500;
  switch (stage) {
    case 'prepare':
    case 'middles-down':
      return [];
    case 'height-check':
      return s.screws.map((sc) => ({ kind: 'height', screwId: sc.id, label: `Height at ${sc.label}` }));
    case 'zero-level':
      return [{ kind: 'reversal', axis: 'x', label: 'Reversal across (X)' }];
    case 'rough-level':
      return [{ kind: 'level', axis: 'x', positionMm: 0, label: 'X across · centre' }, centreY];
    case 'twist':
    case 'twist-recheck':
      return [...across3(travelMm), centreY];
    case 'bow':
      return along5(travelMm);
    case 'spindle-sweep':
      return [sweep, ...stations(travelMm, 3).map((st): PlannedReading => ({ kind: 'level', axis: 'y', positionMm: st.positionMm, label: `Y along · ${st.label}` }))];
    case 'lock-as-left':
      return [...across3(travelMm), ...along5(travelMm), sweep];
  }
}

/** Checklist items a stage asks to be marked: prepare's list, each middle screw snug, each jam nut locked. */
export function stageChecklist(stage: SessionStage, screws: SessionScrew[]): { id: string; label: string }[] {
  if (stage === 'prepare') return PREPARE_ITEMS.map((i) => ({ id: i.id, label: i.label }));
  if (stage === 'middles-down') return screws.filter((sc) => sc.kind === 'middle').map((sc) => ({ id: padItem(sc.id), label: `${sc.label} snug on its pad` }));
  if (stage === 'lock-as-left') return screws.map((sc) => ({ id: jamItem(sc.id), label: `${sc.label} jam nut locked` }));
  return [];
}

/** The key under which a reading answers a planned reading (the latest one with the same key counts). */
export function readingKey(r: PlannedReading | RecordedReading): string {
  switch (r.kind) {
    case 'level':
      return `level:${r.axis}:${Math.round(r.positionMm)}`;
    case 'reversal':
      return `reversal:${r.axis}`;
    case 'height':
      return `height:${r.screwId}`;
    case 'sweep':
      return 'sweep';
  }
}

/** The seq of the last move of `stage` answered done: readings before it belong to the previous round. */
function lastDoneMoveSeq(s: SessionState, stage: SessionStage): number {
  let seq = 0;
  for (const m of s.moves) if (m.stage === stage && m.status === 'done' && (m.answeredSeq ?? 0) > seq) seq = m.answeredSeq!;
  return seq;
}

/** The current round's readings of a stage: the latest per planned point, taken after the stage's last done move. */
export function currentRound(s: SessionState, stage: SessionStage): Map<string, RecordedReading> {
  const since = lastDoneMoveSeq(s, stage);
  const latest = new Map<string, RecordedReading>();
  for (const r of s.readings) if (r.stage === stage && r.seq > since) latest.set(readingKey(r), r);
  return latest;
}

/** A recorded reading as the engine takes it (null for reversals and heights, which the base model does not use). */
export function toEngineReading(r: RecordedReading): Reading | null {
  if (r.kind === 'level') return { kind: 'level', axis: r.axis, xMm: 0, yMm: r.positionMm, slopeUrad: r.slopeUrad };
  if (r.kind === 'sweep') return { kind: 'sweep', diameterMm: r.diameterMm, frontUm: r.frontUm, backUm: r.backUm, leftUm: r.leftUm, rightUm: r.rightUm };
  return null;
}

export type Verdict = {
  status: 'pass' | 'fail' | 'incomplete';
  /** What is still to take or mark (incomplete), or what is out of tolerance (fail), in words. */
  detail: string[];
};

const ADJUSTING: Partial<Record<SessionStage, AdjustStage>> = {
  'rough-level': 'rough-level',
  twist: 'twist',
  'twist-recheck': 'twist',
  bow: 'bow',
  'spindle-sweep': 'spindle-sweep',
};

/** The engine's name for a stage in which screws are turned, or null (no moves are recommended there). */
export function adjustStageOf(stage: SessionStage): AdjustStage | null {
  return ADJUSTING[stage] ?? null;
}

/** How a verdict's detail writes slopes and lengths: the viewer's unit system, or µrad and µm when none is given. */
export type VerdictUnits = UnitSystem | 'si';
const slopeText = (urad: number, u: VerdictUnits) => (u === 'si' ? `${urad.toFixed(0)} µrad` : formatSlope(urad, u));
const lengthText = (um: number, u: VerdictUnits) => (u === 'si' ? `${um.toFixed(1)} µm` : formatLength(um, u));

/** Whether a stage is done: everything asked for taken or marked, and within tolerance (detail in `units`). */
export function stageVerdict(s: SessionState, stage: SessionStage, units: VerdictUnits = 'si'): Verdict {
  const plan = stagePlan(stage, s);
  const round = currentRound(s, stage);
  const missing = plan.filter((p) => !round.has(readingKey(p))).map((p) => p.label);
  const unchecked = stageChecklist(stage, s.screws)
    .filter((c) => !s.checks[c.id])
    .map((c) => c.label);
  if (missing.length + unchecked.length > 0) return { status: 'incomplete', detail: [...missing, ...unchecked] };
  const tol = tolerancesOf(s);
  const fails: string[] = [];
  if (stage === 'height-check') {
    const measured = Object.fromEntries([...round.values()].flatMap((r) => (r.kind === 'height' ? [[r.screwId, r.heightMm]] : [])));
    const withSpec = engineScrews(s.screws).filter((sc) => sc.specifiedHeightMm !== undefined);
    for (const h of checkHeights(withSpec, measured, HEIGHT_TOLERANCE_MM)) {
      const by = units === 'inch' ? formatLength(Math.abs(h.deviationMm) * 1000, 'inch') : `${Math.abs(h.deviationMm).toFixed(2)} mm`;
      if (!h.withinTolerance) fails.push(`${labelOf(s, h.id)} ${h.deviationMm > 0 ? 'high' : 'low'} by ${by}`);
    }
  } else if (stage === 'zero-level') {
    for (const r of round.values()) if (r.kind === 'reversal' && !r.repeats) fails.push(`the level does not repeat: zero error ${r.zeroErrorDiv.toFixed(2)} div`);
  } else if (stage === 'lock-as-left') {
    const readings = [...round.values()].map(toEngineReading).filter((r): r is Reading => r !== null);
    for (const adjust of ['twist', 'bow', 'spindle-sweep'] as const) {
      if (!stageWithinTolerance(adjust, readings, tol)) fails.push(`${adjust.replace('-', ' ')} out of tolerance`);
    }
  } else {
    const adjust = adjustStageOf(stage);
    if (adjust) {
      const readings = [...round.values()].map(toEngineReading).filter((r): r is Reading => r !== null);
      if (!stageWithinTolerance(adjust, readings, tol)) fails.push(...measuresOutside(readings, tol, adjust, units));
    }
  }
  return fails.length > 0 ? { status: 'fail', detail: fails } : { status: 'pass', detail: [] };
}

function labelOf(s: SessionState, screwId: string): string {
  return s.screws.find((sc) => sc.id === screwId)?.label ?? 'a screw';
}

/** In words, which measures of a round lie outside tolerance. */
function measuresOutside(readings: Reading[], tol: Tolerances, stage: AdjustStage, units: VerdictUnits): string[] {
  const out: string[] = [];
  for (const r of readings) {
    if (r.kind === 'level' && r.yMm === 0 && (stage === 'rough-level' || stage === 'twist') && Math.abs(r.slopeUrad) > tol.levelUrad) {
      out.push(`${r.axis.toUpperCase()} at the centre reads ${slopeText(r.slopeUrad, units)} (limit ${slopeText(tol.levelUrad, units)})`);
    }
  }
  const along = (axis: 'x' | 'y') =>
    readings.flatMap((r) => (r.kind === 'level' && r.axis === axis ? [{ posMm: r.yMm, slopeUrad: r.slopeUrad }] : []));
  if (stage === 'twist') {
    const t = analyzeTravel(along('x'), tol.twistUrad);
    if (!t.withinTolerance) out.push(`twist ${slopeText(t.changeUrad, units)} over the travel (limit ${slopeText(tol.twistUrad, units)})`);
  }
  if (stage === 'bow' || stage === 'spindle-sweep') {
    const b = analyzeTravel(along('y'), tol.bowUrad);
    if (!b.withinTolerance) out.push(`bow ${slopeText(b.changeUrad, units)} over the travel (limit ${slopeText(tol.bowUrad, units)})`);
  }
  for (const r of readings) {
    if (r.kind === 'sweep') {
      const a = analyzeSweep(r, tol.sweepTirUm);
      if (!a.withinLimit) out.push(`sweep TIR ${lengthText(a.tirUm, units)} (limit ${lengthText(tol.sweepTirUm, units)})`);
    }
  }
  return out.length > 0 ? out : ['out of tolerance'];
}

/** Pending moves (sent, not yet answered). */
export function pendingMoves(s: SessionState) {
  return s.moves.filter((m) => m.status === 'pending');
}

/** A move of `turns` on a screw of the session, in µm (to the nanometre, dropping float noise), turns and degrees. */
export function moveOfTurns(screw: SessionScrew, turns: number): ScrewMove {
  const raiseUm = Math.round(turns * screw.liftPerTurnMm * 1e6) / 1000;
  return { ...screwMove(screw.id, raiseUm, screw.liftPerTurnMm), turns, degrees: turns * 360 };
}
