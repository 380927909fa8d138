import { describe, expect, it } from 'vitest';
import {
  buildFootprint,
  fitBaseModel,
  nominalResponse,
  type BaseModelEntry,
  type LevelReading,
  type Screw,
} from '@/lib/leveling';

const TRAVEL_MM = 1600;

/**
 * A base surface written out independently of the engine: height in µm at (x, y) mm for tilt X and Y, twist
 * and bow stated in µrad over the travel (z = ax·x + ay·y + t·x·y/L + w·y²/(2L)).
 */
function surfaceUm(s: { ax: number; ay: number; t: number; w: number }, xMm: number, yMm: number): number {
  return (s.ax * xMm + s.ay * yMm + (s.t * xMm * yMm) / TRAVEL_MM + (s.w * yMm * yMm) / (2 * TRAVEL_MM)) / 1000;
}

/** A level 200 mm long resting on the surface: slope from its two feet, in µrad. */
function levelOn(s: Parameters<typeof surfaceUm>[0], axis: 'x' | 'y', xMm: number, yMm: number): LevelReading {
  const half = 100;
  const [a, b] = axis === 'x' ? [surfaceUm(s, xMm - half, yMm), surfaceUm(s, xMm + half, yMm)] : [surfaceUm(s, xMm, yMm - half), surfaceUm(s, xMm, yMm + half)];
  return { kind: 'level', axis, xMm, yMm, slopeUrad: ((b - a) / (2 * half)) * 1000 };
}

function surveyOf(s: Parameters<typeof surfaceUm>[0]): LevelReading[] {
  const stations = [-800, -400, 0, 400, 800];
  return [
    ...stations.map((y) => levelOn(s, 'x', 0, y)),
    ...stations.map((y) => levelOn(s, 'y', 0, y)),
    levelOn(s, 'y', 600, 0),
  ];
}

const screws: Screw[] = buildFootprint([
  { id: 'FL', kind: 'corner', xMm: -1000, yMm: -900, thread: { pitchMm: 3 } },
  { id: 'FR', kind: 'corner', xMm: 1000, yMm: -900, thread: { pitchMm: 3 } },
  { id: 'RL', kind: 'corner', xMm: -1000, yMm: 900, thread: { pitchMm: 3 } },
  { id: 'RR', kind: 'corner', xMm: 1000, yMm: 900, thread: { pitchMm: 3 } },
  { id: 'ML', kind: 'middle', xMm: -1000, yMm: 0, thread: { pitchMm: 3 } },
  { id: 'MR', kind: 'middle', xMm: 1000, yMm: 0, thread: { pitchMm: 3 } },
]);
const options = { screwIds: screws.map((s) => s.id), response: nominalResponse(screws, TRAVEL_MM), travelMm: TRAVEL_MM };

// The fit carries a faint zero prior (10 000 µrad), so exact readings come back within 0.001 µrad.
describe('base model', () => {
  const truth = { ax: 35, ay: -120, t: 45, w: -30 };

  it('recovers tilt X, tilt Y, twist and bow from level readings of a known surface', () => {
    const model = fitBaseModel(surveyOf(truth), options);
    expect(model.state.tiltXUrad).toBeCloseTo(truth.ax, 3);
    expect(model.state.tiltYUrad).toBeCloseTo(truth.ay, 3);
    expect(model.state.twistUrad).toBeCloseTo(truth.t, 3);
    expect(model.state.bowUrad).toBeCloseTo(truth.w, 3);
    expect(model.readingCount).toBe(11);
    expect(model.observed).toMatchObject({ tiltXUrad: true, tiltYUrad: true, twistUrad: true, bowUrad: true, sweepXUrad: false });
  });

  it('uncertainty shrinks as readings add up, and an unobserved measure keeps a wide uncertainty', () => {
    const few = fitBaseModel(surveyOf(truth).slice(0, 6), options);
    const many = fitBaseModel([...surveyOf(truth), ...surveyOf(truth), ...surveyOf(truth)], options);
    expect(many.sigma.tiltXUrad).toBeLessThan(few.sigma.tiltXUrad);
    expect(many.sigma.sweepYUrad).toBeGreaterThan(1000);
  });

  it('readings that scatter widen the uncertainty beyond their stated sigma', () => {
    const clean = fitBaseModel(surveyOf(truth), options);
    const scattered = fitBaseModel(
      surveyOf(truth).map((r, i) => ({ ...r, slopeUrad: r.slopeUrad + (i % 2 === 0 ? 15 : -15) })),
      options,
    );
    expect(scattered.sigma.tiltXUrad).toBeGreaterThan(2 * clean.sigma.tiltXUrad);
  });

  it('carries earlier readings through the moves done since, by the response', () => {
    const response = options.response;
    const raiseUm = 120;
    const col = options.screwIds.indexOf('FR');
    const after = {
      ax: truth.ax + response[0]![col]! * raiseUm,
      ay: truth.ay + response[1]![col]! * raiseUm,
      t: truth.t + response[2]![col]! * raiseUm,
      w: truth.w + response[3]![col]! * raiseUm,
    };
    // Only one reading after the move: alone it could not give the state, with the earlier survey it can.
    const entries: BaseModelEntry[] = [...surveyOf(truth), { kind: 'move', screwId: 'FR', raiseUm }, levelOn(after, 'x', 0, 0)];
    const model = fitBaseModel(entries, options);
    expect(model.state.tiltXUrad).toBeCloseTo(after.ax, 3);
    expect(model.state.twistUrad).toBeCloseTo(after.t, 3);
    expect(model.state.bowUrad).toBeCloseTo(after.w, 3);
  });

  it('a sweep gives the spindle tram', () => {
    const model = fitBaseModel([{ kind: 'sweep', diameterMm: 254, leftUm: 0, rightUm: 10.16, frontUm: 1.27, backUm: 8.89 }], options);
    expect(model.state.sweepXUrad).toBeCloseTo(40, 3);
    expect(model.state.sweepYUrad).toBeCloseTo(30, 3);
    expect(model.readingCount).toBe(4);
  });
});
