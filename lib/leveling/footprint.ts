import { LevelingError, requireFinite, requirePositive } from './errors';
import { MM_PER_IN } from './units';

/** Where a leveling screw sits in the footprint. */
export type ScrewKind = 'corner' | 'middle' | 'outrigger';

/** A thread, by pitch in mm (metric) or threads per inch (unified). */
export type Thread = { pitchMm: number } | { tpi: number };

/** A screw as entered: position in mm from the table centre (+x operator's right, +y back). */
export interface ScrewSpec {
  id: string;
  kind: ScrewKind;
  xMm: number;
  yMm: number;
  thread: Thread;
  /** Height gained per turn in mm when a wedge or differential pad does not lift one pitch. */
  liftPerTurnMm?: number;
  /** Specified height under the casting, mm. */
  specifiedHeightMm?: number;
}

/** A checked screw: position in mm, lift per turn in mm (pitch unless a pad says otherwise). */
export interface Screw {
  id: string;
  kind: ScrewKind;
  xMm: number;
  yMm: number;
  liftPerTurnMm: number;
  specifiedHeightMm?: number;
}

/** A point of the footprint plane, mm from the table centre. */
export interface PlanPoint {
  xMm: number;
  yMm: number;
}

/** Thread pitch in mm; threads per inch become 25.4 / tpi. */
export function threadPitchMm(thread: Thread): number {
  return 'pitchMm' in thread
    ? requirePositive('thread pitch', thread.pitchMm, 'bad-pitch')
    : MM_PER_IN / requirePositive('threads per inch', thread.tpi, 'bad-pitch');
}

/** Throws unless the points are finite, at least three, and not all on one line. */
export function assertSupportingPlane(points: PlanPoint[]): void {
  if (points.length < 3) {
    throw new LevelingError('too-few-screws', `a base needs at least 3 screws, got ${points.length}`);
  }
  points.forEach((p, i) => {
    requireFinite(`screw ${i + 1} x`, p.xMm);
    requireFinite(`screw ${i + 1} y`, p.yMm);
  });
  const span = Math.max(...points.map((p) => Math.hypot(p.xMm - points[0]!.xMm, p.yMm - points[0]!.yMm)));
  const widest = Math.max(...points.flatMap((a) => points.map((b) => triangleArea(points[0]!, a, b))));
  if (span === 0 || widest <= 1e-9 * span * span) {
    throw new LevelingError('collinear-screws', 'the screws lie on one line, so they cannot hold a plane');
  }
}

function triangleArea(a: PlanPoint, b: PlanPoint, c: PlanPoint): number {
  return Math.abs((b.xMm - a.xMm) * (c.yMm - a.yMm) - (c.xMm - a.xMm) * (b.yMm - a.yMm)) / 2;
}

/** Checks screw specs and returns the footprint, with lift per turn in mm resolved. */
export function buildFootprint(specs: ScrewSpec[]): Screw[] {
  assertSupportingPlane(specs);
  const ids = new Set<string>();
  return specs.map((spec) => {
    if (ids.has(spec.id)) throw new LevelingError('duplicate-screw', `screw id "${spec.id}" is used twice`);
    ids.add(spec.id);
    const pitchMm = threadPitchMm(spec.thread);
    const liftPerTurnMm =
      spec.liftPerTurnMm === undefined ? pitchMm : requirePositive('lift per turn', spec.liftPerTurnMm, 'bad-pitch');
    const screw: Screw = { id: spec.id, kind: spec.kind, xMm: spec.xMm, yMm: spec.yMm, liftPerTurnMm };
    if (spec.specifiedHeightMm !== undefined) {
      screw.specifiedHeightMm = requireFinite(`screw ${spec.id} specified height`, spec.specifiedHeightMm);
    }
    return screw;
  });
}

/** One screw's measured height against its specification, mm; deviation positive: higher than specified. */
export interface HeightCheck {
  id: string;
  heightMm: number;
  specifiedHeightMm: number;
  deviationMm: number;
  withinTolerance: boolean;
}

/** Height check of every screw that has a specified height and a measured height (mm, ± tolerance). */
export function checkHeights(
  screws: Screw[],
  measuredHeightMm: Record<string, number>,
  toleranceMm: number,
): HeightCheck[] {
  requirePositive('height tolerance', toleranceMm, 'bad-tolerance');
  return screws.flatMap((screw) => {
    const heightMm = measuredHeightMm[screw.id];
    if (screw.specifiedHeightMm === undefined || heightMm === undefined) return [];
    requireFinite(`screw ${screw.id} height`, heightMm);
    const deviationMm = heightMm - screw.specifiedHeightMm;
    return [
      {
        id: screw.id,
        heightMm,
        specifiedHeightMm: screw.specifiedHeightMm,
        deviationMm,
        withinTolerance: Math.abs(deviationMm) <= toleranceMm,
      },
    ];
  });
}
