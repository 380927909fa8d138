import { MEASURES, type BaseState, type Measure } from './base-state';
import { requireFinite } from './errors';
import type { Screw } from './footprint';
import { solveSemiDefinite } from './linear-algebra';
import type { Response } from './response';
import { DEFAULT_TOLERANCES, stageMovesEqually, stageScrews, stageTargets, type AdjustStage, type Tolerances } from './stages';
import { incrementUm, screwMove, type ScrewMove } from './tilt-solve';

/** What the recommender needs: the stage, the footprint, the base model's state (µrad) and the learned response. */
export interface RecommendInput {
  stage: AdjustStage;
  screws: Screw[];
  state: BaseState;
  response: Response;
  tolerances?: Tolerances;
  /** Practical swing increment in degrees (default 5). */
  incrementDeg?: number;
}

/** A group of screws turned together by one amount: a corner alone, or all middle screws. */
interface Group {
  screws: Screw[];
  stepUm: number;
  /** µrad of each targeted measure per µm of the group's raise. */
  effect: number[];
}

/** Pull toward small moves, relative to the strongest screw: picks the smallest of equally good answers. */
const MOVE_SIZE_WEIGHT = 1e-8;

/** Middle screws may go finer than the practical increment, halving it up to this many times, when it is too coarse. */
const FINER_HALVINGS_FOR_MIDDLES = 2;

/**
 * The next moves for a stage (µm, turns and degrees; negative lowers), rounded to the swing increment:
 * weighted least squares of the targeted measures (each over its tolerance) through the learned response;
 * corners raise only; middle screws move together, in half or quarter increments when a whole one cannot
 * land every measure within tolerance. Screws left still are not listed.
 */
export function recommendMoves(input: RecommendInput): ScrewMove[] {
  const { stage, screws, state, response, tolerances = DEFAULT_TOLERANCES, incrementDeg = 5 } = input;
  MEASURES.forEach((measure) => requireFinite(`state ${measure}`, state[measure]));
  const targets = Object.entries(stageTargets(stage, tolerances)) as [Measure, number][];
  const start = targets.map(([measure, toleranceUrad]) => state[measure] / toleranceUrad);
  const equal = stageMovesEqually(stage);
  const halvings = equal ? FINER_HALVINGS_FOR_MIDDLES : 0;
  let plan: { groups: Group[]; raisesUm: number[] } = { groups: [], raisesUm: [] };
  for (let k = 0; k <= halvings; k++) {
    const groups = stageGroups(stage, screws, response, targets, incrementDeg / 2 ** k);
    const unrounded = solveGroups(groups, start);
    plan = { groups, raisesUm: bestRounding(groups, start, equal ? unrounded : raiseOnly(unrounded)) };
    if (predicted(groups, start, plan.raisesUm).every((m) => Math.abs(m) <= TOLERANCE_MARGIN)) break;
  }
  return plan.groups.flatMap((group, g) =>
    group.screws
      .map((screw) => screwMove(screw.id, plan.raisesUm[g]!, screw.liftPerTurnMm))
      .filter((move) => move.raiseUm !== 0),
  );
}

function stageGroups(
  stage: AdjustStage,
  screws: Screw[],
  response: Response,
  targets: [Measure, number][],
  incrementDeg: number,
): Group[] {
  const allowed = stageScrews(stage, screws);
  const sets = stageMovesEqually(stage) ? (allowed.length > 0 ? [allowed] : []) : allowed.map((s) => [s]);
  return sets.map((set) => ({
    screws: set,
    stepUm: Math.max(...set.map((s) => incrementUm(s.liftPerTurnMm, incrementDeg))),
    effect: targets.map(([measure, toleranceUrad]) => {
      const row = response[MEASURES.indexOf(measure)]!;
      return set.reduce((sum, s) => sum + row[screws.indexOf(s)]!, 0) / toleranceUrad;
    }),
  }));
}

/** Raises (µm) that minimise Σ(start + effect·raise)², with a faint pull toward small moves. */
function solveGroups(groups: Group[], start: number[]): number[] {
  const n = groups.map((a) => groups.map((b) => dot(a.effect, b.effect)));
  const largest = Math.max(...n.map((row, i) => row[i]!), Number.MIN_VALUE);
  n.forEach((row, i) => (row[i]! += MOVE_SIZE_WEIGHT * largest));
  return solveSemiDefinite(
    n,
    groups.map((g) => -dot(g.effect, start)),
  );
}

/** Shifts the raises so none is negative: the highest corner stays, the rest come up (raise-only). */
function raiseOnly(raisesUm: number[]): number[] {
  const lowest = Math.min(...raisesUm);
  return raisesUm.map((r) => r - lowest);
}

/**
 * Of every choice of the increment just below or above each raise (one more either way for a single group),
 * the one whose predicted measures sit best within tolerance.
 */
function bestRounding(groups: Group[], start: number[], raisesUm: number[]): number[] {
  const spread = groups.length === 1 ? 1 : 0;
  const choices = raisesUm.map((r, g) => {
    const step = groups[g]!.stepUm;
    const below = Math.floor(r / step);
    const above = Math.ceil(r / step);
    const steps = Array.from({ length: above - below + 1 + 2 * spread }, (_, i) => below - spread + i);
    return steps.map((n) => n * step);
  });
  let best: number[] = [];
  let bestCost = Infinity;
  const visit = (g: number, picked: number[]): void => {
    if (g === choices.length) {
      const cost = toleranceCost(groups, start, picked);
      if (cost < bestCost) [best, bestCost] = [picked, cost];
      return;
    }
    for (const value of choices[g]!) visit(g + 1, [...picked, value]);
  };
  visit(0, []);
  return best;
}

/** Share of its tolerance a measure may use before the cost climbs steeply: room for the estimate's error. */
const TOLERANCE_MARGIN = 0.8;
const EXCESS_WEIGHT = 100;

/** Each targeted measure over its tolerance after the raises, by the response. */
function predicted(groups: Group[], start: number[], raisesUm: number[]): number[] {
  return start.map((s, m) => groups.reduce((acc, g, i) => acc + g.effect[m]! * raisesUm[i]!, s));
}

/** Sum of squared measures over tolerance, plus a steep charge for any beyond the margin. */
function toleranceCost(groups: Group[], start: number[], raisesUm: number[]): number {
  return predicted(groups, start, raisesUm).reduce((sum, after) => {
    const excess = Math.max(0, Math.abs(after) - TOLERANCE_MARGIN);
    return sum + after * after + EXCESS_WEIGHT * excess * excess;
  }, 0);
}

function dot(a: number[], b: number[]): number {
  return a.reduce((sum, value, i) => sum + value * b[i]!, 0);
}
