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

/** The stored row of an event made elsewhere (an import, the demo's records, a benchmark): every field unchanged. */
export function eventRow(e: SessionEvent): typeof sessionEvents.$inferInsert {
  return {
    sessionId: e.sessionId,
    seq: e.seq,
    id: e.id,
    type: e.type,
    payload: e.payload,
    actorId: e.actorId,
    actorRole: e.actorRole,
    clientTs: e.clientTs ? new Date(e.clientTs) : null,
    serverTs: new Date(e.serverTs),
    prevHash: e.prevHash,
    hash: e.hash,
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
  const head = await lockHead(tx, e.sessionId);
  const existing = await findById(tx, e);
  if (existing) return existing;
  return insertEvent(tx, head, e);
}

/**
 * Appends an event built from the session as it stands once its row is locked: `build` may read the log and refuse
 * (throw) or return the event. A resent id answers the stored event before `build` runs, so a resend never fails a
 * check the first send passed.
 */
export async function appendChecked(
  db: Db,
  key: { sessionId: string; id: string; type: EventType },
  build: (tx: Tx, head: SessionHead) => Promise<NewEvent>,
): Promise<Appended> {
  return db.transaction(async (tx) => {
    const head = await lockHead(tx, key.sessionId);
    const existing = await findById(tx, key);
    if (existing) return existing;
    return insertEvent(tx, head, await build(tx, head));
  });
}

/** The session row as the append sees it under its lock. */
export type SessionHead = { lastSeq: number; lastHash: string; state: string };

async function lockHead(tx: Tx, sessionId: string): Promise<SessionHead> {
  const [head] = await tx
    .select({ lastSeq: levelingSessions.lastSeq, lastHash: levelingSessions.lastHash, state: levelingSessions.state })
    .from(levelingSessions)
    .where(eq(levelingSessions.id, sessionId))
    .for('update');
  if (!head) throw new AppError('not_found:session', 'No such session');
  return head;
}

async function findById(tx: Tx, e: { sessionId: string; id: string; type: EventType }): Promise<Appended | null> {
  const [existing] = await tx.select().from(sessionEvents).where(eq(sessionEvents.id, e.id));
  if (!existing) return null;
  if (existing.sessionId !== e.sessionId || existing.type !== e.type) {
    throw new AppError('conflict:event', 'That event id is already used by another event');
  }
  return { event: toSessionEvent(existing), duplicate: true };
}

async function insertEvent(tx: Tx, head: { lastSeq: number; lastHash: string }, e: NewEvent): Promise<Appended> {
  const seq = head.lastSeq + 1;
  const content = { seq, id: e.id, type: e.type, payload: e.payload, actorId: e.actorId, actorRole: e.actorRole, serverTs: new Date().toISOString() };
  const hash = eventHash(head.lastHash, content);
  const event = { ...content, sessionId: e.sessionId, clientTs: e.clientTs ?? null, prevHash: head.lastHash, hash } as SessionEvent;
  const [row] = await tx.insert(sessionEvents).values(eventRow(event)).returning();
  await tx.update(levelingSessions).set({ lastSeq: seq, lastHash: hash }).where(eq(levelingSessions.id, e.sessionId));
  head.lastSeq = seq;
  head.lastHash = hash;
  return { event: toSessionEvent(row!), duplicate: false };
}

/** A session's events after `afterSeq`, in seq order. */
export async function listEventsBySession(db: Db | Tx, { sessionId, afterSeq = 0, limit = 50_000 }: { sessionId: string; afterSeq?: number; limit?: number }) {
  const rows = await db
    .select()
    .from(sessionEvents)
    .where(and(eq(sessionEvents.sessionId, sessionId), gt(sessionEvents.seq, afterSeq)))
    .orderBy(asc(sessionEvents.seq))
    .limit(limit);
  return rows.map(toSessionEvent);
}
