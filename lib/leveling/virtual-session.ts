import { fitBaseModel, observedState, type BaseModelEntry, type MoveDone, type Reading } from './base-model';
import { readingToSlopeUrad } from './level';
import { recommendMoves } from './recommender';
import { learnFromRound, nominalResponse, type Response } from './response';
import { ruleOfThumbMoves } from './rule-of-thumb';
import {
  ADJUST_STAGES,
  DEFAULT_TOLERANCES,
  readingPlan,
  stageScrews,
  stageWithinTolerance,
  type AdjustStage,
  type Tolerances,
} from './stages';
import type { VirtualMachine } from './virtual-machine';

/** Who decides the moves: the trade's manual rule of thumb, or Levelwire's learning recommender. */
export type Method = 'rule-of-thumb' | 'recommender';

/** One stage of a virtual session: adjustment rounds and readings it took, and whether it ended within tolerance. */
export interface StageOutcome {
  stage: AdjustStage;
  rounds: number;
  readings: number;
  converged: boolean;
}

/** Standard uncertainty of a vial reading in divisions: half-division steps plus the reader's scatter (Levelwire's estimate). */
const READING_SIGMA_DIV = 0.25;

/** Takes a stage's planned readings from the virtual machine, as a technician would enter them. */
export function takeReadings(machine: VirtualMachine, stage: AdjustStage): Reading[] {
  return readingPlan(stage, machine.travelMm).map((planned): Reading => {
    if (planned.kind === 'sweep') return { kind: 'sweep', ...machine.readSweep(planned.diameterMm) };
    const div = machine.readLevel(planned.axis, planned.xMm, planned.yMm);
    return {
      ...planned,
      slopeUrad: readingToSlopeUrad(div, machine.divisionUrad),
      sigmaUrad: READING_SIGMA_DIV * machine.divisionUrad,
    };
  });
}

function countReadings(readings: Reading[]): number {
  return readings.reduce((sum, r) => sum + (r.kind === 'level' ? 1 : 4), 0);
}

/**
 * Runs a virtual machine through the adjust stages with one method; each round is moves then the stage's readings.
 * `clock` (ms, passed in) times each recommendation: the base model fit, the moves, and learning from the round before.
 */
export function runVirtualSession(input: {
  machine: VirtualMachine;
  method: Method;
  tolerances?: Tolerances;
  incrementDeg?: number;
  maxRounds?: number;
  clock?: () => number;
}): { stages: StageOutcome[]; recommendationMs: number[] } {
  const { machine, method, tolerances = DEFAULT_TOLERANCES, incrementDeg = 5, maxRounds = 12, clock } = input;
  const { screws, travelMm } = machine;
  const screwIds = screws.map((s) => s.id);
  const entries: BaseModelEntry[] = [];
  const recommendationMs: number[] = [];
  let response: Response = nominalResponse(screws, travelMm);
  const stages: StageOutcome[] = [];
  let learningMs = 0;

  for (const stage of ADJUST_STAGES.filter((s) => stageScrews(s, screws).length > 0)) {
    let readings = takeReadings(machine, stage);
    entries.push(...readings);
    let readingCount = countReadings(readings);
    let rounds = 0;
    while (!stageWithinTolerance(stage, readings, tolerances) && rounds < maxRounds) {
      const started = clock?.();
      const moves =
        method === 'recommender'
          ? recommendMoves({
              stage,
              screws,
              state: fitBaseModel(entries, { screwIds, response, travelMm }).state,
              response,
              tolerances,
              incrementDeg,
            })
          : ruleOfThumbMoves({ stage, screws, readings, tolerances, incrementDeg });
      if (started !== undefined && clock) recommendationMs.push(clock() - started + learningMs);
      const done = moves.map((m): MoveDone => ({ kind: 'move', screwId: m.id, raiseUm: m.raiseUm }));
      done.forEach((m) => machine.applyMove(m.screwId, m.raiseUm));
      entries.push(...done);
      const before = readings;
      readings = takeReadings(machine, stage);
      entries.push(...readings);
      readingCount += countReadings(readings);
      rounds++;
      if (method === 'recommender') {
        const learningStarted = clock?.();
        response = learn(response, screwIds, travelMm, before, done, readings);
        learningMs = learningStarted !== undefined && clock ? clock() - learningStarted : 0;
      }
    }
    stages.push({ stage, rounds, readings: readingCount, converged: stageWithinTolerance(stage, readings, tolerances) });
  }
  return { stages, recommendationMs };
}

/** Compares what one round's readings show before and after its moves, and updates the response. */
function learn(
  response: Response,
  screwIds: string[],
  travelMm: number,
  before: Reading[],
  moves: MoveDone[],
  after: Reading[],
): Response {
  const estimate = (round: Reading[]) => observedState(fitBaseModel(round, { screwIds, response, travelMm }));
  return learnFromRound({
    response,
    screwIds,
    moves,
    before: estimate(before),
    after: estimate(after),
  });
}
