import { describe, expect, it } from 'vitest';
import {
  LevelingError,
  analyzeSweep,
  analyzeTravel,
  buildFootprint,
  convertSlope,
  divisionUrad,
  fitBaseModel,
  nominalResponse,
  recommendMoves,
  reversal,
  solveTilt,
  type LevelingErrorCode,
} from '@/lib/leveling';

function expectLevelingError(run: () => unknown, code: LevelingErrorCode, message: RegExp): void {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(LevelingError);
    expect((error as LevelingError).code).toBe(code);
    expect((error as LevelingError).message).toMatch(message);
    return;
  }
  throw new Error(`expected a LevelingError "${code}", nothing was thrown`);
}

const square = [
  { id: 'A', x: 0, y: 0, pitchMm: 3 },
  { id: 'B', x: 1000, y: 0, pitchMm: 3 },
  { id: 'C', x: 0, y: 1000, pitchMm: 3 },
  { id: 'D', x: 1000, y: 1000, pitchMm: 3 },
];

describe('bad input gets a LevelingError, never a silent NaN', () => {
  it('NaN and infinity', () => {
    expectLevelingError(() => convertSlope(Number.NaN, 'urad', 'arcsec'), 'not-finite', /slope must be a finite number, got NaN/);
    expectLevelingError(() => reversal(Number.POSITIVE_INFINITY, 1), 'not-finite', /reading at 0° must be a finite number, got Infinity/);
    expectLevelingError(() => solveTilt({ screws: square, slopeXUrad: Number.NaN, slopeYUrad: 0 }), 'not-finite', /slope X/);
    expectLevelingError(
      () => solveTilt({ screws: [...square.slice(0, 3), { id: 'D', x: Number.NEGATIVE_INFINITY, y: 0, pitchMm: 3 }], slopeXUrad: 1, slopeYUrad: 0 }),
      'not-finite',
      /screw 4 x/,
    );
    expectLevelingError(() => analyzeSweep({ diameterMm: 254, frontUm: Number.NaN, backUm: 0, leftUm: 0, rightUm: 0 }), 'not-finite', /front reading/);
    expectLevelingError(() => analyzeTravel([{ posMm: 0, slopeUrad: Number.NaN }]), 'not-finite', /travel reading 1 slope/);
  });

  it('fewer than three screws', () => {
    expectLevelingError(() => solveTilt({ screws: square.slice(0, 2), slopeXUrad: 1, slopeYUrad: 1 }), 'too-few-screws', /at least 3 screws, got 2/);
  });

  it('screws on one line', () => {
    const inLine = [0, 500, 1000].map((x, i) => ({ id: `S${i}`, x, y: x / 2, pitchMm: 3 }));
    expectLevelingError(() => solveTilt({ screws: inLine, slopeXUrad: 1, slopeYUrad: 1 }), 'collinear-screws', /one line/);
  });

  it('zero or negative pitch, tpi or lift per turn', () => {
    expectLevelingError(() => solveTilt({ screws: [...square.slice(0, 3), { id: 'D', x: 1000, y: 1000, pitchMm: 0 }], slopeXUrad: 1, slopeYUrad: 1 }), 'bad-pitch', /pitch of screw D must be greater than zero, got 0/);
    expectLevelingError(
      () => buildFootprint(square.map((s) => ({ id: s.id, kind: 'corner' as const, xMm: s.x, yMm: s.y, thread: { tpi: -8 } }))),
      'bad-pitch',
      /threads per inch must be greater than zero/,
    );
    expectLevelingError(
      () => buildFootprint(square.map((s) => ({ id: s.id, kind: 'corner' as const, xMm: s.x, yMm: s.y, thread: { pitchMm: 3 }, liftPerTurnMm: -1 }))),
      'bad-pitch',
      /lift per turn/,
    );
  });

  it('a state that is not a number', () => {
    const screws = buildFootprint(square.map((s) => ({ id: s.id, kind: 'corner' as const, xMm: s.x, yMm: s.y, thread: { pitchMm: 3 } })));
    const state = { tiltXUrad: Number.NaN, tiltYUrad: 0, twistUrad: 0, bowUrad: 0, sweepXUrad: 0, sweepYUrad: 0 };
    expectLevelingError(() => recommendMoves({ stage: 'rough-level', screws, state, response: nominalResponse(screws, 1000) }), 'not-finite', /state tiltXUrad/);
  });

  it('empty travel', () => {
    expectLevelingError(() => analyzeTravel([]), 'empty-travel', /at least one reading/);
  });

  it('other refusals: sensitivity, diameter, duplicate and unknown screws', () => {
    expectLevelingError(() => divisionUrad(0, 'mm/m'), 'bad-sensitivity', /level sensitivity/);
    expectLevelingError(() => analyzeSweep({ diameterMm: -254, frontUm: 0, backUm: 0, leftUm: 0, rightUm: 0 }), 'bad-diameter', /sweep diameter/);
    expectLevelingError(
      () => buildFootprint(square.map((s) => ({ id: 'A', kind: 'corner' as const, xMm: s.x, yMm: s.y, thread: { pitchMm: 3 } }))),
      'duplicate-screw',
      /"A" is used twice/,
    );
    expectLevelingError(
      () => fitBaseModel([{ kind: 'move', screwId: 'Z', raiseUm: 10 }], { screwIds: ['A'], response: [[0]], travelMm: 1000 }),
      'unknown-screw',
      /"Z"/,
    );
  });
});
