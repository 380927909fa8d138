// Session logs built in a test, as another Levelwire would have written them, and their export file.
import { randomUUID } from 'node:crypto';
import type { SessionEvent } from '@/lib/session/events';
import { eventHash } from '@/lib/session/hash-chain';

/**
 * A log begun here: opened on a 4-screw machine with its technician as participant; fresh uuids, times in the past,
 * each event chained with eventHash as the append does. `add` appends more (by default as the technician).
 */
export function chainedLog({ machineId, technicianId }: { machineId: string; technicianId: string }) {
  const sessionId = randomUUID();
  const events: SessionEvent[] = [];
  const start = Date.UTC(2025, 10, 3, 7, 30);
  const add = (type: SessionEvent['type'], payload: object, actorId: string | null = technicianId, actorRole = 'technician') => {
    const prevHash = events.at(-1)?.hash ?? '';
    const seq = events.length + 1;
    const e = { sessionId, seq, id: randomUUID(), type, payload, actorId, actorRole, clientTs: null, serverTs: new Date(start + seq * 7_000).toISOString(), prevHash };
    events.push({ ...e, hash: eventHash(prevHash, e as SessionEvent) } as SessionEvent);
  };
  add('session:opened', {
    machineId,
    levelDivisionUrad: 20,
    machineLabel: 'Imported VMC · IMP-1',
    travelMm: 500,
    tolerances: { levelUrad: 20, twistUrad: 20, bowUrad: 20, sweepTirUm: 12.7 },
    screws: ['FL', 'FR', 'RL', 'RR'].map((label, i) => ({ id: randomUUID(), label, kind: 'corner', xMm: i % 2 ? 900 : -900, yMm: i < 2 ? -750 : 750, liftPerTurnMm: 3, specifiedHeightMm: null })),
  });
  add('participant:added', { userId: technicianId, name: 'Imported technician', part: 'technician' });
  return { sessionId, events, add };
}

/** The export format of GET /api/sessions/:id/export around a log. */
export const sessionFileOf = (events: SessionEvent[], machineId: string = randomUUID(), sessionId = events[0]!.sessionId) => ({
  format: 'levelwire-session',
  version: 1,
  exportedAt: '2025-11-03T09:00:00.000Z',
  session: { id: sessionId, state: 'ended', machine: { id: machineId, label: 'Imported VMC · IMP-1', model: 'Imported VMC', serial: 'IMP-1' } },
  events,
});
