import { describe, expect, it } from 'vitest';
import {
  DEFAULT_TRAVEL_TOLERANCE_URAD,
  MM_PER_IN,
  analyzeTravel,
  bowCorrection,
  bowDepartureUm,
  convertSlope,
  divisionUrad,
  twistCorrection,
} from '@/lib/leveling';

const IN = MM_PER_IN;

describe('twist (TRADE.md §5)', () => {
  it('the default limit is 0.0002 in per 10 in = 20 µrad (common trade practice, no source)', () => {
    expect(DEFAULT_TRAVEL_TOLERANCE_URAD).toBeCloseTo(convertSlope(0.0002, 'in/10in', 'urad'), 12);
  });

  it('+0.5 div at one end, -0.5 div at the other on a 0.0005 in/10 in level: 0.0005 in/10 in, fails 0.0002 (derived)', () => {
    const division = divisionUrad(0.0005, 'in/10in');
    const result = analyzeTravel([
      { posMm: -600, slopeUrad: 0.5 * division },
      { posMm: 0, slopeUrad: 0.1 * division },
      { posMm: 600, slopeUrad: -0.5 * division },
    ]);
    expect(result.inPer10In).toBeCloseTo(0.0005, 12);
    expect(result.changeUrad).toBeCloseTo(50, 9);
    expect(result.withinTolerance).toBe(false);
    expect(result.spanMm).toBe(1200);
  });

  it('warp 0.001 in across 40 in is 0.00025 in/10 in (derived from the corner heights of TRADE.md §4)', () => {
    const z = { fl: 0, fr: 0.012, rl: -0.004, rr: 0.009 }; // inches at FL(0,0) FR(80,0) RL(0,40) RR(80,40) in
    const alongSlopeUrad = (front: number, back: number) => convertSlope((back - front) / 40, 'in/in', 'urad');
    const result = analyzeTravel([
      { posMm: 0, slopeUrad: alongSlopeUrad(z.fl, z.rl) },
      { posMm: 80 * IN, slopeUrad: alongSlopeUrad(z.fr, z.rr) },
    ]);
    expect(result.inPer10In).toBeCloseTo(0.00025, 12);
    expect(result.withinTolerance).toBe(false);
  });

  it('states the change per 250 mm and per 1000 mm: 20 µrad is 0.005/250 and 0.02/1000 (ISO 230-1 style, from memory)', () => {
    const result = analyzeTravel([
      { posMm: 0, slopeUrad: 0 },
      { posMm: 1000, slopeUrad: 20 },
    ]);
    expect(result.mmPer250Mm).toBeCloseTo(0.005, 12);
    expect(result.mmPer1000Mm).toBeCloseTo(0.02, 12);
    expect(result.withinTolerance).toBe(true);
    expect(analyzeTravel([{ posMm: 0, slopeUrad: 0 }, { posMm: 1000, slopeUrad: 20.5 }]).withinTolerance).toBe(false);
  });

  it('raise the low side at the end further out of level', () => {
    // back end right side high (+40): raise back-left; front end right side low (-40): raise front-right.
    expect(twistCorrection([{ posMm: -500, slopeUrad: 5 }, { posMm: 500, slopeUrad: 40 }])).toEqual({ end: 'back', side: 'left' });
    expect(twistCorrection([{ posMm: -500, slopeUrad: -40 }, { posMm: 500, slopeUrad: 5 }])).toEqual({ end: 'front', side: 'right' });
    expect(twistCorrection([{ posMm: -500, slopeUrad: 7 }, { posMm: 500, slopeUrad: 7 }])).toBeNull();
  });
});

describe('bow (TRADE.md §5)', () => {
  it('mid-span departure ds·L/8: 4e-5 over 2000 mm is 0.010 mm; 2e-5 over 80 in is 0.0002 in (derived)', () => {
    expect(bowDepartureUm(40, 2000)).toBeCloseTo(10, 9);
    expect(bowDepartureUm(20, 80 * IN) / (IN * 1000)).toBeCloseTo(0.0002, 12);
  });

  it('slope rising along the travel is sag: raise the middle screws; falling is hog: lower them (common trade practice)', () => {
    const rising = [-40, -20, 0, 20, 40].map((slopeUrad, i) => ({ posMm: -1000 + 500 * i, slopeUrad }));
    expect(bowCorrection(rising)).toEqual({ shape: 'sag', middleScrews: 'raise' });
    expect(bowCorrection(rising.map((p) => ({ ...p, slopeUrad: -p.slopeUrad })))).toEqual({ shape: 'hog', middleScrews: 'lower' });
  });
});
