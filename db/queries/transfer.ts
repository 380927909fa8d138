import { and, eq, inArray } from 'drizzle-orm';
import type { Db } from '../client';
import { levelingSessions, machines, sessionEvents, sessionParticipants, users } from '../schema';
import { AppError } from '@/lib/errors';
import type { SessionOpenedPayload } from '@/lib/session/events';
import type { SessionState } from '@/lib/session/fold';
import type { SessionFile } from '@/lib/session/transfer';
import { eventRow, listEventsBySession } from './events';

/** A session's header and whole log for its export; null when absent or another organisation's. */
export async function getSessionForExport(db: Db, { sessionId, organisationId }: { sessionId: string; organisationId: string }) {
  const [row] = await db
    .select({ id: levelingSessions.id, state: levelingSessions.state, machineId: machines.id, model: machines.model, serial: machines.serial })
    .from(levelingSessions)
    .innerJoin(machines, eq(machines.id, levelingSessions.machineId))
    .where(and(eq(levelingSessions.id, sessionId), eq(levelingSessions.organisationId, organisationId)));
  if (!row) return null;
  const events = await listEventsBySession(db, { sessionId, limit: Number.MAX_SAFE_INTEGER });
  return { session: row, events };
}

/** Rows per insert: 11 parameters each keeps a batch far under PostgreSQL's 65,535 bind parameters. */
const BATCH = 1_000;

const isUniqueViolation = (e: unknown): e is { constraint?: string } => {
  const err = (e as { cause?: unknown })?.cause ?? e;
  return (err as { code?: string })?.code === '23505';
};

export type ImportedSession = { id: string; state: string; machineId: string; technicianId: string; technicianFromLog: boolean; participants: number; events: number; head: string };

/**
 * Stores a checked export file (lib/session/transfer checkSessionFile) as a session of the importer's organisation,
 * in one transaction, so nothing is half-written:
 * - the events exactly as the file has them (same seq, ids, actors, times and hashes; the append-only trigger
 *   allows INSERT); the session row's last_seq and last_hash are the file's head;
 * - the state is the fold's status; approved_at the approval event's time;
 * - the machine: `machineId` when given (it must be the organisation's), else the log's own machine if it is the
 *   organisation's; otherwise a 400 naming machineId;
 * - the technician column: the log's technician when that person has an account in the organisation, else the
 *   importing admin (the events still name the log's own actors; the column only anchors the session here);
 * - participants: only the log's participants who have an account in the organisation.
 * The session's id is the file's: already here with the same head is a 409 "already in Levelwire", with another
 * head a 409 naming the difference; event ids stored under another session are a 409 too.
 * A live demo session comes in without its virtual seed, so no virtual technician picks it up here.
 */
export async function importSessionFile(
  db: Db,
  input: { organisationId: string; importerId: string; machineId: string | null; file: SessionFile; state: SessionState; head: { seq: number; hash: string } },
): Promise<ImportedSession> {
  const { file, state, head, organisationId } = input;
  const sessionId = file.session.id;
  try {
    return await db.transaction(async (tx) => {
      const [existing] = await tx
        .select({ organisationId: levelingSessions.organisationId, lastSeq: levelingSessions.lastSeq, lastHash: levelingSessions.lastHash })
        .from(levelingSessions)
        .where(eq(levelingSessions.id, sessionId));
      if (existing) {
        if (existing.organisationId !== organisationId) throw new AppError('conflict:import', `session.id: a session with id ${sessionId} is already in Levelwire`, 'session.id');
        if (existing.lastSeq === head.seq && existing.lastHash === head.hash) {
          throw new AppError('conflict:import', `This session is already in Levelwire (the same ${head.seq} events, head ${head.hash.slice(0, 12)}…)`, 'session.id');
        }
        throw new AppError(
          'conflict:import',
          `A different record of this session is already in Levelwire: it holds ${existing.lastSeq} events with head ${existing.lastHash.slice(0, 12)}…, the file ${head.seq} with head ${head.hash.slice(0, 12)}…`,
          'session.id',
        );
      }

      const opened = file.events[0]!.payload as SessionOpenedPayload;
      const machineId = input.machineId ?? opened.machineId;
      const [machine] = /^[0-9a-f-]{36}$/i.test(machineId)
        ? await tx.select({ id: machines.id }).from(machines).where(and(eq(machines.id, machineId.toLowerCase()), eq(machines.organisationId, organisationId)))
        : [];
      if (!machine) {
        throw new AppError(
          'bad_request:import',
          input.machineId
            ? `machineId: no machine ${input.machineId} in your organisation`
            : `machineId: the log's machine (${opened.machineId}${opened.machineLabel ? `, ${opened.machineLabel}` : ''}) is not in your organisation; choose one of yours with ?machineId=`,
          'machineId',
        );
      }

      const logTechnician = state.participants.find((p) => p.part === 'technician')?.userId ?? file.events[0]!.actorId;
      const named = [...new Set([...state.participants.map((p) => p.userId), logTechnician ?? ''].filter((id) => /^[0-9a-f-]{36}$/i.test(id)))];
      const members = named.length === 0 ? [] : await tx.select({ id: users.id }).from(users).where(and(inArray(users.id, named), eq(users.organisationId, organisationId)));
      const known = new Set(members.map((m) => m.id));
      const technicianFromLog = logTechnician !== null && known.has(logTechnician);
      const technicianId = technicianFromLog ? logTechnician! : input.importerId;

      const openedAt = new Date(file.events[0]!.serverTs);
      await tx.insert(levelingSessions).values({
        id: sessionId,
        organisationId,
        machineId: machine.id,
        technicianId,
        visitId: null,
        state: state.status,
        approvedAt: state.status === 'approved' && state.review.approval ? new Date(state.review.approval.at) : null,
        levelDivisionUrad: opened.levelDivisionUrad,
        lastSeq: head.seq,
        lastHash: head.hash,
        virtualSeed: state.status === 'live' ? null : (opened.virtualSeed ?? null),
        createdAt: openedAt,
      });
      const participants = state.participants.filter((p) => known.has(p.userId));
      if (participants.length > 0) await tx.insert(sessionParticipants).values(participants.map((p) => ({ sessionId, userId: p.userId, part: p.part, addedAt: new Date(file.events[p.seq - 1]!.serverTs) })));
      for (let i = 0; i < file.events.length; i += BATCH) {
        await tx.insert(sessionEvents).values(
          file.events.slice(i, i + BATCH).map((e) => eventRow({ ...e, sessionId })),
        );
      }
      return { id: sessionId, state: state.status, machineId: machine.id, technicianId, technicianFromLog, participants: participants.length, events: file.events.length, head: head.hash };
    });
  } catch (e) {
    // Two imports of one file at once, or event ids already stored under another session.
    if (isUniqueViolation(e)) throw new AppError('conflict:import', 'Some of these events are already in Levelwire under another session (their ids are taken)', 'events');
    throw e;
  }
}
