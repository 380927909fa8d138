import { requireFinite, requirePositive } from './errors';
import { assertSupportingPlane, type PlanPoint } from './footprint';
import { leastSquares } from './linear-algebra';

/** A screw for the tilt solve: x, y in mm from the table centre; pitchMm is the lift per turn in mm. */
export interface TiltScrew {
  id: string;
  x: number;
  y: number;
  pitchMm: number;
}

/** One screw move: raiseUm in µm (negative = lower); turns and degrees of wrench swing in the same sense. */
export interface ScrewMove {
  id: string;
  raiseUm: number;
  turns: number;
  degrees: number;
}

/** Height in µm of a plane with slopes in µrad (positive: +x / +y side higher) at (x, y) in mm. */
export function planeHeightUm(point: PlanPoint, slopeXUrad: number, slopeYUrad: number): number {
  return (slopeXUrad * point.xMm + slopeYUrad * point.yMm) / 1000;
}

/** Least-squares plane through heights in µm at points in mm: offset in µm, slopes in µrad. */
export function fitPlane(
  points: PlanPoint[],
  heightsUm: number[],
): { offsetUm: number; slopeXUrad: number; slopeYUrad: number } {
  assertSupportingPlane(points);
  heightsUm.forEach((h, i) => requireFinite(`height ${i + 1}`, h));
  const [offsetUm = 0, slopeXUrad = 0, slopeYUrad = 0] = leastSquares(
    points.map((p) => [1, p.xMm / 1000, p.yMm / 1000]),
    heightsUm,
  );
  return { offsetUm, slopeXUrad, slopeYUrad };
}

/** A move of raiseUm µm on a screw lifting liftPerTurnMm mm a turn, as turns and degrees of swing. */
export function screwMove(id: string, raiseUm: number, liftPerTurnMm: number): ScrewMove {
  const turns = raiseUm / (liftPerTurnMm * 1000);
  return { id, raiseUm, turns, degrees: turns * 360 };
}

/** Height in µm of one swing increment (degrees) on a screw lifting liftPerTurnMm mm a turn. */
export function incrementUm(liftPerTurnMm: number, incrementDeg: number): number {
  requirePositive('swing increment', incrementDeg, 'bad-tolerance');
  return (liftPerTurnMm * 1000 * incrementDeg) / 360;
}

function toPlanPoints(screws: TiltScrew[]): PlanPoint[] {
  return screws.map((s) => ({ xMm: s.x, yMm: s.y }));
}

/**
 * Screw moves that level a rigid base with slopes in µrad (positive: +x / +y side higher), unrounded.
 * Raise-only (default) brings the low side up to the highest screw; otherwise the mean height is kept.
 */
export function solveTilt(input: {
  screws: TiltScrew[];
  slopeXUrad: number;
  slopeYUrad: number;
  raiseOnly?: boolean;
}): { moves: ScrewMove[] } {
  const { screws, raiseOnly = true } = input;
  const slopeXUrad = requireFinite('slope X', input.slopeXUrad);
  const slopeYUrad = requireFinite('slope Y', input.slopeYUrad);
  const points = toPlanPoints(screws);
  assertSupportingPlane(points);
  screws.forEach((s) => requirePositive(`pitch of screw ${s.id}`, s.pitchMm, 'bad-pitch'));
  const heightsUm = points.map((p) => planeHeightUm(p, slopeXUrad, slopeYUrad));
  const targetUm = raiseOnly ? Math.max(...heightsUm) : heightsUm.reduce((a, b) => a + b, 0) / heightsUm.length;
  return {
    moves: screws.map((s, i) => screwMove(s.id, targetUm - heightsUm[i]!, s.pitchMm)),
  };
}

/**
 * Rounds each move to the nearest swing increment (default 5°) and reports the tilt left in µrad:
 * the starting slopes plus the plane the rounded raises make on a rigid base.
 */
export function roundMoves(input: {
  screws: TiltScrew[];
  moves: ScrewMove[];
  slopeXUrad: number;
  slopeYUrad: number;
  incrementDeg?: number;
}): { moves: ScrewMove[]; residualXUrad: number; residualYUrad: number } {
  const { screws, moves, incrementDeg = 5 } = input;
  const rounded = screws.map((s, i) => {
    const stepUm = incrementUm(s.pitchMm, incrementDeg);
    const raiseUm = requireFinite(`raise of screw ${s.id}`, moves[i]?.raiseUm ?? 0);
    return screwMove(s.id, Math.round(raiseUm / stepUm) * stepUm, s.pitchMm);
  });
  const plane = fitPlane(
    toPlanPoints(screws),
    rounded.map((m) => m.raiseUm),
  );
  return {
    moves: rounded,
    residualXUrad: input.slopeXUrad + plane.slopeXUrad,
    residualYUrad: input.slopeYUrad + plane.slopeYUrad,
  };
}
