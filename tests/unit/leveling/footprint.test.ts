import { describe, expect, it } from 'vitest';
import { MM_PER_IN, buildFootprint, checkHeights, readingPlan, stageScrews, type ScrewSpec } from '@/lib/leveling';

const specs: ScrewSpec[] = [
  { id: 'FL', kind: 'corner', xMm: -1000, yMm: -800, thread: { pitchMm: 3 }, specifiedHeightMm: 40 },
  { id: 'FR', kind: 'corner', xMm: 1000, yMm: -800, thread: { tpi: 8 }, specifiedHeightMm: 40 },
  { id: 'RL', kind: 'corner', xMm: -1000, yMm: 800, thread: { pitchMm: 3 }, liftPerTurnMm: 0.5 },
  { id: 'RR', kind: 'corner', xMm: 1000, yMm: 800, thread: { pitchMm: 3 } },
  { id: 'ML', kind: 'middle', xMm: -1000, yMm: 0, thread: { pitchMm: 3 } },
  { id: 'MR', kind: 'middle', xMm: 1000, yMm: 0, thread: { pitchMm: 3 } },
  { id: 'OL', kind: 'outrigger', xMm: -1400, yMm: 0, thread: { pitchMm: 3 } },
  { id: 'OR', kind: 'outrigger', xMm: 1400, yMm: 0, thread: { pitchMm: 3 } },
];

describe('footprint', () => {
  const screws = buildFootprint(specs);

  it('resolves the lift per turn: metric pitch, threads per inch (ASME B1.1: 1-8 UNC is 0.125 in), or a wedge pad', () => {
    expect(screws.map((s) => s.liftPerTurnMm)).toEqual([3, 0.125 * MM_PER_IN, 0.5, 3, 3, 3, 3, 3]);
  });

  it('checks each screw with a specified height against it', () => {
    const checks = checkHeights(screws, { FL: 40.3, FR: 41.2, RR: 12 }, 0.5);
    expect(checks.map((c) => [c.id, c.withinTolerance])).toEqual([
      ['FL', true],
      ['FR', false],
    ]);
    expect(checks[1]!.deviationMm).toBeCloseTo(1.2, 12);
  });

  it('lets corners alone make the rough level and twist moves, and middle screws alone the bow and sweep moves', () => {
    expect(stageScrews('rough-level', screws).map((s) => s.id)).toEqual(['FL', 'FR', 'RL', 'RR']);
    expect(stageScrews('twist', screws).map((s) => s.id)).toEqual(['FL', 'FR', 'RL', 'RR']);
    expect(stageScrews('bow', screws).map((s) => s.id)).toEqual(['ML', 'MR']);
    expect(stageScrews('spindle-sweep', screws).map((s) => s.id)).toEqual(['ML', 'MR']);
  });

  it('plans twist readings at both ends and the middle of the travel', () => {
    const plan = readingPlan('twist', 1200);
    expect(plan.filter((p) => p.kind === 'level' && p.axis === 'x').map((p) => (p.kind === 'level' ? p.yMm : NaN))).toEqual([-600, 0, 600]);
  });
});
