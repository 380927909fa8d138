import { LevelingError, requireFinite, requirePositive } from './errors';
import { invertSymmetric, multiply, normalEquations, solveSemiDefinite } from './linear-algebra';
import { MEASURES, vectorToState, type BaseState, type Measure } from './base-state';
import type { Response } from './response';
import { analyzeSweep } from './sweep';

/**
 * A level reading: slope in µrad along `axis` (positive: the +x / +y end higher) with the level's centre at
 * (xMm, yMm) from the table centre; sigmaUrad is its standard uncertainty (default 5 µrad).
 */
export interface LevelReading {
  kind: 'level';
  axis: 'x' | 'y';
  xMm: number;
  yMm: number;
  slopeUrad: number;
  sigmaUrad?: number;
}

/** A spindle sweep: indicator readings in µm (positive: tip pushed in) on a circle of diameter in mm. */
export interface SweepReading {
  kind: 'sweep';
  diameterMm: number;
  frontUm: number;
  backUm: number;
  leftUm: number;
  rightUm: number;
  sigmaUm?: number;
}

/** A move reported done: the screw rose raiseUm µm (negative: lowered). */
export interface MoveDone {
  kind: 'move';
  screwId: string;
  raiseUm: number;
}

/** One measured value for the base model. */
export type Reading = LevelReading | SweepReading;

/** What a session feeds the base model, in the order it happened. */
export type BaseModelEntry = Reading | MoveDone;

/** The base model: the current state (µrad) with its 1σ uncertainty (µrad), what was observed, and how many readings. */
export interface BaseModel {
  state: BaseState;
  sigma: BaseState;
  observed: Record<Measure, boolean>;
  readingCount: number;
}

/** Options of the fit: screw order of `response`'s columns, the Y travel in mm that twist and bow are stated over. */
export interface BaseModelOptions {
  screwIds: string[];
  response: Response;
  travelMm: number;
  /** Weight of a reading per later round of moves, in (0, 1]: older readings count less (default 0.25). */
  forgetting?: number;
}

const DEFAULT_LEVEL_SIGMA_URAD = 5;
const DEFAULT_INDICATOR_SIGMA_UM = 1;
const PRIOR_SIGMA_URAD = 1e4;

interface Row {
  h: number[];
  valueUrad: number;
  sigmaUrad: number;
  /** State change in µrad the moves done before this reading made, by the response. */
  shiftUrad: number[];
  round: number;
}

/** Where a reading sits in the session: the state shift the moves before it made, and its round. */
type Placement = Pick<Row, 'shiftUrad' | 'round'>;

function levelRow(reading: LevelReading, travelMm: number, { shiftUrad, round }: Placement): Row {
  requireFinite('reading slope', reading.slopeUrad);
  const xMm = requireFinite('reading x', reading.xMm);
  const yMm = requireFinite('reading y', reading.yMm);
  const sigmaUrad = requirePositive('reading sigma', reading.sigmaUrad ?? DEFAULT_LEVEL_SIGMA_URAD, 'bad-tolerance');
  const h =
    reading.axis === 'x' ? [1, 0, yMm / travelMm, 0, 0, 0] : [0, 1, xMm / travelMm, yMm / travelMm, 0, 0];
  return { h, valueUrad: reading.slopeUrad, sigmaUrad, shiftUrad, round };
}

function sweepRows(reading: SweepReading, { shiftUrad, round }: Placement): Row[] {
  const sweep = analyzeSweep(reading);
  const sigmaUm = requirePositive('indicator sigma', reading.sigmaUm ?? DEFAULT_INDICATOR_SIGMA_UM, 'bad-tolerance');
  const sigmaUrad = (Math.SQRT2 * sigmaUm * 1000) / reading.diameterMm;
  return [
    { h: [0, 0, 0, 0, 1, 0], valueUrad: sweep.xUrad, sigmaUrad, shiftUrad, round },
    { h: [0, 0, 0, 0, 0, 1], valueUrad: sweep.yUrad, sigmaUrad, shiftUrad, round },
  ];
}

/** Readings in each entry: a level reading is one, a sweep is four indicator readings. */
function readingsIn(entry: Reading): number {
  return entry.kind === 'level' ? 1 : 4;
}

/**
 * Least-squares base model from every entry of a session: each reading is explained by the state before any
 * move plus the response to the moves done before it; the result is the state after the last move.
 */
export function fitBaseModel(entries: BaseModelEntry[], options: BaseModelOptions): BaseModel {
  const { screwIds, response, forgetting = 0.25 } = options;
  const travelMm = requirePositive('travel', options.travelMm, 'empty-travel');
  requirePositive('forgetting', forgetting, 'bad-tolerance');
  const movedUm = new Array<number>(screwIds.length).fill(0);
  let shiftUrad = multiply(response, movedUm);
  const rows: Row[] = [];
  let round = 0;
  let readingCount = 0;
  let lastWasMove = false;
  for (const entry of entries) {
    if (entry.kind === 'move') {
      const index = screwIds.indexOf(entry.screwId);
      if (index < 0) throw new LevelingError('unknown-screw', `move names screw "${entry.screwId}", not in the footprint`);
      movedUm[index]! += requireFinite(`raise of screw ${entry.screwId}`, entry.raiseUm);
      if (!lastWasMove) round++;
      lastWasMove = true;
      continue;
    }
    if (lastWasMove) shiftUrad = multiply(response, movedUm);
    lastWasMove = false;
    readingCount += readingsIn(entry);
    if (entry.kind === 'level') rows.push(levelRow(entry, travelMm, { shiftUrad, round }));
    else rows.push(...sweepRows(entry, { shiftUrad, round }));
  }
  const values = rows.map((row) => row.valueUrad - dot(row.h, row.shiftUrad));
  const weights = rows.map((row) => forgetting ** (round - row.round) / (row.sigmaUrad * row.sigmaUrad));
  const { n, rhs } = normalEquations(
    rows.map((row) => row.h),
    values,
    weights,
  );
  const informed = n.map((r, i) => r[i]! * PRIOR_SIGMA_URAD * PRIOR_SIGMA_URAD > 100);
  n.forEach((r, i) => (r[i]! += 1 / (PRIOR_SIGMA_URAD * PRIOR_SIGMA_URAD)));
  const before = solveSemiDefinite(n, rhs);
  const covariance = invertSymmetric(n);
  const now = before.map((value, i) => value + dot(response[i]!, movedUm));
  const scale = residualScale(rows, values, weights, before, informed.filter(Boolean).length);
  const sigmas = covariance.map((r, i) => scale * Math.sqrt(Math.max(0, r[i]!)));
  return {
    state: vectorToState(now),
    sigma: vectorToState(sigmas),
    observed: Object.fromEntries(MEASURES.map((m, i) => [m, informed[i]!])) as Record<Measure, boolean>,
    readingCount,
  };
}

/** √(χ²/degrees of freedom), never below 1: readings that scatter more than their sigma widen the uncertainty. */
function residualScale(rows: Row[], values: number[], weights: number[], fitted: number[], unknowns: number): number {
  const freedom = rows.length - unknowns;
  if (freedom <= 0) return 1;
  const chiSquare = rows.reduce((sum, row, i) => sum + weights[i]! * (values[i]! - dot(row.h, fitted)) ** 2, 0);
  return Math.max(1, Math.sqrt(chiSquare / freedom));
}

function dot(a: number[], b: number[]): number {
  return a.reduce((sum, value, i) => sum + value * b[i]!, 0);
}

/** Measures a model observed, with their values in µrad: what a round of readings can teach the recommender. */
export function observedState(model: BaseModel): Partial<BaseState> {
  return Object.fromEntries(MEASURES.filter((m) => model.observed[m]).map((m) => [m, model.state[m]]));
}
