import { describe, expect, it } from 'vitest';
import { DEFAULT_SWEEP_DIAMETER_MM, DEFAULT_SWEEP_LIMIT_UM, MM_PER_IN, analyzeSweep, convertSlope } from '@/lib/leveling';

const UM_PER_IN = MM_PER_IN * 1000;
const inches = (value: number) => value * UM_PER_IN;

describe('spindle sweep, worked example (TRADE.md §6, derived)', () => {
  // D = 10 in; left 0, right +0.0004, front +0.00005, back +0.00035 in.
  const result = analyzeSweep({
    diameterMm: 10 * MM_PER_IN,
    leftUm: 0,
    rightUm: inches(0.0004),
    frontUm: inches(0.00005),
    backUm: inches(0.00035),
  });

  it('thetaX 40 µrad, thetaY 30 µrad, tilt 50 µrad = 10.31 arcsec', () => {
    expect(result.xUrad).toBeCloseTo(40, 9);
    expect(result.yUrad).toBeCloseTo(30, 9);
    expect(result.tiltUrad).toBeCloseTo(50, 9);
    expect(convertSlope(result.tiltUrad, 'urad', 'arcsec')).toBeCloseTo(10.31, 2);
  });

  it('full-circle TIR 0.0005 in, four-point TIR 0.0004 in (reads low), closure 0', () => {
    expect(result.fullCircleTirUm / UM_PER_IN).toBeCloseTo(0.0005, 12);
    expect(result.tirUm / UM_PER_IN).toBeCloseTo(0.0004, 12);
    expect(result.closureUm).toBeCloseTo(0, 9);
    expect(result.withinLimit).toBe(true);
    expect(result.middleScrews).toBeNull();
  });
});

describe('limit and middle-screw direction', () => {
  it('default: 0.0005 in TIR on a 10 in circle (common trade practice, no source)', () => {
    expect(DEFAULT_SWEEP_LIMIT_UM).toBeCloseTo(inches(0.0005), 12);
    expect(DEFAULT_SWEEP_DIAMETER_MM).toBeCloseTo(254, 12);
  });

  it('low at the back: lower the middle screws; low at the front: raise them (common trade practice, no source)', () => {
    const base = { diameterMm: 254, leftUm: 0, rightUm: 0 };
    const lowBack = analyzeSweep({ ...base, frontUm: 0, backUm: -20 });
    expect(lowBack.withinLimit).toBe(false);
    expect(lowBack.yUrad).toBeLessThan(0);
    expect(lowBack.middleScrews).toBe('lower');
    expect(analyzeSweep({ ...base, frontUm: -20, backUm: 0 }).middleScrews).toBe('raise');
  });

  it('closure shows a sweep that does not close', () => {
    expect(analyzeSweep({ diameterMm: 254, leftUm: 0, rightUm: 4, frontUm: 0, backUm: 0 }).closureUm).toBeCloseTo(4, 12);
  });
});
