import type { LevelReading, Reading, SweepReading } from './base-model';
import type { Measure } from './base-state';
import type { Screw } from './footprint';
import { DEFAULT_SWEEP_DIAMETER_MM, DEFAULT_SWEEP_LIMIT_UM, analyzeSweep } from './sweep';
import { DEFAULT_TRAVEL_TOLERANCE_URAD, analyzeTravel } from './travel';

/** The stages of the guided work in which screws are turned, in order. */
export const ADJUST_STAGES = ['rough-level', 'twist', 'bow', 'spindle-sweep'] as const;

/** A stage in which screws are turned. */
export type AdjustStage = (typeof ADJUST_STAGES)[number];

/** Tolerances of a machine: slopes in µrad, sweep TIR in µm on the sweep circle. */
export interface Tolerances {
  levelUrad: number;
  twistUrad: number;
  bowUrad: number;
  sweepTirUm: number;
}

/**
 * Defaults: twist and bow 0.0002 in/10 in and sweep 0.0005 in TIR on 10 in (common trade practice);
 * level 20 µrad, one division of a 0.02 mm/m level (Levelwire's default; no published source).
 */
export const DEFAULT_TOLERANCES: Tolerances = {
  levelUrad: 20,
  twistUrad: DEFAULT_TRAVEL_TOLERANCE_URAD,
  bowUrad: DEFAULT_TRAVEL_TOLERANCE_URAD,
  sweepTirUm: DEFAULT_SWEEP_LIMIT_UM,
};

/** The measures a stage brings within tolerance, with the tolerance (µrad) each is held to. */
export function stageTargets(stage: AdjustStage, tolerances: Tolerances): Partial<Record<Measure, number>> {
  const sweepUrad = (tolerances.sweepTirUm * 1000) / DEFAULT_SWEEP_DIAMETER_MM;
  switch (stage) {
    case 'rough-level':
      return { tiltXUrad: tolerances.levelUrad, tiltYUrad: tolerances.levelUrad };
    case 'twist':
      return { tiltXUrad: tolerances.levelUrad, tiltYUrad: tolerances.levelUrad, twistUrad: tolerances.twistUrad };
    case 'bow':
      return { bowUrad: tolerances.bowUrad };
    case 'spindle-sweep':
      return { sweepXUrad: sweepUrad, sweepYUrad: sweepUrad, bowUrad: tolerances.bowUrad };
  }
}

/** Screws a stage may touch: corners for rough level and twist; middle screws (small, equal moves) for bow and sweep. */
export function stageScrews(stage: AdjustStage, screws: Screw[]): Screw[] {
  const kind = stage === 'rough-level' || stage === 'twist' ? 'corner' : 'middle';
  return screws.filter((s) => s.kind === kind);
}

/** Whether a stage moves its screws together by one equal amount (middle screws). */
export function stageMovesEqually(stage: AdjustStage): boolean {
  return stage === 'bow' || stage === 'spindle-sweep';
}

/** A reading the technician is asked to take: a level along an axis at a point (mm), or a sweep on a circle (mm). */
export type PlannedReading =
  | { kind: 'level'; axis: 'x' | 'y'; xMm: number; yMm: number }
  | { kind: 'sweep'; diameterMm: number };

/** Stations along the Y travel, mm from the table centre: both ends and evenly between. */
function stations(travelMm: number, count: number): number[] {
  return Array.from({ length: count }, (_, i) => -travelMm / 2 + (i * travelMm) / (count - 1));
}

/** The readings each round of a stage takes (the sweep rechecks bow too); positions in mm along a Y travel of travelMm. */
export function readingPlan(stage: AdjustStage, travelMm: number): PlannedReading[] {
  switch (stage) {
    case 'rough-level':
      return [
        { kind: 'level', axis: 'x', xMm: 0, yMm: 0 },
        { kind: 'level', axis: 'y', xMm: 0, yMm: 0 },
      ];
    case 'twist':
      return [
        ...stations(travelMm, 3).map((yMm) => ({ kind: 'level' as const, axis: 'x' as const, xMm: 0, yMm })),
        { kind: 'level', axis: 'y', xMm: 0, yMm: 0 },
      ];
    case 'bow':
      return stations(travelMm, 5).map((yMm) => ({ kind: 'level' as const, axis: 'y' as const, xMm: 0, yMm }));
    case 'spindle-sweep':
      return [
        { kind: 'sweep', diameterMm: DEFAULT_SWEEP_DIAMETER_MM },
        ...stations(travelMm, 3).map((yMm) => ({ kind: 'level' as const, axis: 'y' as const, xMm: 0, yMm })),
      ];
  }
}

function levelsAlong(readings: Reading[], axis: 'x' | 'y'): LevelReading[] {
  return readings.filter((r): r is LevelReading => r.kind === 'level' && r.axis === axis);
}

/** Whether a stage's round of readings shows its measures within tolerance, as the technician would judge them. */
export function stageWithinTolerance(stage: AdjustStage, readings: Reading[], tolerances: Tolerances): boolean {
  const atCentreLevel = readings
    .filter((r): r is LevelReading => r.kind === 'level' && r.xMm === 0 && r.yMm === 0)
    .every((r) => Math.abs(r.slopeUrad) <= tolerances.levelUrad);
  const travel = (axis: 'x' | 'y', toleranceUrad: number) =>
    analyzeTravel(
      levelsAlong(readings, axis).map((r) => ({ posMm: r.yMm, slopeUrad: r.slopeUrad })),
      toleranceUrad,
    ).withinTolerance;
  switch (stage) {
    case 'rough-level':
      return atCentreLevel;
    case 'twist':
      return atCentreLevel && travel('x', tolerances.twistUrad);
    case 'bow':
      return travel('y', tolerances.bowUrad);
    case 'spindle-sweep':
      return (
        travel('y', tolerances.bowUrad) &&
        readings
          .filter((r): r is SweepReading => r.kind === 'sweep')
          .every((r) => analyzeSweep(r, tolerances.sweepTirUm).withinLimit)
      );
  }
}
