/**
 * The engine's advice on a folded session: the base model fitted to its readings and moves, and the recommended
 * moves for the current stage. Used by the coach view, the virtual technician and tests (not the field view).
 */
import { fitBaseModel, observedState, type BaseModel, type BaseModelEntry, type Reading } from '@/lib/leveling/base-model';
import { recommendMoves } from '@/lib/leveling/recommender';
import { learnFromRound, nominalResponse, type Response } from '@/lib/leveling/response';
import { stageWithinTolerance, type AdjustStage } from '@/lib/leveling/stages';
import type { ScrewMove } from '@/lib/leveling/tilt-solve';
import { adjustStageOf, currentRound, engineScrews, pendingMoves, readingKey, stageVerdict, toEngineReading, tolerancesOf } from './derive';
import type { RecordedReading, SessionState } from './fold';

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

/**
 * How this machine's base answers its screws, learned from the session's own rounds: starting from the footprint's
 * nominal response, each group of moves answered done in a stage is compared with the stage's readings just before
 * and just after it (engine `learnFromRound`, the Broyden update the leveling benchmark measures).
 */
export function learnedResponse(s: SessionState): Response | null {
  if (s.screws.length < 3 || s.travelMm === null) return null;
  const travelMm = s.travelMm;
  const screws = engineScrews(s.screws);
  const screwIds = screws.map((sc) => sc.id);
  let response = nominalResponse(screws, travelMm);
  const estimate = (block: Map<string, RecordedReading>) => {
    const readings = [...block.values()].map(toEngineReading).filter((r): r is Reading => r !== null);
    return readings.length === 0 ? null : observedState(fitBaseModel(readings, { screwIds, response, travelMm }));
  };
  // Per stage, in log order: blocks of readings (latest per planned point) separated by groups of done moves.
  type Item = { seq: number; reading?: RecordedReading; move?: { screwId: string; raiseUm: number } };
  const stages = [...new Set(s.moves.filter((m) => m.status === 'done').map((m) => m.stage))];
  for (const stage of stages) {
    const items: Item[] = [
      ...s.readings.filter((r) => r.stage === stage).map((r) => ({ seq: r.seq, reading: r })),
      ...s.moves
        .filter((m) => m.stage === stage && m.status === 'done' && m.doneRaiseUm !== null)
        .map((m) => ({ seq: m.answeredSeq!, move: { screwId: m.screwId, raiseUm: m.doneRaiseUm! } })),
    ].sort((a, b) => a.seq - b.seq);
    let before = new Map<string, RecordedReading>();
    let moves: { screwId: string; raiseUm: number }[] = [];
    let after = new Map<string, RecordedReading>();
    const learn = () => {
      const b = estimate(before);
      const a = estimate(after);
      if (b && a && moves.length > 0) response = learnFromRound({ response, screwIds, moves, before: b, after: a });
    };
    for (const item of items) {
      if (item.move) {
        if (after.size > 0) {
          learn();
          before = after;
          after = new Map();
          moves = [];
        }
        moves.push(item.move);
      } else if (item.reading) (moves.length === 0 ? before : after).set(readingKey(item.reading), item.reading);
    }
    learn();
  }
  return response;
}

/** The engine's base model of the session so far, or null before the footprint is known or any reading is taken. */
export function baseModelOf(s: SessionState, response: Response | null = learnedResponse(s)): BaseModel | null {
  if (s.screws.length < 3 || s.travelMm === null || !response) return null;
  const entries = baseModelEntries(s);
  if (!entries.some((e) => e.kind !== 'move')) return null;
  const screws = engineScrews(s.screws);
  return fitBaseModel(entries, { screwIds: screws.map((sc) => sc.id), response, travelMm: s.travelMm });
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
 * incomplete or already passes, or in stages where no screw is turned. `model` and `learned` may be passed in when the
 * caller has them already (the coach view draws the model too).
 */
export function recommendedMoves(s: SessionState, model?: BaseModel | null, learned?: Response | null): ScrewMove[] {
  const adjust = adjustStageOf(s.stage) ?? (s.stage === 'lock-as-left' ? asLeftCorrection(s) : null);
  if (!adjust || s.travelMm === null || pendingMoves(s).length > 0) return [];
  if (stageVerdict(s, s.stage).status !== 'fail') return [];
  const response = learned === undefined ? learnedResponse(s) : learned;
  const fitted = model === undefined ? baseModelOf(s, response) : model;
  if (!fitted || !response) return [];
  return recommendMoves({ stage: adjust, screws: engineScrews(s.screws), state: fitted.state, response, tolerances: tolerancesOf(s) });
}

