// Group commit of the hot appends (lib/session/group-append.ts) against the real database: many sessions' readings in
// one transaction must keep each log gapless and its hash chain whole, answer each caller as the single append would,
// and let one caller's refusal refuse only that caller.
import { randomUUID } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { createDb } from '@/db/client';
import { listEventsBySession } from '@/db/queries/events';
import { addParticipant, openSession } from '@/db/queries/sessions';
import type { Actor } from '@/lib/auth/actor';
import { GroupAppender, groupAppender } from '@/lib/session/group-append';
import { verifyChain } from '@/lib/session/hash-chain';
import { endSession, postNote, recordReading } from '@/lib/session/service';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
const actor = (o: OrgFixture, role: keyof OrgFixture['users']): Actor => ({ ...o.users[role], unitSystem: 'metric' });

beforeAll(async () => {
  org = await makeOrganisation(db, 'Group append');
  other = await makeOrganisation(db, 'Group append other');
});

async function newSession(o = org) {
  const { session } = await openSession(db, { organisationId: o.organisationId, machineId: o.machineId, technician: o.users.technician, levelDivisionUrad: 20 });
  return session.id;
}

const level = (divisions: number) => ({ kind: 'level' as const, stage: 'rough-level' as const, axis: 'x' as const, positionMm: 0, divisions });

describe('group commit of readings, notes and stage changes', () => {
  it('stores 20 sessions × 10 readings sent at once gapless, chained and in each sender’s order, in fewer transactions than readings', async () => {
    const sessions = await Promise.all(Array.from({ length: 20 }, () => newSession()));
    const before = { ...groupAppender(db).stats };
    const technician = actor(org, 'technician');
    // Each session's readings one after another (as the field view's outbox sends them), the sessions at once.
    const sent = new Map(sessions.map((id) => [id, Array.from({ length: 10 }, (_, i) => ({ id: randomUUID(), divisions: i - 5 }))]));
    await Promise.all(
      sessions.map(async (sessionId) => {
        for (const r of sent.get(sessionId)!) {
          const { event, duplicate } = await recordReading(db, technician, { id: r.id, sessionId, reading: level(r.divisions) });
          expect(duplicate).toBe(false);
          expect(event).toMatchObject({ id: r.id, sessionId, payload: { divisions: r.divisions, slopeUrad: r.divisions * 20 } });
        }
      }),
    );
    for (const sessionId of sessions) {
      const events = await listEventsBySession(db, { sessionId });
      expect(verifyChain(events)).toMatchObject({ ok: true, count: 12 });
      expect(events.slice(2).map((e) => e.id)).toEqual(sent.get(sessionId)!.map((r) => r.id));
      // 1 division of a 20 µrad/div level is 20 µrad (the level's stated sensitivity; TRADE.md §2).
      expect(events.slice(2).map((e) => (e.payload as { slopeUrad: number }).slopeUrad)).toEqual(sent.get(sessionId)!.map((r) => r.divisions * 20));
    }
    const after = groupAppender(db).stats;
    expect(after.appends - before.appends).toBe(200);
    expect(after.batches - before.batches).toBeLessThan(200);
    expect(after.largest).toBeGreaterThan(1);
  });

  it('answers the stored event to a command sent twice at once (stored once), and a resend later the same way', async () => {
    const sessionId = await newSession();
    const technician = actor(org, 'technician');
    const cmd = { id: randomUUID(), sessionId, reading: level(3) };
    const [a, b] = await Promise.all([recordReading(db, technician, cmd), recordReading(db, technician, cmd)]);
    expect([a.duplicate, b.duplicate].sort()).toEqual([false, true]);
    expect(a.event).toEqual(b.event);
    expect(await recordReading(db, technician, cmd)).toEqual({ event: a.event, duplicate: true });
    expect(await listEventsBySession(db, { sessionId })).toHaveLength(3);
  });

  it('refuses only the callers at fault in a batch: wrong part, other organisation, ended session, id of another session', async () => {
    const live = await newSession();
    const ended = await newSession();
    await endSession(db, actor(org, 'technician'), { id: randomUUID(), sessionId: ended });
    const foreign = await newSession(other);
    const taken = randomUUID();
    await recordReading(db, actor(org, 'technician'), { id: taken, sessionId: await newSession(), reading: level(1) });
    await addParticipant(db, { organisationId: org.organisationId, sessionId: live, userId: org.users.expert.id, part: 'expert', actor: org.users.technician });

    const good = Array.from({ length: 5 }, () => ({ id: randomUUID(), sessionId: live, reading: level(2) }));
    const results = await Promise.allSettled([
      ...good.map((cmd) => recordReading(db, actor(org, 'technician'), cmd)),
      recordReading(db, actor(org, 'expert'), { id: randomUUID(), sessionId: live, reading: level(2) }),
      recordReading(db, actor(org, 'reviewer'), { id: randomUUID(), sessionId: live, reading: level(2) }),
      recordReading(db, actor(org, 'technician'), { id: randomUUID(), sessionId: foreign, reading: level(2) }),
      recordReading(db, actor(org, 'technician'), { id: randomUUID(), sessionId: ended, reading: level(2) }),
      recordReading(db, actor(org, 'technician'), { id: taken, sessionId: live, reading: level(2) }),
      postNote(db, actor(org, 'expert'), { id: randomUUID(), sessionId: live, text: 'Bubble steady; go on.' }),
    ]);
    const refusal = (r: PromiseSettledResult<unknown>) => (r.status === 'rejected' ? (r.reason as { code: string; message: string }) : null);
    expect(results.slice(0, 5).map((r) => r.status)).toEqual(Array(5).fill('fulfilled'));
    expect(refusal(results[5]!)).toMatchObject({ code: 'forbidden:reading', message: expect.stringContaining('technician') });
    expect(refusal(results[6]!)).toMatchObject({ code: 'forbidden:reading', message: expect.stringContaining('reading it') });
    expect(refusal(results[7]!)).toMatchObject({ code: 'not_found:session' });
    expect(refusal(results[8]!)).toMatchObject({ code: 'conflict:session', message: 'The session is ended, not live' });
    expect(refusal(results[9]!)).toMatchObject({ code: 'conflict:event' });
    expect(results[10]!.status).toBe('fulfilled');

    const events = await listEventsBySession(db, { sessionId: live });
    expect(verifyChain(events).ok).toBe(true);
    expect(events.filter((e) => e.type === 'reading:recorded').map((e) => e.id).sort()).toEqual(good.map((c) => c.id).sort());
    expect(events.filter((e) => e.type === 'note:posted')).toHaveLength(1);
    expect(await listEventsBySession(db, { sessionId: ended })).toHaveLength(3);
    expect(await listEventsBySession(db, { sessionId: foreign })).toHaveLength(2);
  });

  it('two appenders on two pools (two processes) appending to the same sessions at once: no deadlock, every chain whole', async () => {
    const sessions = await Promise.all(Array.from({ length: 6 }, () => newSession()));
    const second = createDb(process.env.DATABASE_URL!, 5);
    try {
      const a = new GroupAppender(db, { maxInFlight: 2, maxBatch: 50 });
      const b = new GroupAppender(second, { maxInFlight: 2, maxBatch: 50 });
      const technician = actor(org, 'technician');
      const job = (sessionId: string, k: number) => {
        const id = randomUUID();
        return {
          actor: technician,
          key: { sessionId, id, type: 'note:posted' as const },
          states: ['live'] as const,
          admit: () => undefined,
          assertState: () => undefined,
          build: () => ({ sessionId, id, type: 'note:posted' as const, payload: { text: `note ${k}` }, actorId: technician.id, actorRole: technician.role }),
        };
      };
      // Sessions in opposite orders on the two appenders, so a lock taken out of order would deadlock.
      const jobs = [...sessions, ...[...sessions].reverse()].flatMap((s, i) => Array.from({ length: 5 }, (_, k) => [i < sessions.length ? a : b, s, i * 5 + k] as const));
      const stored = await Promise.all(jobs.map(([appender, sessionId, k]) => appender.append(job(sessionId, k))));
      expect(stored.every((s) => !s.duplicate)).toBe(true);
      // A deadlock would have failed a batch and sent its appends one by one.
      expect(a.stats.fallbacks + b.stats.fallbacks).toBe(0);
      expect(a.stats.largest + b.stats.largest).toBeGreaterThan(2);
      for (const sessionId of sessions) {
        const events = await listEventsBySession(db, { sessionId });
        expect(verifyChain(events)).toMatchObject({ ok: true, count: 12 });
      }
    } finally {
      await second.$client.end();
    }
  });

  it('a database that cannot be reached fails the whole batch with the outage (so each outbox keeps its command), storing nothing', async () => {
    const sessionId = await newSession();
    const down = createDb('postgres://postgres@127.0.0.1:1/levelwire', 2);
    try {
      const technician = actor(org, 'technician');
      const appender = new GroupAppender(down, { maxInFlight: 1, maxBatch: 10 });
      const results = await Promise.allSettled(
        [1, 2, 3].map((d) =>
          appender.append({
            actor: technician,
            key: { sessionId, id: randomUUID(), type: 'note:posted' },
            states: ['live'],
            admit: () => undefined,
            assertState: () => undefined,
            build: () => ({ sessionId, id: randomUUID(), type: 'note:posted', payload: { text: `note ${d}` }, actorId: technician.id, actorRole: technician.role }),
          }),
        ),
      );
      expect(results.map((r) => r.status)).toEqual(['rejected', 'rejected', 'rejected']);
      expect(await listEventsBySession(db, { sessionId })).toHaveLength(2);
    } finally {
      await down.$client.end();
    }
  });
});
