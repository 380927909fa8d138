// A whole session log played out in memory: the virtual technician's decisions (lib/session/virtual-technician)
// on the engine's simulated machine (lib/leveling createVirtualMachine), a coach sending the engine's recommended
// moves (simulateDemo), events a fixed number of seconds apart, ended at the end.
import { DEFAULT_TOLERANCES } from '@/lib/leveling/stages';
import type { SessionEvent, SessionScrew } from '@/lib/session/events';
import { foldEvents, type SessionState } from '@/lib/session/fold';
import { nameUuid, pickDemoSeed, simulateDemo } from '@/lib/session/virtual-technician';

// M24 coarse pitch 3 mm (ISO 261); specified height 80 mm (a made-up footprint).
const screw = (id: string, kind: SessionScrew['kind'], xMm: number, yMm: number): SessionScrew => ({ id, label: id, kind, xMm, yMm, liftPerTurnMm: 3, specifiedHeightMm: 80 });
export const CORNERS = [screw('FL', 'corner', -900, -750), screw('FR', 'corner', 900, -750), screw('RL', 'corner', -900, 750), screw('RR', 'corner', 900, 750)];
export const SIX_SCREWS = [...CORNERS, screw('ML', 'middle', -900, 0), screw('MR', 'middle', 900, 0)];

export type SimulatedLog = { events: SessionEvent[]; state: SessionState; seed: number };

/** Plays a demo to as-left (or until `maxRounds` rounds of moves) and ends it; events are `stepSeconds` apart from `start`. */
export function simulatedLog({ screws = SIX_SCREWS, start = Date.UTC(2026, 2, 3, 8, 0, 0), stepSeconds = 20, maxRounds = 12, end = true } = {}): SimulatedLog {
  const machine = { screws, travelMm: 500, tolerances: DEFAULT_TOLERANCES, levelDivisionUrad: 20 };
  const seed = pickDemoSeed(machine);
  const at = (i: number) => new Date(start + i * stepSeconds * 1000).toISOString();
  const events: SessionEvent[] = simulateDemo(machine, seed, { maxRounds, maxEvents: 3000 }).log.map((e, i) => ({ ...e, sessionId: 'sim', serverTs: at(i) }));
  if (end) {
    const seq = events.length + 1;
    events.push({ sessionId: 'sim', seq, id: nameUuid(`sim:${seq}`), type: 'session:ended', payload: {}, actorId: 'technician', actorRole: 'technician', clientTs: null, serverTs: at(seq - 1), prevHash: '', hash: '' });
  }
  return { events, state: foldEvents(events), seed };
}
