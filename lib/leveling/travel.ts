import { LevelingError, requireFinite, requirePositive } from './errors';
import { leastSquares } from './linear-algebra';
import { convertSlope } from './units';

/** A level reading along a travel: position in mm, slope in µrad (positive: marked end higher). */
export interface TravelPoint {
  posMm: number;
  slopeUrad: number;
}

/** Twist and bow limit in µrad: 0.0002 in per 10 in (common trade practice). */
export const DEFAULT_TRAVEL_TOLERANCE_URAD = 20;

/** Change of slope over a travel, µrad, and the same as height per length in the trade's forms. */
export interface TravelAnalysis {
  changeUrad: number;
  withinTolerance: boolean;
  inPer10In: number;
  mmPer250Mm: number;
  mmPer1000Mm: number;
  spanMm: number;
}

function checkedPoints(points: TravelPoint[]): TravelPoint[] {
  if (points.length === 0) throw new LevelingError('empty-travel', 'a travel needs at least one reading');
  points.forEach((p, i) => {
    requireFinite(`travel reading ${i + 1} position`, p.posMm);
    requireFinite(`travel reading ${i + 1} slope`, p.slopeUrad);
  });
  return [...points].sort((a, b) => a.posMm - b.posMm);
}

/** Slope change over the travel (largest minus smallest, µrad) against a tolerance in µrad (default 20). */
export function analyzeTravel(
  points: TravelPoint[],
  toleranceUrad = DEFAULT_TRAVEL_TOLERANCE_URAD,
): TravelAnalysis {
  requirePositive('travel tolerance', toleranceUrad, 'bad-tolerance');
  const sorted = checkedPoints(points);
  const slopes = sorted.map((p) => p.slopeUrad);
  const changeUrad = Math.max(...slopes) - Math.min(...slopes);
  return {
    changeUrad,
    withinTolerance: changeUrad <= toleranceUrad,
    inPer10In: convertSlope(changeUrad, 'urad', 'in/10in'),
    mmPer250Mm: convertSlope(changeUrad, 'urad', 'mm/m') / 4,
    mmPer1000Mm: convertSlope(changeUrad, 'urad', 'mm/m'),
    spanMm: sorted[sorted.length - 1]!.posMm - sorted[0]!.posMm,
  };
}

/** Mid-span departure from the chord in µm for a constant-curvature bow: slope change (µrad) × span (mm) / 8. */
export function bowDepartureUm(changeUrad: number, spanMm: number): number {
  return (requireFinite('slope change', changeUrad) * requireFinite('span', spanMm)) / 8 / 1000;
}

/** Least-squares rate of change of slope along the travel, µrad per metre (positive: slope rises toward +pos). */
export function slopeTrendUradPerM(points: TravelPoint[]): number {
  const sorted = checkedPoints(points);
  const [, ratePerMm = 0] = leastSquares(
    sorted.map((p) => [1, p.posMm]),
    sorted.map((p) => p.slopeUrad),
  );
  return ratePerMm * 1000;
}

/**
 * Twist correction from cross-slope readings (µrad, positive: right side higher) along Y travel:
 * raise the low side at the end (front: lowest pos, back: highest) that is further out of level.
 */
export function twistCorrection(points: TravelPoint[]): { end: 'front' | 'back'; side: 'left' | 'right' } | null {
  const sorted = checkedPoints(points);
  const front = sorted[0]!.slopeUrad;
  const back = sorted[sorted.length - 1]!.slopeUrad;
  if (front === back) return null;
  const [end, slopeUrad] = Math.abs(back) >= Math.abs(front) ? (['back', back] as const) : (['front', front] as const);
  return { end, side: slopeUrad > 0 ? 'left' : 'right' };
}

/**
 * Bow correction from along-slope readings (µrad) along the travel: slope rising along travel is sag
 * (raise the middle screws), falling is hog (lower them).
 */
export function bowCorrection(points: TravelPoint[]): { shape: 'sag' | 'hog'; middleScrews: 'raise' | 'lower' } | null {
  const trend = slopeTrendUradPerM(points);
  if (trend === 0) return null;
  return trend > 0 ? { shape: 'sag', middleScrews: 'raise' } : { shape: 'hog', middleScrews: 'lower' };
}
