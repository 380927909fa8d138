import type { BaseState } from './base-state';
import { LevelingError, requireFinite, requirePositive } from './errors';
import { buildFootprint, type Screw, type ScrewSpec, type Thread } from './footprint';
import { gaussian, pick, seededRandom, uniform, type Random } from './random';
import { nominalResponse } from './response';
import type { SweepReadings } from './sweep';

/** The hidden shape of a virtual base in µrad: tilt, twist and bow (see BaseState). */
export type BaseShape = Pick<BaseState, 'tiltXUrad' | 'tiltYUrad' | 'twistUrad' | 'bowUrad'>;

const SHAPE_MEASURES = ['tiltXUrad', 'tiltYUrad', 'twistUrad', 'bowUrad'] as const;

/** Options of a virtual machine; anything not given is drawn from the seed. */
export interface VirtualMachineOptions {
  seed: number;
  /** A rigid base: a plane on its screws, exact readings, no backlash, no twist or bow. */
  rigid?: boolean;
  screws?: Screw[];
  /** Y travel in mm that twist and bow are stated over, and the level stations span. */
  travelMm?: number;
  /** Slope of one vial division in µrad (default 20: a 0.02 mm/m level). */
  divisionUrad?: number;
  asFound?: Partial<BaseShape>;
}

/** A simulated machine on its screws: answers readings and takes moves; its state stays hidden from the engine. */
export interface VirtualMachine {
  readonly screws: Screw[];
  readonly travelMm: number;
  readonly divisionUrad: number;
  /** Vial reading in divisions (half-division steps), level along `axis` centred at (xMm, yMm); positive: +end higher. */
  readLevel(axis: 'x' | 'y', xMm: number, yMm: number): number;
  /** Indicator readings in µm on a circle of diameter in mm, zeroed at the left point. */
  readSweep(diameterMm: number): SweepReadings;
  /** Turns a screw by raiseUm µm (negative lowers); reversing direction first takes up the thread's backlash. */
  applyMove(screwId: string, raiseUm: number): void;
  /** The hidden true state, for tests and the benchmark's referee. */
  trueState(): BaseState;
}

/** Threads a virtual machine draws from: M20, M24 (ISO 261 coarse), 1-8 UNC and 3/4-10 UNC (ASME B1.1). */
const VIRTUAL_THREADS: Thread[] = [{ pitchMm: 2.5 }, { pitchMm: 3 }, { tpi: 8 }, { tpi: 10 }];

const LEVEL_NOISE_DIV = 0.15;
const INDICATOR_NOISE_UM = 0.5;

/** A machining-centre footprint drawn from the seed: four corners and two or four middle screws. */
export function randomFootprint(random: Random): { screws: Screw[]; travelMm: number } {
  const halfW = uniform(random, 900, 1600);
  const halfD = uniform(random, 700, 1200);
  const thread = pick(random, VIRTUAL_THREADS);
  const corner = (id: string, sx: number, sy: number): ScrewSpec => ({ id, kind: 'corner', xMm: sx * halfW, yMm: sy * halfD, thread });
  const middle = (id: string, sx: number, yMm: number): ScrewSpec => ({ id, kind: 'middle', xMm: sx * halfW, yMm, thread });
  const middles =
    random() < 0.5
      ? [middle('ML', -1, 0), middle('MR', 1, 0)]
      : [middle('MLF', -1, -halfD / 3), middle('MRF', 1, -halfD / 3), middle('MLB', -1, halfD / 3), middle('MRB', 1, halfD / 3)];
  const screws = buildFootprint([corner('FL', -1, -1), corner('FR', 1, -1), corner('RL', -1, 1), corner('RR', 1, 1), ...middles]);
  return { screws, travelMm: Math.round(1.6 * halfD) };
}

function drawShape(random: Random, rigid: boolean, given: Partial<BaseShape>): BaseShape {
  return {
    tiltXUrad: given.tiltXUrad ?? uniform(random, -300, 300),
    tiltYUrad: given.tiltYUrad ?? uniform(random, -300, 300),
    twistUrad: given.twistUrad ?? (rigid ? 0 : uniform(random, -120, 120)),
    bowUrad: given.bowUrad ?? (rigid ? 0 : uniform(random, -80, 80)),
  };
}

/**
 * The true response (µrad per µm, rows tiltX, tiltY, twist, bow): the nominal one with each screw's own gain
 * (corners 0.8 to 1.2; middle screws 0.33 to 1.67 of the nominal share) and a little cross-coupling.
 */
function drawResponse(random: Random, screws: Screw[], travelMm: number, rigid: boolean): number[][] {
  const nominal = nominalResponse(screws, travelMm, { rigid }).slice(0, 4);
  if (rigid) return nominal;
  const gains = screws.map((s) => (s.kind === 'corner' ? uniform(random, 0.8, 1.2) : uniform(random, 1 / 3, 5 / 3)));
  const scales = screws.map((_, j) => Math.max(...nominal.map((row) => Math.abs(row[j]!))));
  return nominal.map((row) => row.map((value, j) => value * gains[j]! + gaussian(random, 0.05 * scales[j]!)));
}

/** A seeded virtual machine: the same seed and options always give the same machine, readings and answers. */
export function createVirtualMachine(options: VirtualMachineOptions): VirtualMachine {
  const random = seededRandom(options.seed);
  const rigid = options.rigid ?? false;
  const drawn = options.screws ? undefined : randomFootprint(random);
  const screws = options.screws ?? drawn!.screws;
  const travelMm = requirePositive('travel', options.travelMm ?? drawn?.travelMm ?? 1000, 'empty-travel');
  const divisionUrad = requirePositive('division', options.divisionUrad ?? 20, 'bad-sensitivity');
  const shape = drawShape(random, rigid, options.asFound ?? {});
  const response = drawResponse(random, screws, travelMm, rigid);
  const sweepBuild = { x: uniform(random, -20, 20), y: uniform(random, -55, 55) };
  const sweepPer = { twist: uniform(random, 0.2, 0.8), bow: uniform(random, 0.2, 0.8) };
  const backlashUm = screws.map(() => (rigid ? 0 : uniform(random, 5, 30)));
  const lastDirection = screws.map(() => 1);
  const noise = (sigma: number) => (rigid ? 0 : gaussian(random, sigma));

  const trueState = (): BaseState => ({
    ...shape,
    sweepXUrad: sweepBuild.x + (rigid ? 0 : sweepPer.twist * shape.twistUrad),
    sweepYUrad: sweepBuild.y + (rigid ? 0 : sweepPer.bow * shape.bowUrad),
  });

  return {
    screws,
    travelMm,
    divisionUrad,
    readLevel(axis, xMm, yMm) {
      requireFinite('level x', xMm);
      requireFinite('level y', yMm);
      const slopeUrad =
        axis === 'x'
          ? shape.tiltXUrad + (shape.twistUrad * yMm) / travelMm
          : shape.tiltYUrad + (shape.twistUrad * xMm) / travelMm + (shape.bowUrad * yMm) / travelMm;
      const div = slopeUrad / divisionUrad + noise(LEVEL_NOISE_DIV);
      return rigid ? div : Math.round(div * 2) / 2;
    },
    readSweep(diameterMm) {
      requirePositive('sweep diameter', diameterMm, 'bad-diameter');
      const { sweepXUrad, sweepYUrad } = trueState();
      const halfX = (sweepXUrad * diameterMm) / 2000;
      const halfY = (sweepYUrad * diameterMm) / 2000;
      const indicator = (um: number) => (rigid ? um : Math.round(um + noise(INDICATOR_NOISE_UM)));
      return {
        diameterMm,
        leftUm: 0,
        rightUm: indicator(2 * halfX),
        frontUm: indicator(halfX - halfY),
        backUm: indicator(halfX + halfY),
      };
    },
    applyMove(screwId, raiseUm) {
      const j = screws.findIndex((s) => s.id === screwId);
      if (j < 0) throw new LevelingError('unknown-screw', `no screw "${screwId}" on this machine`);
      requireFinite(`raise of screw ${screwId}`, raiseUm);
      if (raiseUm === 0) return;
      const direction = Math.sign(raiseUm);
      const lostUm = direction === lastDirection[j] ? 0 : backlashUm[j]!;
      lastDirection[j] = direction;
      const doneUm = direction * Math.max(0, Math.abs(raiseUm) - lostUm);
      SHAPE_MEASURES.forEach((measure, row) => {
        shape[measure] += response[row]![j]! * doneUm;
      });
    },
    trueState,
  };
}
