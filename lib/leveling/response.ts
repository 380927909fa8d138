import type { PlanPoint, Screw } from './footprint';
import { leastSquares, type Matrix } from './linear-algebra';
import { MEASURES, type Measure } from './base-state';

/**
 * How a machine answers its screws: one row per measure (MEASURES order), one column per screw,
 * in µrad of state change per µm of raise.
 */
export type Response = Matrix;

/** Levelwire's starting assumption for spindle tram X per µrad of twist (learned per machine; no published source). */
export const SWEEP_X_PER_TWIST = 0.5;

/** Levelwire's starting assumption for spindle tram Y per µrad of bow (learned per machine; no published source). */
export const SWEEP_Y_PER_BOW = 0.5;

/**
 * Levelwire's starting assumption for the share of a middle screw's travel that bends the base: a casting is
 * stiffer than its middle screws and the floor under them (learned per machine; no published source).
 */
export const MIDDLE_SCREW_SHARE = 0.15;

/**
 * Shape functions of the base surface at a point, as µm of height per unit of each coefficient:
 * piston (µm), tilt X and Y (µrad), twist and bow (µrad over the travel); a rigid base keeps the first three.
 */
function shapeRow(point: PlanPoint, travelMm: number, rigid: boolean): number[] {
  const plane = [1, point.xMm / 1000, point.yMm / 1000];
  if (rigid) return plane;
  return [...plane, (point.xMm * point.yMm) / (1000 * travelMm), (point.yMm * point.yMm) / (2000 * travelMm)];
}

/** State change in µrad (tiltX, tiltY, twist, bow) when one screw of `supports` rises 1 µm and the base follows them. */
function followColumn(supports: Screw[], raised: Screw, travelMm: number, rigid: boolean): number[] {
  const coefficients = leastSquares(
    supports.map((s) => shapeRow(s, travelMm, rigid)),
    supports.map((s) => (s === raised ? 1 : 0)),
  );
  const [, tiltX = 0, tiltY = 0, twist = 0, bow = 0] = coefficients;
  return [tiltX, tiltY, twist, bow];
}

/**
 * The response a base would give if it followed its screws: corners move a base carried on its corners;
 * middle and outrigger screws bend it against the corners, by MIDDLE_SCREW_SHARE of their travel.
 * A rigid base (plane only, the least-squares plane of equal supports) neither twists nor bows.
 */
export function nominalResponse(screws: Screw[], travelMm: number, options: { rigid?: boolean } = {}): Response {
  const rigid = options.rigid ?? false;
  const corners = screws.filter((s) => s.kind === 'corner');
  const carriedOnCorners = !rigid && corners.length >= 3;
  const columns = screws.map((screw) => {
    const supports = carriedOnCorners && screw.kind === 'corner' ? corners : screws;
    const share = carriedOnCorners && screw.kind !== 'corner' ? MIDDLE_SCREW_SHARE : 1;
    const [tiltX = 0, tiltY = 0, twist = 0, bow = 0] = followColumn(supports, screw, travelMm, rigid).map((v) => v * share);
    return [tiltX, tiltY, twist, bow, SWEEP_X_PER_TWIST * twist, SWEEP_Y_PER_BOW * bow];
  });
  return MEASURES.map((_, row) => columns.map((column) => column[row]!));
}

/**
 * Broyden rank-one update: moves done (µm per screw) against the observed change of each measure (µrad,
 * null where not observed); `gain` in (0, 1] damps reading noise. Returns a new response.
 */
export function updateResponse(
  response: Response,
  raisesUm: number[],
  observedChangeUrad: Partial<Record<Measure, number>>,
  gain = 0.8,
): Response {
  const norm = raisesUm.reduce((sum, u) => sum + u * u, 0);
  if (norm === 0) return response;
  return response.map((row, r) => {
    const observed = observedChangeUrad[MEASURES[r]!];
    if (observed === undefined) return row;
    const predicted = row.reduce((sum, value, j) => sum + value * raisesUm[j]!, 0);
    const scale = (gain * (observed - predicted)) / norm;
    return row.map((value, j) => value + scale * raisesUm[j]!);
  });
}

/**
 * Learns from one round: moves reported done (µm) and the measures (µrad) observed before and after them;
 * only measures observed both times teach. Returns a new response.
 */
export function learnFromRound(input: {
  response: Response;
  screwIds: string[];
  moves: { screwId: string; raiseUm: number }[];
  before: Partial<Record<Measure, number>>;
  after: Partial<Record<Measure, number>>;
}): Response {
  const raisesUm = input.screwIds.map((id) =>
    input.moves.filter((m) => m.screwId === id).reduce((sum, m) => sum + m.raiseUm, 0),
  );
  const change: Partial<Record<Measure, number>> = {};
  for (const measure of MEASURES) {
    const before = input.before[measure];
    const after = input.after[measure];
    if (before !== undefined && after !== undefined) change[measure] = after - before;
  }
  return updateResponse(input.response, raisesUm, change);
}
