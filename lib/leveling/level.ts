import { requireFinite, requirePositive } from './errors';
import { convertSlope, type SlopeUnit } from './units';

/** The slope of one division in µrad, from a level's sensitivity per division in any slope unit. */
export function divisionUrad(sensitivityPerDivision: number, unit: SlopeUnit): number {
  requirePositive('level sensitivity', sensitivityPerDivision, 'bad-sensitivity');
  return convertSlope(sensitivityPerDivision, unit, 'urad');
}

/** Surface slope in µrad from a reading in divisions; positive: the marked end (toward +x or +y) is higher. */
export function readingToSlopeUrad(readingDiv: number, divisionSlopeUrad: number): number {
  requireFinite('reading', readingDiv);
  requirePositive('division', divisionSlopeUrad, 'bad-sensitivity');
  return readingDiv * divisionSlopeUrad;
}

/** Reading in divisions for a slope in µrad; positive: the marked end is higher. */
export function slopeToDivisions(slopeUrad: number, divisionSlopeUrad: number): number {
  requireFinite('slope', slopeUrad);
  requirePositive('division', divisionSlopeUrad, 'bad-sensitivity');
  return slopeUrad / divisionSlopeUrad;
}

/** Reversal in divisions: true slope (toward the marked end at 0°) and the vial's zero error. */
export function reversal(r0: number, r180: number): { slopeDiv: number; zeroErrorDiv: number } {
  requireFinite('reading at 0°', r0);
  requireFinite('reading at 180°', r180);
  return { slopeDiv: (r0 - r180) / 2, zeroErrorDiv: (r0 + r180) / 2 };
}

/** Reversal plus whether the level repeats: |r0 + r180| (divisions) within `toleranceDiv` (default half a division). */
export function reversalCheck(
  r0: number,
  r180: number,
  toleranceDiv = 0.5,
): { slopeDiv: number; zeroErrorDiv: number; repeats: boolean } {
  requirePositive('reversal tolerance', toleranceDiv, 'bad-tolerance');
  const result = reversal(r0, r180);
  return { ...result, repeats: Math.abs(2 * result.zeroErrorDiv) <= toleranceDiv };
}
