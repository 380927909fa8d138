import { requireFinite, requirePositive } from './errors';
import { MM_PER_IN } from './units';

/** Default sweep circle: 10 in, in mm. */
export const DEFAULT_SWEEP_DIAMETER_MM = 10 * MM_PER_IN;

/** Default sweep limit: 0.0005 in TIR, in µm (common trade practice, on a 10 in circle). */
export const DEFAULT_SWEEP_LIMIT_UM = 0.0005 * MM_PER_IN * 1000;

/** Indicator readings in µm at four points of a circle of diameter in mm; positive: tip pushed in, surface higher. */
export interface SweepReadings {
  diameterMm: number;
  frontUm: number;
  backUm: number;
  leftUm: number;
  rightUm: number;
}

/** Spindle sweep result: lengths in µm, angles in µrad (xUrad > 0: right higher; yUrad > 0: back higher). */
export interface SweepAnalysis {
  tirUm: number;
  xUrad: number;
  yUrad: number;
  tiltUrad: number;
  fullCircleTirUm: number;
  closureUm: number;
  withinLimit: boolean;
  middleScrews: 'raise' | 'lower' | null;
}

/**
 * Four-point sweep: TIR (largest minus smallest, µm), tram components in µrad, full-circle TIR of that tilt,
 * closure (right + left) − (front + back) in µm, and the middle-screw direction when Y alone is out.
 */
export function analyzeSweep(input: SweepReadings, limitUm = DEFAULT_SWEEP_LIMIT_UM): SweepAnalysis {
  const diameterMm = requirePositive('sweep diameter', input.diameterMm, 'bad-diameter');
  requirePositive('sweep limit', limitUm, 'bad-tolerance');
  const frontUm = requireFinite('front reading', input.frontUm);
  const backUm = requireFinite('back reading', input.backUm);
  const leftUm = requireFinite('left reading', input.leftUm);
  const rightUm = requireFinite('right reading', input.rightUm);
  const all = [frontUm, backUm, leftUm, rightUm];
  const tirUm = Math.max(...all) - Math.min(...all);
  const xUrad = ((rightUm - leftUm) / diameterMm) * 1000;
  const yUrad = ((backUm - frontUm) / diameterMm) * 1000;
  const tiltUrad = Math.hypot(xUrad, yUrad);
  const yOut = Math.abs(backUm - frontUm) > limitUm;
  return {
    tirUm,
    xUrad,
    yUrad,
    tiltUrad,
    fullCircleTirUm: (tiltUrad * diameterMm) / 1000,
    closureUm: rightUm + leftUm - (frontUm + backUm),
    withinLimit: tirUm <= limitUm,
    middleScrews: yOut ? (yUrad < 0 ? 'lower' : 'raise') : null,
  };
}
