import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { divisionUrad, readingToSlopeUrad, reversal, reversalCheck, slopeToDivisions } from '@/lib/leveling';

describe('level sensitivity (JIS B 7510-1993, precision levels)', () => {
  it.each([
    [0.02, 20, 4],
    [0.05, 50, 10],
    [0.1, 100, 20],
  ])('type %s mm/m: %s µrad per division, about %s arcsec', (mmPerM, urad, arcsec) => {
    expect(divisionUrad(mmPerM, 'mm/m')).toBeCloseTo(urad, 10);
    expect(divisionUrad(mmPerM, 'mm/m') / divisionUrad(1, 'arcsec')).toBeCloseTo(arcsec, -0.5);
  });

  it('common machinist level 0.0005 in per 10 in is 50 µrad a division (TRADE.md §2, derived)', () => {
    expect(divisionUrad(0.0005, 'in/10in')).toBeCloseTo(50, 10);
  });

  it('reading to slope and back; positive when the marked end is higher', () => {
    const div = divisionUrad(0.02, 'mm/m');
    expect(readingToSlopeUrad(3, div)).toBeCloseTo(60, 10);
    expect(readingToSlopeUrad(-2, div)).toBeCloseTo(-40, 10);
    expect(slopeToDivisions(readingToSlopeUrad(1.5, div), div)).toBeCloseTo(1.5, 12);
  });
});

describe('reversal (classic reversal method, e.g. Burton 1903; example from TRADE.md §3, derived)', () => {
  it('r0 = +3.0, r180 = -1.0 gives slope +2.0 div and zero error +1.0 div', () => {
    expect(reversal(3, -1)).toEqual({ slopeDiv: 2, zeroErrorDiv: 1 });
  });

  it('the slope does not depend on the zero error (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -50, max: 50, noNaN: true }),
        fc.double({ min: -10, max: 10, noNaN: true }),
        (slope, zeroError) => {
          const result = reversal(slope + zeroError, -slope + zeroError);
          expect(result.slopeDiv).toBeCloseTo(slope, 9);
          expect(result.zeroErrorDiv).toBeCloseTo(zeroError, 9);
          const shifted = reversal(slope + zeroError + 0.75, -slope + zeroError + 0.75);
          expect(shifted.slopeDiv).toBeCloseTo(result.slopeDiv, 9);
        },
      ),
    );
  });

  it('the level repeats when the reversed readings are equal and opposite within the tolerance', () => {
    expect(reversalCheck(2, -2).repeats).toBe(true);
    expect(reversalCheck(2.5, -2).repeats).toBe(true);
    expect(reversalCheck(3, -1).repeats).toBe(false);
    expect(reversalCheck(3, -1, 2).repeats).toBe(true);
  });
});
