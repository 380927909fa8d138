import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  MM_PER_IN,
  assertSupportingPlane,
  buildFootprint,
  createVirtualMachine,
  divisionUrad,
  fitPlane,
  incrementUm,
  roundMoves,
  solveTilt,
  threadPitchMm,
  type Screw,
  type TiltScrew,
} from '@/lib/leveling';

const IN = MM_PER_IN;
const UM_PER_IN = IN * 1000;

describe('thread pitch', () => {
  it('1-8 UNC is 0.125 in and 3/4-10 UNC is 0.100 in (ASME B1.1, unified coarse series)', () => {
    expect(threadPitchMm({ tpi: 8 })).toBeCloseTo(0.125 * IN, 12);
    expect(threadPitchMm({ tpi: 10 })).toBeCloseTo(0.1 * IN, 12);
  });
});

describe('worked example, inch (TRADE.md §4, derived)', () => {
  // Screws FL(0,0), FR(80,0), RL(0,40), RR(80,40) in; X reads +3 div, Y -2 div of a 0.0005 in/10 in level.
  const division = divisionUrad(0.0005, 'in/10in');
  const at = (id: string, xIn: number, yIn: number, pitchMm: number): TiltScrew => ({ id, x: xIn * IN, y: yIn * IN, pitchMm });
  const screws = (pitchMm: number) => [at('FL', 0, 0, pitchMm), at('FR', 80, 0, pitchMm), at('RL', 0, 40, pitchMm), at('RR', 80, 40, pitchMm)];
  const solve = (pitchMm: number) =>
    solveTilt({ screws: screws(pitchMm), slopeXUrad: 3 * division, slopeYUrad: -2 * division }).moves;

  it('raises FL 0.012, FR 0, RL 0.016, RR 0.004 in', () => {
    const raisesIn = solve(0.125 * IN).map((m) => m.raiseUm / UM_PER_IN);
    [0.012, 0, 0.016, 0.004].forEach((expected, i) => expect(raisesIn[i]).toBeCloseTo(expected, 9));
  });

  it('on 1-8 UNC: FL 0.096 turn (34.56°), RL 0.128 turn (46.08°), RR 11.52°', () => {
    const [fl, fr, rl, rr] = solve(threadPitchMm({ tpi: 8 }));
    expect(fl!.turns).toBeCloseTo(0.096, 9);
    expect(fl!.degrees).toBeCloseTo(34.56, 7);
    expect(fr!.degrees).toBeCloseTo(0, 9);
    expect(rl!.turns).toBeCloseTo(0.128, 9);
    expect(rl!.degrees).toBeCloseTo(46.08, 7);
    expect(rr!.degrees).toBeCloseTo(11.52, 7);
  });

  it('on 3/4-10 UNC: FL 43.2°, RL 57.6°, RR 14.4°', () => {
    const [fl, , rl, rr] = solve(threadPitchMm({ tpi: 10 }));
    expect(fl!.degrees).toBeCloseTo(43.2, 7);
    expect(rl!.degrees).toBeCloseTo(57.6, 7);
    expect(rr!.degrees).toBeCloseTo(14.4, 7);
  });
});

describe('worked example, metric (TRADE.md §4, derived; M24 pitch 3 mm per ISO 261 coarse series)', () => {
  it('2000 x 1000 mm, 0.02 mm/m level, +3 div X, -2 div Y: 0.12, 0, 0.16, 0.04 mm; 14.4°, 0°, 19.2°, 4.8°', () => {
    const division = divisionUrad(0.02, 'mm/m');
    const screws: TiltScrew[] = [
      { id: 'FL', x: 0, y: 0, pitchMm: 3 },
      { id: 'FR', x: 2000, y: 0, pitchMm: 3 },
      { id: 'RL', x: 0, y: 1000, pitchMm: 3 },
      { id: 'RR', x: 2000, y: 1000, pitchMm: 3 },
    ];
    const { moves } = solveTilt({ screws, slopeXUrad: 3 * division, slopeYUrad: -2 * division });
    [120, 0, 160, 40].forEach((um, i) => expect(moves[i]!.raiseUm).toBeCloseTo(um, 9));
    [14.4, 0, 19.2, 4.8].forEach((deg, i) => expect(moves[i]!.degrees).toBeCloseTo(deg, 9));
  });
});

describe('least-squares plane through four corner heights (TRADE.md §4, derived; checked there with mathjs pinv)', () => {
  it('heights 0, 0.012, -0.004, 0.009 in give b = 1.5625e-4, c = -8.75e-5 and residuals ±warp/4', () => {
    const points = [
      { xMm: 0, yMm: 0 },
      { xMm: 80 * IN, yMm: 0 },
      { xMm: 0, yMm: 40 * IN },
      { xMm: 80 * IN, yMm: 40 * IN },
    ];
    const heightsUm = [0, 0.012, -0.004, 0.009].map((h) => h * UM_PER_IN);
    const plane = fitPlane(points, heightsUm);
    expect(plane.slopeXUrad).toBeCloseTo(156.25, 9);
    expect(plane.slopeYUrad).toBeCloseTo(-87.5, 9);
    const residualsIn = points.map(
      (p, i) => (heightsUm[i]! - (plane.offsetUm + (plane.slopeXUrad * p.xMm + plane.slopeYUrad * p.yMm) / 1000)) / UM_PER_IN,
    );
    residualsIn.forEach((r) => expect(Math.abs(r)).toBeCloseTo(0.00025, 12));
  });
});

describe('raise-only and balanced solves', () => {
  it('balanced keeps the mean height: moves sum to zero and some lower', () => {
    const screws: TiltScrew[] = [
      { id: 'A', x: -1000, y: -500, pitchMm: 3 },
      { id: 'B', x: 1000, y: -500, pitchMm: 3 },
      { id: 'C', x: 0, y: 800, pitchMm: 3 },
    ];
    const { moves } = solveTilt({ screws, slopeXUrad: 50, slopeYUrad: 20, raiseOnly: false });
    expect(moves.reduce((s, m) => s + m.raiseUm, 0)).toBeCloseTo(0, 9);
    expect(moves.some((m) => m.raiseUm < 0)).toBe(true);
  });
});

const PITCHES = [2.5, 3, 3.5, 25.4 / 8, 25.4 / 10];

const arbitraryFootprint = fc
  .array(
    fc.record({
      x: fc.integer({ min: -2000, max: 2000 }),
      y: fc.integer({ min: -1500, max: 1500 }),
      pitchMm: fc.constantFrom(...PITCHES),
    }),
    { minLength: 3, maxLength: 8 },
  )
  .filter((points) => {
    try {
      assertSupportingPlane(points.map((p) => ({ xMm: p.x, yMm: p.y })));
      const span = Math.max(...points.map((p) => Math.abs(p.x))) + Math.max(...points.map((p) => Math.abs(p.y)));
      return span > 500;
    } catch {
      return false;
    }
  })
  .map((points) => points.map((p, i): TiltScrew => ({ id: `S${i}`, ...p })));

const slope = fc.double({ min: -500, max: 500, noNaN: true });

describe('properties', () => {
  it('raise-only never lowers a screw, and the highest screw stays', () => {
    fc.assert(
      fc.property(arbitraryFootprint, slope, slope, (screws, slopeXUrad, slopeYUrad) => {
        const { moves } = solveTilt({ screws, slopeXUrad, slopeYUrad });
        moves.forEach((m) => expect(m.raiseUm).toBeGreaterThanOrEqual(0));
        expect(Math.min(...moves.map((m) => m.raiseUm))).toBeCloseTo(0, 9);
        roundMoves({ screws, moves, slopeXUrad, slopeYUrad }).moves.forEach((m) => expect(m.raiseUm).toBeGreaterThanOrEqual(0));
      }),
    );
  });

  it('solve, round to 5°, apply to a rigid virtual machine: level within the rounding it reports', () => {
    fc.assert(
      fc.property(arbitraryFootprint, slope, slope, fc.boolean(), (tilted, slopeXUrad, slopeYUrad, raiseOnly) => {
        const screws: Screw[] = buildFootprint(
          tilted.map((s) => ({ id: s.id, kind: 'corner', xMm: s.x, yMm: s.y, thread: { pitchMm: s.pitchMm } })),
        );
        const machine = createVirtualMachine({ seed: 1, rigid: true, screws, travelMm: 1000, asFound: { tiltXUrad: slopeXUrad, tiltYUrad: slopeYUrad } });
        const { moves } = solveTilt({ screws: tilted, slopeXUrad, slopeYUrad, raiseOnly });
        const rounded = roundMoves({ screws: tilted, moves, slopeXUrad, slopeYUrad });
        rounded.moves.forEach((m) => machine.applyMove(m.id, m.raiseUm));
        const xUrad = machine.readLevel('x', 0, 0) * machine.divisionUrad;
        const yUrad = machine.readLevel('y', 0, 0) * machine.divisionUrad;
        expect(xUrad).toBeCloseTo(rounded.residualXUrad, 6);
        expect(yUrad).toBeCloseTo(rounded.residualYUrad, 6);
        // Bound: each screw is at most half an increment off; the plane moves by its least-squares share of that.
        const bound = (axis: 'slopeXUrad' | 'slopeYUrad') =>
          tilted.reduce((sum, s, i) => {
            const unit = fitPlane(
              tilted.map((t) => ({ xMm: t.x, yMm: t.y })),
              tilted.map((_, j) => (j === i ? 1 : 0)),
            );
            return sum + Math.abs(unit[axis]) * (incrementUm(s.pitchMm, 5) / 2);
          }, 0);
        expect(Math.abs(xUrad)).toBeLessThanOrEqual(bound('slopeXUrad') + 1e-6);
        expect(Math.abs(yUrad)).toBeLessThanOrEqual(bound('slopeYUrad') + 1e-6);
      }),
    );
  });

  it('unrounded moves level a rigid virtual machine exactly', () => {
    fc.assert(
      fc.property(arbitraryFootprint, slope, slope, (tilted, slopeXUrad, slopeYUrad) => {
        const screws = buildFootprint(
          tilted.map((s) => ({ id: s.id, kind: 'corner' as const, xMm: s.x, yMm: s.y, thread: { pitchMm: s.pitchMm } })),
        );
        const machine = createVirtualMachine({ seed: 2, rigid: true, screws, travelMm: 1000, asFound: { tiltXUrad: slopeXUrad, tiltYUrad: slopeYUrad } });
        solveTilt({ screws: tilted, slopeXUrad, slopeYUrad }).moves.forEach((m) => machine.applyMove(m.id, m.raiseUm));
        expect(machine.readLevel('x', 0, 0) * machine.divisionUrad).toBeCloseTo(0, 6);
        expect(machine.readLevel('y', 0, 0) * machine.divisionUrad).toBeCloseTo(0, 6);
      }),
    );
  });
});
