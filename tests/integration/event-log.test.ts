import { randomUUID } from 'node:crypto';
import { sql } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { appendEvent, listEventsBySession } from '@/db/queries/events';
import { openSession } from '@/db/queries/sessions';
import { verifyChain } from '@/lib/session/hash-chain';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';

const db = testDb();
let org: OrgFixture;
beforeAll(async () => {
  org = await makeOrganisation(db, 'Event log');
});

async function newSession() {
  const { session } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20 });
  return session.id;
}

const reading = (divisions: number) => ({ kind: 'level' as const, axis: 'x' as const, positionMm: 0, divisions, slopeUrad: divisions * 20 });

describe('the session event log in PostgreSQL', () => {
  it('opens a session with its first event at seq 1, then its technician added as a participant', async () => {
    const id = await newSession();
    const events = await listEventsBySession(db, { sessionId: id });
    expect(events.map((e) => [e.seq, e.type])).toEqual([
      [1, 'session:opened'],
      [2, 'participant:added'],
    ]);
    expect(events[1]!.payload).toMatchObject({ userId: org.users.technician.id, part: 'technician' });
    expect(events[0]!.prevHash).toBe('');
  });

  it('keeps seq gapless and the hash chain whole under 25 concurrent appends', async () => {
    const id = await newSession();
    await Promise.all(
      Array.from({ length: 25 }, (_, i) =>
        appendEvent(db, { sessionId: id, id: randomUUID(), type: 'reading:recorded', payload: reading(i), actorId: org.users.technician.id, actorRole: 'technician' }),
      ),
    );
    const events = await listEventsBySession(db, { sessionId: id });
    expect(events.map((e) => e.seq)).toEqual(Array.from({ length: 27 }, (_, i) => i + 1));
    expect(verifyChain(events)).toMatchObject({ ok: true, count: 27 });
  });

  it('stores a resent event once and answers with the stored copy', async () => {
    const id = await newSession();
    const eventId = randomUUID();
    const e = { sessionId: id, id: eventId, type: 'reading:recorded' as const, payload: reading(1), actorId: org.users.technician.id, actorRole: 'technician' };
    const first = await appendEvent(db, e);
    const again = await appendEvent(db, e);
    expect(first.duplicate).toBe(false);
    expect(again).toEqual({ event: first.event, duplicate: true });
    expect(await listEventsBySession(db, { sessionId: id })).toHaveLength(3);
  });

  it('refuses an event id already used in another session', async () => {
    const a = await newSession();
    const b = await newSession();
    const eventId = randomUUID();
    const base = { id: eventId, type: 'reading:recorded' as const, payload: reading(1), actorId: org.users.technician.id, actorRole: 'technician' };
    await appendEvent(db, { ...base, sessionId: a });
    await expect(appendEvent(db, { ...base, sessionId: b })).rejects.toMatchObject({ code: 'conflict:event' });
  });

  it('refuses UPDATE and DELETE on stored events (append-only, enforced by the database)', async () => {
    const id = await newSession();
    const refusal = (q: Promise<unknown>) => q.then(() => 'changed', (e: { cause?: Error }) => e.cause?.message);
    expect(await refusal(db.execute(sql`update session_events set type = 'x' where session_id = ${id}`))).toMatch(/append-only: UPDATE refused/);
    expect(await refusal(db.execute(sql`delete from session_events where session_id = ${id}`))).toMatch(/append-only: DELETE refused/);
    expect(await listEventsBySession(db, { sessionId: id })).toHaveLength(2);
  });

  it('reads back events whose chain verifies, and names the first link broken by a change', async () => {
    const id = await newSession();
    for (const d of [1, -0.5, 2]) {
      await appendEvent(db, { sessionId: id, id: randomUUID(), type: 'reading:recorded', payload: reading(d), actorId: org.users.technician.id, actorRole: 'technician' });
    }
    const events = await listEventsBySession(db, { sessionId: id });
    expect(verifyChain(events).ok).toBe(true);
    const tampered = events.map((e) => (e.seq === 4 ? { ...e, payload: reading(0.5) } : e));
    expect(verifyChain(tampered)).toMatchObject({ ok: false, brokenAtSeq: 4 });
  });
});
