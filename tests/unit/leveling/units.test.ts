import fc from 'fast-check';
import { evaluate, unit } from 'mathjs';
import { describe, expect, it } from 'vitest';
import {
  MM_PER_IN,
  URAD_PER_ARCSEC,
  convertLength,
  convertSlope,
  formatLength,
  formatSlope,
  type LengthUnit,
  type SlopeUnit,
} from '@/lib/leveling';

const SLOPE_UNITS: SlopeUnit[] = ['urad', 'mm/m', 'um/m', 'in/in', 'in/10in', 'in/ft', 'arcsec'];
const LENGTH_UNITS: LengthUnit[] = ['mm', 'um', 'in', 'tenths'];

describe('conversion constants', () => {
  it('1 in = 25.4 mm exactly (NIST; 1959 international yard and pound agreement)', () => {
    expect(MM_PER_IN).toBe(25.4);
    expect(convertLength(1, 'in', 'mm')).toBe(25.4);
    expect(convertLength(1, 'tenths', 'um')).toBeCloseTo(2.54, 12);
  });

  it('1 arcsec = π/648000 rad = 4.84813681109536 µrad (SI Brochure, 9th ed., table 8: definition of the second of arc)', () => {
    expect(URAD_PER_ARCSEC).toBeCloseTo(4.84813681109536, 12);
    expect(convertSlope(1, 'urad', 'arcsec')).toBeCloseTo(0.20626480624709634, 14);
  });

  it('"1 arcsec is about 4.85 µm per metre" (JIS B 7510-1993, section 2(3))', () => {
    expect(convertSlope(1, 'arcsec', 'um/m')).toBeCloseTo(4.85, 2);
  });
});

describe('slope table of TRADE.md §2 (derived from the exact constants above)', () => {
  // rows: [slope, unit] -> urad, arcsec, mm/m, in/ft, in per 10 in, as printed (derived values).
  const rows: [number, SlopeUnit, number, number, number, number, number][] = [
    [0.02, 'mm/m', 20, 4.1253, 0.02, 0.00024, 0.0002],
    [0.05, 'mm/m', 50, 10.3132, 0.05, 0.0006, 0.0005],
    [0.0005, 'in/ft', 41.667, 8.5944, 0.041667, 0.0005, 0.000417],
    [0.0001, 'in/in', 100, 20.6265, 0.1, 0.0012, 0.001],
  ];
  it.each(rows)('%s %s', (value, from, urad, arcsec, mmPerM, inPerFt, inPer10In) => {
    expect(convertSlope(value, from, 'urad')).toBeCloseTo(urad, 3);
    expect(convertSlope(value, from, 'arcsec')).toBeCloseTo(arcsec, 4);
    expect(convertSlope(value, from, 'mm/m')).toBeCloseTo(mmPerM, 6);
    expect(convertSlope(value, from, 'in/ft')).toBeCloseTo(inPerFt, 8);
    expect(convertSlope(value, from, 'in/10in')).toBeCloseTo(inPer10In, 6);
  });

  it('one division of a 0.02 mm/m level is exactly the 0.0002 in per 10 in twist limit (derived)', () => {
    expect(convertSlope(0.02, 'mm/m', 'in/10in')).toBeCloseTo(0.0002, 15);
  });
});

describe('cross-check against mathjs units (an independent implementation)', () => {
  it('inch to mm', () => {
    expect(convertLength(3.7, 'in', 'mm')).toBeCloseTo(evaluate('3.7 inch to mm').toNumber('mm'), 12);
  });

  it('arcsec and µrad', () => {
    expect(convertSlope(7, 'arcsec', 'urad')).toBeCloseTo(unit(7, 'arcsec').toNumber('urad'), 9);
    expect(convertSlope(7, 'urad', 'arcsec')).toBeCloseTo(unit(7, 'urad').toNumber('arcsec'), 12);
  });

  it.each([
    ['0.0005 inch / (10 inch)', 0.0005, 'in/10in'],
    ['0.0005 inch / (1 ft)', 0.0005, 'in/ft'],
    ['0.02 mm / (1 m)', 0.02, 'mm/m'],
    ['3 um / (1 m)', 3, 'um/m'],
  ] as const)('%s', (expression, value, from) => {
    const ratio = evaluate(expression) as number;
    expect(convertSlope(value, from, 'in/in')).toBeCloseTo(ratio, 15);
    expect(convertSlope(value, from, 'urad')).toBeCloseTo(ratio * 1e6, 9);
  });
});

describe('round trips (property)', () => {
  it('every slope unit to every other and back returns the value', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -1e4, max: 1e4, noNaN: true }),
        fc.constantFrom(...SLOPE_UNITS),
        fc.constantFrom(...SLOPE_UNITS),
        (value, from, to) => {
          const back = convertSlope(convertSlope(value, from, to), to, from);
          expect(Math.abs(back - value)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(value)));
        },
      ),
    );
  });

  it('every length unit to every other and back returns the value', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -1e5, max: 1e5, noNaN: true }),
        fc.constantFrom(...LENGTH_UNITS),
        fc.constantFrom(...LENGTH_UNITS),
        (value, from, to) => {
          const back = convertLength(convertLength(value, from, to), to, from);
          expect(Math.abs(back - value)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(value)));
        },
      ),
    );
  });
});

describe('display', () => {
  it('shows slope in in/10 in or mm/m', () => {
    expect(formatSlope(20, 'inch')).toBe('0.00020 in/10 in');
    expect(formatSlope(-41.667, 'metric')).toBe('-0.042 mm/m');
  });

  it('shows length in inches to a tenth, or µm / mm', () => {
    expect(formatLength(12.7, 'inch')).toBe('0.0005 in');
    expect(formatLength(120, 'metric')).toBe('120.0 µm');
    expect(formatLength(1500, 'metric')).toBe('1.500 mm');
  });
});
