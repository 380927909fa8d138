import { and, asc, eq, gt } from 'drizzle-orm';
import type { Db } from '../client';
import { levelingSessions, sessionEvents, type SessionEventRow } from '../schema';
import type { EventType, PayloadOf, SessionEvent } from '@/lib/session/events';
import { eventHash } from '@/lib/session/hash-chain';
import { AppError } from '@/lib/errors';

export function toSessionEvent(row: SessionEventRow): SessionEvent {
  return {
    sessionId: row.sessionId,
    seq: row.seq,
    id: row.id,
    type: row.type as EventType,
    payload: row.payload as SessionEvent['payload'],
    actorId: row.actorId,
    actorRole: row.actorRole,
    clientTs: row.clientTs ? row.clientTs.toISOString() : null,
    serverTs: row.serverTs.toISOString(),
    prevHash: row.prevHash,
    hash: row.hash,
  };
}

export type NewEvent<T extends EventType = EventType> = {
  sessionId: string;
  id: string;
  type: T;
  payload: PayloadOf<T>;
  actorId: string | null;
  actorRole: string;
  clientTs?: string | null;
};

/**
 * Appends one event to a session's log in one transaction: the session row is locked, so seq is
 * gapless and the hash chain linear whichever process appends. A resent id returns the stored event
 * (`duplicate: true`) and stores nothing.
 */
export async function appendEvent(db: Db, e: NewEvent): Promise<Appended> {
  return db.transaction((tx) => appendEventInTx(tx, e));
}

export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
export type Appended = { event: SessionEvent; duplicate: boolean };

/** The append itself, inside a transaction the caller owns (see `appendEvent`). */
export async function appendEventInTx(tx: Tx, e: NewEvent): Promise<Appended> {
  const [head] = await tx
    .select({ lastSeq: levelingSessions.lastSeq, lastHash: levelingSessions.lastHash })
    .from(levelingSessions)
    .where(eq(levelingSessions.id, e.sessionId))
    .for('update');
  if (!head) throw new AppError('not_found:session', 'No such session');

  const [existing] = await tx.select().from(sessionEvents).where(eq(sessionEvents.id, e.id));
  if (existing) {
    if (existing.sessionId !== e.sessionId || existing.type !== e.type) {
      throw new AppError('conflict:event', 'That event id is already used by another event');
    }
    return { event: toSessionEvent(existing), duplicate: true };
  }

  const seq = head.lastSeq + 1;
  const serverTs = new Date();
  const content = {
    seq,
    id: e.id,
    type: e.type,
    payload: e.payload,
    actorId: e.actorId,
    actorRole: e.actorRole,
    serverTs: serverTs.toISOString(),
  };
  const hash = eventHash(head.lastHash, content);
  const [row] = await tx
    .insert(sessionEvents)
    .values({
      sessionId: e.sessionId,
      seq,
      id: e.id,
      type: e.type,
      payload: e.payload,
      actorId: e.actorId,
      actorRole: e.actorRole,
      clientTs: e.clientTs ? new Date(e.clientTs) : null,
      serverTs,
      prevHash: head.lastHash,
      hash,
    })
    .returning();
  await tx.update(levelingSessions).set({ lastSeq: seq, lastHash: hash }).where(eq(levelingSessions.id, e.sessionId));
  return { event: toSessionEvent(row!), duplicate: false };
}

/** A session's events after `afterSeq`, in seq order. */
export async function listEventsBySession(db: Db, { sessionId, afterSeq = 0, limit = 5000 }: { sessionId: string; afterSeq?: number; limit?: number }) {
  const rows = await db
    .select()
    .from(sessionEvents)
    .where(and(eq(sessionEvents.sessionId, sessionId), gt(sessionEvents.seq, afterSeq)))
    .orderBy(asc(sessionEvents.seq))
    .limit(limit);
  return rows.map(toSessionEvent);
}
