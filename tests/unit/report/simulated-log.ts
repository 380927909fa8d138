// A whole session log played out in memory: the virtual technician's decisions (lib/session/virtual-technician)
// on the engine's simulated machine (lib/leveling createVirtualMachine), a coach sending the engine's recommended
// moves, events a fixed number of seconds apart, ended at the end. Unlike simulateDemo it keeps the events.
import { readingToSlopeUrad, reversalCheck } from '@/lib/leveling';
import { DEFAULT_TOLERANCES } from '@/lib/leveling/stages';
import { recommendedMoves } from '@/lib/session/advice';
import { moveOfTurns } from '@/lib/session/derive';
import type { EventType, PayloadOf, ReadingPayload, SessionEvent, SessionScrew } from '@/lib/session/events';
import { foldEvents, initialState, type SessionState } from '@/lib/session/fold';
import { nameUuid, nextVirtualAction, pickDemoSeed, rigFor, syncRig, takeReading } from '@/lib/session/virtual-technician';

// M24 coarse pitch 3 mm (ISO 261); specified height 80 mm (a made-up footprint).
const screw = (id: string, kind: SessionScrew['kind'], xMm: number, yMm: number): SessionScrew => ({ id, label: id, kind, xMm, yMm, liftPerTurnMm: 3, specifiedHeightMm: 80 });
export const CORNERS = [screw('FL', 'corner', -900, -750), screw('FR', 'corner', 900, -750), screw('RL', 'corner', -900, 750), screw('RR', 'corner', 900, 750)];
export const SIX_SCREWS = [...CORNERS, screw('ML', 'middle', -900, 0), screw('MR', 'middle', 900, 0)];

export type SimulatedLog = { events: SessionEvent[]; state: SessionState; seed: number };

/** Plays a demo to as-left (or until `maxRounds` rounds of moves) and ends it; events are `stepSeconds` apart from `start`. */
export function simulatedLog({ screws = SIX_SCREWS, start = Date.UTC(2026, 2, 3, 8, 0, 0), stepSeconds = 20, maxRounds = 12, end = true } = {}): SimulatedLog {
  const machine = { screws, travelMm: 500, tolerances: DEFAULT_TOLERANCES, levelDivisionUrad: 20 };
  const seed = pickDemoSeed(machine);
  const events: SessionEvent[] = [];
  let state: SessionState = initialState;
  const append = <T extends EventType>(type: T, payload: PayloadOf<T>, actorRole: string) => {
    const seq = events.length + 1;
    const e = { sessionId: 'sim', seq, id: nameUuid(`sim:${seq}`), type, payload, actorId: actorRole, actorRole, clientTs: null, serverTs: new Date(start + (seq - 1) * stepSeconds * 1000).toISOString(), prevHash: '', hash: '' } as SessionEvent;
    events.push(e);
    state = foldEvents([e], state);
  };
  append('session:opened', { machineId: 'sim', levelDivisionUrad: 20, travelMm: 500, tolerances: DEFAULT_TOLERANCES, screws, virtualSeed: seed }, 'technician');
  const rig = rigFor(state)!;
  let rounds = 0;
  while (events.length < 3000) {
    syncRig(rig, state);
    const action = nextVirtualAction(state);
    if (!action) {
      const moves = recommendedMoves(state);
      if (moves.length === 0 || rounds >= maxRounds) break;
      rounds++;
      for (const m of moves) {
        const move = moveOfTurns(state.screws.find((s) => s.id === m.id)!, m.turns);
        append('move:sent', { moveId: nameUuid(`move:${events.length}:${m.id}`), screwId: m.id, stage: state.stage, raiseUm: move.raiseUm, turns: move.turns, degrees: move.degrees, recommended: true }, 'expert');
      }
      continue;
    }
    switch (action.kind) {
      case 'answer': {
        const move = state.moves.find((m) => m.moveId === action.moveId)!;
        const raiseUm = moveOfTurns(state.screws.find((s) => s.id === move.screwId)!, action.turns).raiseUm;
        append('move:answered', { moveId: action.moveId, outcome: 'done', turns: action.turns, raiseUm }, 'technician');
        break;
      }
      case 'check':
        append('check:marked', { stage: action.stage, item: action.item, done: true }, 'technician');
        break;
      case 'reading': {
        const r = takeReading(rig, state, action.stage, action.planned);
        const payload: ReadingPayload = r.kind === 'level' ? { ...r, slopeUrad: readingToSlopeUrad(r.divisions, 20) } : r.kind === 'reversal' ? { ...r, ...reversalCheck(r.firstDiv, r.secondDiv) } : r;
        append('reading:recorded', payload, 'technician');
        break;
      }
      case 'stage':
        append('stage:entered', { stage: action.stage }, 'technician');
        break;
      case 'note':
        append('note:posted', { text: action.text }, 'technician');
        break;
    }
  }
  if (end) append('session:ended', {}, 'technician');
  return { events, state, seed };
}
