/**
 * The engine's advice on a folded session: the base model fitted to its readings and moves, and the recommended
 * moves for the current stage. Used by the coach view, the virtual technician and tests (not the field view).
 */
import { fitBaseModel, type BaseModel, type BaseModelEntry, type Reading } from '@/lib/leveling/base-model';
import { recommendMoves } from '@/lib/leveling/recommender';
import { nominalResponse } from '@/lib/leveling/response';
import { stageWithinTolerance, type AdjustStage } from '@/lib/leveling/stages';
import type { ScrewMove } from '@/lib/leveling/tilt-solve';
import { adjustStageOf, currentRound, engineScrews, pendingMoves, stageVerdict, toEngineReading, tolerancesOf } from './derive';
import type { SessionState } from './fold';

/** The entries the base model is fitted to: level and sweep readings, and moves answered done, in log order. */
export function baseModelEntries(s: SessionState): BaseModelEntry[] {
  const items: { seq: number; entry: BaseModelEntry }[] = [];
  for (const r of s.readings) {
    const e = toEngineReading(r);
    if (e) items.push({ seq: r.seq, entry: e });
  }
  for (const m of s.moves) if (m.status === 'done' && m.doneRaiseUm !== null) items.push({ seq: m.answeredSeq!, entry: { kind: 'move', screwId: m.screwId, raiseUm: m.doneRaiseUm } });
  return items.sort((a, b) => a.seq - b.seq).map((i) => i.entry);
}

/** The engine's base model of the session so far, or null before the footprint is known or any reading is taken. */
export function baseModelOf(s: SessionState): BaseModel | null {
  if (s.screws.length < 3 || s.travelMm === null) return null;
  const entries = baseModelEntries(s);
  if (!entries.some((e) => e.kind !== 'move')) return null;
  const screws = engineScrews(s.screws);
  return fitBaseModel(entries, { screwIds: screws.map((sc) => sc.id), response: nominalResponse(screws, s.travelMm), travelMm: s.travelMm });
}

/**
 * When the as-left readings fail, the correction to make (jam nuts loosened first): twist on the corners if the
 * twist came back, else bow and sweep on the middle screws.
 */
function asLeftCorrection(s: SessionState): AdjustStage {
  const readings = [...currentRound(s, 'lock-as-left').values()].map(toEngineReading).filter((r): r is Reading => r !== null);
  return stageWithinTolerance('twist', readings, tolerancesOf(s)) ? 'spindle-sweep' : 'twist';
}

/**
 * The engine's recommended moves for the current stage: none while moves are pending, while the stage's round is
 * incomplete or already passes, or in stages where no screw is turned.
 */
export function recommendedMoves(s: SessionState, model: BaseModel | null = baseModelOf(s)): ScrewMove[] {
  const adjust = adjustStageOf(s.stage) ?? (s.stage === 'lock-as-left' ? asLeftCorrection(s) : null);
  if (!adjust || !model || s.travelMm === null || pendingMoves(s).length > 0) return [];
  if (stageVerdict(s, s.stage).status !== 'fail') return [];
  const screws = engineScrews(s.screws);
  return recommendMoves({ stage: adjust, screws, state: model.state, response: nominalResponse(screws, s.travelMm), tolerances: tolerancesOf(s) });
}

