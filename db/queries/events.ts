import { and, asc, eq, gt } from 'drizzle-orm';
import type pg from 'pg';
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

// ---------------------------------------------------------------------------------------------------------------
// Group commit (lib/session/group-append.ts): several sessions' appends in one transaction, as plain named statements
// on a pool client, each prepared once per connection (the hot path builds no query per reading).

/** A session's head and header as a batch sees it, locked, with the parts of the batch's callers in it. */
export type LockedHead = SessionHead & { organisationId: string; levelDivisionUrad: number; parts: Record<string, string> };

/** Locks the sessions' rows in id order (two batches, in one process or two, cannot deadlock) and reads their heads. */
export async function lockHeads(client: pg.PoolClient, sessionIds: readonly string[], userIds: readonly string[]): Promise<Map<string, LockedHead>> {
  const { rows } = await client.query<{ id: string; organisation_id: string; state: string; level_division_urad: number; last_seq: string; last_hash: string; parts: Record<string, string> | null }>({
    name: 'levelwire.lock-heads',
    text: `select s.id, s.organisation_id, s.state, s.level_division_urad, s.last_seq, s.last_hash,
              (select json_object_agg(p.user_id, p.part) from session_participants p where p.session_id = s.id and p.user_id = any($2::uuid[])) as parts
             from leveling_sessions s where s.id = any($1::uuid[]) order by s.id for update of s`,
    values: [sessionIds, userIds],
  });
  return new Map(
    rows.map((r) => [
      r.id,
      { organisationId: r.organisation_id, state: r.state, levelDivisionUrad: r.level_division_urad, lastSeq: Number(r.last_seq), lastHash: r.last_hash, parts: r.parts ?? {} },
    ]),
  );
}

/** The stored events among `ids` (resent commands), by id. */
export async function eventsByIds(client: pg.PoolClient, ids: readonly string[]): Promise<Map<string, SessionEvent>> {
  const { rows } = await client.query<{ session_id: string; seq: string; id: string; type: string; payload: unknown; actor_id: string | null; actor_role: string; client_ts: Date | null; server_ts: Date; prev_hash: string; hash: string }>({
    name: 'levelwire.events-by-ids',
    text: 'select session_id, seq, id, type, payload, actor_id, actor_role, client_ts, server_ts, prev_hash, hash from session_events where id = any($1::uuid[])',
    values: [ids],
  });
  return new Map(
    rows.map((r) => [
      r.id,
      toSessionEvent({ sessionId: r.session_id, seq: Number(r.seq), id: r.id, type: r.type, payload: r.payload, actorId: r.actor_id, actorRole: r.actor_role, clientTs: r.client_ts, serverTs: r.server_ts, prevHash: r.prev_hash, hash: r.hash }),
    ]),
  );
}

/** Chains `e` to `head` (seq and hash from the head, the server's time now) and moves the head on; nothing is stored. */
export function chainEvent(head: { lastSeq: number; lastHash: string }, e: NewEvent): SessionEvent {
  const content = { seq: head.lastSeq + 1, id: e.id, type: e.type, payload: e.payload, actorId: e.actorId, actorRole: e.actorRole, serverTs: new Date().toISOString() };
  const hash = eventHash(head.lastHash, content);
  const event = { ...content, sessionId: e.sessionId, clientTs: e.clientTs ? new Date(e.clientTs).toISOString() : null, prevHash: head.lastHash, hash } as SessionEvent;
  head.lastSeq = event.seq;
  head.lastHash = hash;
  return event;
}

/** Stores chained events and moves their sessions' heads, in one statement. */
export async function insertChained(client: pg.PoolClient, events: readonly SessionEvent[], heads: ReadonlyMap<string, { lastSeq: number; lastHash: string }>): Promise<void> {
  if (events.length === 0) return;
  const col = <T>(f: (e: SessionEvent) => T) => events.map(f);
  const touched = new Set(events.map((e) => e.sessionId));
  const moved = [...heads.entries()].filter(([id]) => touched.has(id));
  await client.query({
    name: 'levelwire.insert-chained',
    text: `with stored as (
             insert into session_events (session_id, seq, id, type, payload, actor_id, actor_role, client_ts, server_ts, prev_hash, hash)
             select * from unnest($1::uuid[], $2::bigint[], $3::uuid[], $4::text[], $5::jsonb[], $6::uuid[], $7::text[], $8::timestamptz[], $9::timestamptz[], $10::text[], $11::text[])
             returning 1)
           update leveling_sessions s set last_seq = h.seq, last_hash = h.hash
             from unnest($12::uuid[], $13::bigint[], $14::text[]) as h(id, seq, hash)
            where s.id = h.id`,
    values: [
      col((e) => e.sessionId),
      col((e) => e.seq),
      col((e) => e.id),
      col((e) => e.type),
      col((e) => JSON.stringify(e.payload)),
      col((e) => e.actorId),
      col((e) => e.actorRole),
      col((e) => e.clientTs),
      col((e) => e.serverTs),
      col((e) => e.prevHash),
      col((e) => e.hash),
      moved.map(([id]) => id),
      moved.map(([, h]) => h.lastSeq),
      moved.map(([, h]) => h.lastHash),
    ],
  });
}
