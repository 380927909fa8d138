/** Levelwire's leveling engine: pure functions from readings and a footprint to the base's state and screw moves. */
export { LevelingError, type LevelingErrorCode } from './errors';
export {
  MM_PER_IN,
  URAD_PER_ARCSEC,
  convertLength,
  convertSlope,
  formatLength,
  formatSlope,
  type LengthUnit,
  type SlopeUnit,
  type UnitSystem,
} from './units';
export { divisionUrad, readingToSlopeUrad, reversal, reversalCheck, slopeToDivisions } from './level';
export {
  assertSupportingPlane,
  buildFootprint,
  checkHeights,
  threadPitchMm,
  type HeightCheck,
  type PlanPoint,
  type Screw,
  type ScrewKind,
  type ScrewSpec,
  type Thread,
} from './footprint';
export {
  fitPlane,
  incrementUm,
  planeHeightUm,
  roundMoves,
  screwMove,
  solveTilt,
  type ScrewMove,
  type TiltScrew,
} from './tilt-solve';
export {
  DEFAULT_TRAVEL_TOLERANCE_URAD,
  analyzeTravel,
  bowCorrection,
  bowDepartureUm,
  slopeTrendUradPerM,
  twistCorrection,
  type TravelAnalysis,
  type TravelPoint,
} from './travel';
export {
  DEFAULT_SWEEP_DIAMETER_MM,
  DEFAULT_SWEEP_LIMIT_UM,
  analyzeSweep,
  type SweepAnalysis,
  type SweepReadings,
} from './sweep';
export { MEASURES, vectorToState, type BaseState, type Measure } from './base-state';
export {
  fitBaseModel,
  observedState,
  type BaseModel,
  type BaseModelEntry,
  type BaseModelOptions,
  type LevelReading,
  type MoveDone,
  type Reading,
  type SweepReading,
} from './base-model';
export {
  SWEEP_X_PER_TWIST,
  SWEEP_Y_PER_BOW,
  learnFromRound,
  nominalResponse,
  updateResponse,
  type Response,
} from './response';
export {
  ADJUST_STAGES,
  DEFAULT_TOLERANCES,
  readingPlan,
  stageMovesEqually,
  stageScrews,
  stageTargets,
  stageWithinTolerance,
  type AdjustStage,
  type PlannedReading,
  type Tolerances,
} from './stages';
export { recommendMoves, type RecommendInput } from './recommender';
export { ruleOfThumbMoves } from './rule-of-thumb';
export { gaussian, pick, seededRandom, uniform, type Random } from './random';
export {
  createVirtualMachine,
  randomFootprint,
  type BaseShape,
  type VirtualMachine,
  type VirtualMachineOptions,
} from './virtual-machine';
export { runVirtualSession, takeReadings, type Method, type StageOutcome } from './virtual-session';
