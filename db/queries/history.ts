import { and, asc, eq, inArray } from 'drizzle-orm';
import type { Db } from '../client';
import { levelingSessions, machines, sessionEvents, sessionParticipants, users } from '../schema';
import { foldEvents } from '@/lib/session/fold';
import { HISTORY_STATUSES, machineHistory, type HistorySessionInput } from '@/lib/session/history';
import type { SessionEvent } from '@/lib/session/events';
import { toSessionEvent } from './events';
import { getReminderDaysBefore } from './due';

/**
 * A machine's history for a viewer of its organisation: every session of the machine that has ended (ended, in
 * review, returned, approved), folded from its whole log, with as-found and as-left per measure, and the machine's
 * due date. Null when the machine is absent or another organisation's.
 *
 * Cost: four small queries (the machine, its sessions, the viewer's parts in them, the warning period) and one read of
 * every event of those sessions, folded in memory: linear in the machine's stored events. Fine for tens of sessions
 * of a few thousand events; a machine with hundreds of 20,000-event sessions would want the as-found and as-left
 * kept per session instead of refolded on every view.
 */
export async function getMachineHistory(
  db: Db,
  { organisationId, machineId, viewer, today }: { organisationId: string; machineId: string; viewer: { id: string; readsAll: boolean }; today: string },
) {
  const [machine] = await db
    .select({ id: machines.id, model: machines.model, serial: machines.serial, checkIntervalMonths: machines.checkIntervalMonths, priorLeveledOn: machines.priorLeveledOn })
    .from(machines)
    .where(and(eq(machines.id, machineId), eq(machines.organisationId, organisationId)));
  if (!machine) return null;
  const sessions = await db
    .select({ id: levelingSessions.id, state: levelingSessions.state, approvedAt: levelingSessions.approvedAt, technicianName: users.name })
    .from(levelingSessions)
    .innerJoin(users, eq(users.id, levelingSessions.technicianId))
    .where(and(eq(levelingSessions.machineId, machineId), eq(levelingSessions.organisationId, organisationId)));
  // Approved is final, so the approved sessions (all the due date counts) are among those shown.
  const shown = sessions.filter((s) => (HISTORY_STATUSES as readonly string[]).includes(s.state));
  const ids = shown.map((s) => s.id);
  const [rows, parts, soonDays] = await Promise.all([
    ids.length === 0
      ? Promise.resolve([])
      : db.select().from(sessionEvents).where(inArray(sessionEvents.sessionId, ids)).orderBy(asc(sessionEvents.sessionId), asc(sessionEvents.seq)),
    ids.length === 0 || viewer.readsAll
      ? Promise.resolve([])
      : db
          .select({ sessionId: sessionParticipants.sessionId })
          .from(sessionParticipants)
          .where(and(inArray(sessionParticipants.sessionId, ids), eq(sessionParticipants.userId, viewer.id))),
    getReminderDaysBefore(db, { organisationId }),
  ]);
  const logs = new Map<string, SessionEvent[]>();
  for (const row of rows) {
    const log = logs.get(row.sessionId) ?? [];
    log.push(toSessionEvent(row));
    logs.set(row.sessionId, log);
  }
  const mine = new Set(parts.map((p) => p.sessionId));
  const inputs: HistorySessionInput[] = shown.map((s) => ({
    id: s.id,
    state: foldEvents(logs.get(s.id) ?? []),
    approvedAt: s.approvedAt ? s.approvedAt.toISOString() : null,
    technicianName: s.technicianName,
    mayOpen: viewer.readsAll || mine.has(s.id),
  }));
  const history = machineHistory(inputs, machine, { today, soonDays });
  return { machine: { id: machine.id, model: machine.model, serial: machine.serial, checkIntervalMonths: machine.checkIntervalMonths }, soonDays, ...history };
}

export type MachineHistoryView = NonNullable<Awaited<ReturnType<typeof getMachineHistory>>>;
