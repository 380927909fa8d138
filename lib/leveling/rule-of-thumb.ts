import type { LevelReading, Reading, SweepReading } from './base-model';
import type { Screw } from './footprint';
import { DEFAULT_TOLERANCES, stageScrews, type AdjustStage, type Tolerances } from './stages';
import { analyzeSweep } from './sweep';
import { incrementUm, screwMove, type ScrewMove } from './tilt-solve';
import { analyzeTravel, bowCorrection, bowDepartureUm, twistCorrection, type TravelPoint } from './travel';

/**
 * The manual rule of thumb, as practised, for comparison with the recommender: one correction per round.
 * Rough level: raise the low side of the worse axis by slope × span. Twist: raise the low corner at the worse end
 * until its cross-slope would match the other end. Bow: middle screws by the mid-chord departure (change × span / 8).
 * Sweep: middle screws one increment the way the trade says, then bow again. Moves in µm, rounded to the swing increment.
 */
export function ruleOfThumbMoves(input: {
  stage: AdjustStage;
  screws: Screw[];
  readings: Reading[];
  tolerances?: Tolerances;
  incrementDeg?: number;
}): ScrewMove[] {
  const { stage, screws, readings, tolerances = DEFAULT_TOLERANCES, incrementDeg = 5 } = input;
  const allowed = stageScrews(stage, screws);
  const move = (targets: Screw[], raiseUm: number) =>
    targets.map((s) => {
      const stepUm = incrementUm(s.liftPerTurnMm, incrementDeg);
      const steps = Math.round(raiseUm / stepUm) || Math.sign(raiseUm);
      return screwMove(s.id, steps * stepUm, s.liftPerTurnMm);
    });
  const levels = readings.filter((r): r is LevelReading => r.kind === 'level');
  const centre = (axis: 'x' | 'y') => levels.find((r) => r.axis === axis && r.xMm === 0 && r.yMm === 0)?.slopeUrad ?? 0;
  const along = (axis: 'x' | 'y'): TravelPoint[] =>
    levels.filter((r) => r.axis === axis).map((r) => ({ posMm: r.yMm, slopeUrad: r.slopeUrad }));

  if (stage === 'rough-level' || stage === 'twist') {
    const twist = stage === 'twist' ? analyzeTravel(along('x')).changeUrad / tolerances.twistUrad : 0;
    const x = Math.abs(centre('x')) / tolerances.levelUrad;
    const y = Math.abs(centre('y')) / tolerances.levelUrad;
    if (Math.max(twist, x, y) <= 1) return [];
    if (twist >= x && twist >= y) return twistMoves(allowed, along('x'), move);
    const axis = x >= y ? 'x' : 'y';
    return lowSideMoves(allowed, axis, centre(axis), move);
  }
  const sweep = readings.find((r): r is SweepReading => r.kind === 'sweep');
  const verdict = sweep && analyzeSweep(sweep, tolerances.sweepTirUm);
  if (verdict && !verdict.withinLimit && verdict.middleScrews) {
    const direction = verdict.middleScrews === 'raise' ? 1 : -1;
    return allowed.map((s) => screwMove(s.id, direction * incrementUm(s.liftPerTurnMm, incrementDeg), s.liftPerTurnMm));
  }
  const points = along('y');
  const bow = analyzeTravel(points, tolerances.bowUrad);
  const correction = bowCorrection(points);
  if (bow.withinTolerance || !correction) return [];
  const departureUm = bowDepartureUm(bow.changeUrad, bow.spanMm);
  return move(allowed, correction.middleScrews === 'raise' ? departureUm : -departureUm);
}

type Mover = (targets: Screw[], raiseUm: number) => ScrewMove[];

function coordinate(screw: Screw, axis: 'x' | 'y'): number {
  return axis === 'x' ? screw.xMm : screw.yMm;
}

function mean(values: number[]): number {
  return values.reduce((a, b) => a + b, 0) / values.length;
}

/** Raise the corners on the low side of `axis` by slope (µrad) × the distance between the sides (mm). */
function lowSideMoves(corners: Screw[], axis: 'x' | 'y', slopeUrad: number, move: Mover): ScrewMove[] {
  const lowIsNegative = slopeUrad > 0;
  const low = corners.filter((s) => (coordinate(s, axis) < 0) === lowIsNegative);
  const high = corners.filter((s) => !low.includes(s));
  if (low.length === 0 || high.length === 0) return [];
  const spanMm = Math.abs(mean(high.map((s) => coordinate(s, axis))) - mean(low.map((s) => coordinate(s, axis))));
  return move(low, (Math.abs(slopeUrad) * spanMm) / 1000);
}

/** Raise the low corner at the worse end by the difference of the end cross-slopes (µrad) × the width (mm). */
function twistMoves(corners: Screw[], points: TravelPoint[], move: Mover): ScrewMove[] {
  const correction = twistCorrection(points);
  if (!correction) return [];
  const sorted = [...points].sort((a, b) => a.posMm - b.posMm);
  const differenceUrad = Math.abs(sorted[sorted.length - 1]!.slopeUrad - sorted[0]!.slopeUrad);
  const atEnd = corners.filter((s) => (s.yMm > 0) === (correction.end === 'back'));
  const target = atEnd.find((s) => (s.xMm < 0) === (correction.side === 'left'));
  if (!target) return [];
  const widthMm = Math.max(...atEnd.map((s) => s.xMm)) - Math.min(...atEnd.map((s) => s.xMm));
  return move([target], (differenceUrad * widthMm) / 1000);
}
