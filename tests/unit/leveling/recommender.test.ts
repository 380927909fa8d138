import { describe, expect, it } from 'vitest';
import {
  ADJUST_STAGES,
  buildFootprint,
  createVirtualMachine,
  fitBaseModel,
  incrementUm,
  learnFromRound,
  nominalResponse,
  observedState,
  recommendMoves,
  ruleOfThumbMoves,
  runVirtualSession,
  takeReadings,
  updateResponse,
  vectorToState,
  type Screw,
} from '@/lib/leveling';

const TRAVEL_MM = 1600;
const screws: Screw[] = buildFootprint([
  { id: 'FL', kind: 'corner', xMm: -1200, yMm: -1000, thread: { pitchMm: 3 } },
  { id: 'FR', kind: 'corner', xMm: 1200, yMm: -1000, thread: { pitchMm: 3 } },
  { id: 'RL', kind: 'corner', xMm: -1200, yMm: 1000, thread: { pitchMm: 3 } },
  { id: 'RR', kind: 'corner', xMm: 1200, yMm: 1000, thread: { pitchMm: 3 } },
  { id: 'ML', kind: 'middle', xMm: -1200, yMm: 0, thread: { pitchMm: 3 } },
  { id: 'MR', kind: 'middle', xMm: 1200, yMm: 0, thread: { pitchMm: 3 } },
]);
const response = nominalResponse(screws, TRAVEL_MM);
const state = (tiltX: number, tiltY: number, twist: number, bow: number, sweepX = 0, sweepY = 0) =>
  vectorToState([tiltX, tiltY, twist, bow, sweepX, sweepY]);
const predicted = (moves: { id: string; raiseUm: number }[], row: number) =>
  moves.reduce((sum, m) => sum + response[row]![screws.findIndex((s) => s.id === m.id)]! * m.raiseUm, 0);

describe('nominal response of a base carried on its corners', () => {
  it('raising both right corners tilts X by raise / width, without twist (rigid geometry)', () => {
    const raised = [{ id: 'FR', raiseUm: 240 }, { id: 'RR', raiseUm: 240 }];
    expect(predicted(raised, 0)).toBeCloseTo(240 / 2.4, 9);
    expect(predicted(raised, 2)).toBeCloseTo(0, 9);
  });

  it('raising one corner twists the base: its end changes cross-slope, the other end does not', () => {
    const raised = [{ id: 'RL', raiseUm: 120 }];
    const crossAt = (yMm: number) => predicted(raised, 0) + (predicted(raised, 2) * yMm) / TRAVEL_MM;
    expect(crossAt(1000)).toBeCloseTo(-120 / 2.4, 9);
    expect(crossAt(-1000)).toBeCloseTo(0, 9);
  });

  it('raising the middle screws reduces sag (common trade practice, no source)', () => {
    expect(predicted([{ id: 'ML', raiseUm: 50 }, { id: 'MR', raiseUm: 50 }], 3)).toBeLessThan(0);
  });
});

describe('recommended moves', () => {
  it('rough level with the nominal response: raise-only corners that cancel the tilt within the rounding', () => {
    const moves = recommendMoves({ stage: 'rough-level', screws, state: state(150, -90, 0, 0), response });
    expect(moves.length).toBeGreaterThan(0);
    moves.forEach((m) => {
      expect(m.raiseUm).toBeGreaterThan(0);
      expect(screws.find((s) => s.id === m.id)!.kind).toBe('corner');
    });
    expect(Math.abs(150 + predicted(moves, 0))).toBeLessThan(20);
    expect(Math.abs(-90 + predicted(moves, 1))).toBeLessThan(20);
  });

  it('each move is a whole number of 5° increments', () => {
    const step = incrementUm(3, 5);
    recommendMoves({ stage: 'twist', screws, state: state(12, 5, 60, 0), response }).forEach((m) => {
      expect(Math.abs(m.degrees / 5 - Math.round(m.degrees / 5))).toBeLessThan(1e-9);
      expect(m.raiseUm / step).toBeCloseTo(Math.round(m.raiseUm / step), 9);
    });
  });

  it('bow moves the middle screws only, all by the same amount, and lowers them for hog', () => {
    const moves = recommendMoves({ stage: 'bow', screws, state: state(0, 0, 0, -150), response });
    expect(moves.map((m) => m.id).sort()).toEqual(['ML', 'MR']);
    expect(moves[0]!.raiseUm).toBe(moves[1]!.raiseUm);
    expect(moves[0]!.raiseUm).toBeLessThan(0);
  });

  it('a state already at zero asks for no moves', () => {
    ADJUST_STAGES.forEach((stage) => expect(recommendMoves({ stage, screws, state: state(0, 0, 0, 0), response })).toEqual([]));
  });
});

describe('learning', () => {
  it('a Broyden update moves the prediction for the moves done toward what was observed', () => {
    const raises = [0, 100, 0, 100, 0, 0];
    const observed = { tiltXUrad: 70, twistUrad: 12 };
    const learned = updateResponse(response, raises, observed, 1);
    const predict = (r: number[][], row: number) => r[row]!.reduce((sum, v, j) => sum + v * raises[j]!, 0);
    expect(predict(learned, 0)).toBeCloseTo(70, 9);
    expect(predict(learned, 2)).toBeCloseTo(12, 9);
    expect(learned[1]).toEqual(response[1]);
  });

  it('one round of moves and readings halves the error of the predicted bow response wherever it was clear', () => {
    let clear = 0;
    for (let seed = 1; seed <= 10; seed++) {
      const machine = createVirtualMachine({ seed });
      const ids = machine.screws.map((s) => s.id);
      const nominal = nominalResponse(machine.screws, machine.travelMm);
      const options = { screwIds: ids, response: nominal, travelMm: machine.travelMm };
      const moves = machine.screws.filter((s) => s.kind === 'middle').map((s) => ({ screwId: s.id, raiseUm: 120 }));
      const raises = ids.map((id) => (moves.some((m) => m.screwId === id) ? 120 : 0));
      const survey = () => observedState(fitBaseModel(Array.from({ length: 8 }, () => takeReadings(machine, 'bow')).flat(), options));
      const before = survey();
      const trueBefore = machine.trueState().bowUrad;
      moves.forEach((m) => machine.applyMove(m.screwId, m.raiseUm));
      const trueChange = machine.trueState().bowUrad - trueBefore;
      const after = survey();
      const learned = learnFromRound({ response: nominal, screwIds: ids, moves, before, after });
      const error = (r: number[][]) => Math.abs(r[3]!.reduce((sum, v, j) => sum + v * raises[j]!, 0) - trueChange);
      // Only where the nominal guess is off by more than the readings resolve (half a division is 10 µrad).
      if (error(nominal) <= 10) continue;
      clear++;
      expect(error(learned), `seed ${seed}`).toBeLessThan(error(nominal) / 2);
    }
    expect(clear).toBeGreaterThanOrEqual(3);
  });

  it('with learning, the recommender brings seeded virtual machines within tolerance in every stage', () => {
    for (let seed = 1; seed <= 25; seed++) {
      const { stages } = runVirtualSession({ machine: createVirtualMachine({ seed }), method: 'recommender' });
      stages.forEach((s) => expect(s.converged, `seed ${seed} ${s.stage}`).toBe(true));
      expect(Math.max(...stages.map((s) => s.rounds)), `seed ${seed}`).toBeLessThanOrEqual(4);
    }
  });
});

describe('rule of thumb', () => {
  it('raises the low side of the worse axis', () => {
    const moves = ruleOfThumbMoves({
      stage: 'rough-level',
      screws,
      readings: [
        { kind: 'level', axis: 'x', xMm: 0, yMm: 0, slopeUrad: 60 },
        { kind: 'level', axis: 'y', xMm: 0, yMm: 0, slopeUrad: -30 },
      ],
    });
    expect(moves.map((m) => m.id).sort()).toEqual(['FL', 'RL']);
    // slope × span: 60 µrad × 2400 mm = 144 µm; nearest whole 5° increment of 41.67 µm is 3, 125 µm (derived).
    moves.forEach((m) => expect(m.raiseUm).toBeCloseTo(125, 9));
  });
});
