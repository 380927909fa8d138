import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listEventsBySession } from '@/db/queries/events';
import { openSession } from '@/db/queries/sessions';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { bootRealtime, waitFor } from './helpers/realtime';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
let rt: Awaited<ReturnType<typeof bootRealtime>>;
let sessionId: string;

beforeAll(async () => {
  org = await makeOrganisation(db, 'Realtime');
  other = await makeOrganisation(db, 'Outsider');
  rt = await bootRealtime(db);
  const { session } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20 });
  sessionId = session.id;
});
afterAll(() => rt.close());

const submit = (divisions: unknown, id: string = randomUUID()) => ({ id, sessionId, reading: { kind: 'level', axis: 'x', positionMm: 125, divisions } }) as never;

describe('socket.io realtime path', () => {
  it('refuses a handshake without a session cookie', async () => {
    await expect(rt.as(null)).rejects.toThrow(/unauthorized/);
  });

  it('stores a technician reading, acks after the commit with its seq, and broadcasts it to the expert', async () => {
    const tech = await rt.as(org.users.technician);
    const expert = await rt.as(org.users.expert);
    const joined = await expert.emitWithAck('session:join', { sessionId, afterSeq: 0 });
    expect(joined.ok).toBe(true);
    await tech.emitWithAck('session:join', { sessionId, afterSeq: 0 });

    const arriving = waitFor(expert, 'reading:recorded');
    const ack = await tech.emitWithAck('reading:submit', submit(1.5));
    expect(ack).toMatchObject({ ok: true, duplicate: false });
    const event = await arriving;
    expect(event.payload).toMatchObject({ axis: 'x', divisions: 1.5, slopeUrad: 30 });
    const stored = await listEventsBySession(db, { sessionId });
    expect(stored.at(-1)).toEqual(event);
    expect(ack.ok && ack.seq).toBe(event.seq);
  });

  it('stores a resent command once', async () => {
    const tech = await rt.as(org.users.technician);
    const id = randomUUID();
    const before = (await listEventsBySession(db, { sessionId })).length;
    const a = await tech.emitWithAck('reading:submit', submit(0.5, id));
    const b = await tech.emitWithAck('reading:submit', submit(0.5, id));
    expect(a).toMatchObject({ ok: true, duplicate: false });
    expect(b).toMatchObject({ ok: true, duplicate: true, seq: a.ok ? a.seq : -1 });
    expect((await listEventsBySession(db, { sessionId })).length).toBe(before + 1);
  });

  it.each([
    ['an empty session id', { sessionId: '', reading: { kind: 'level', axis: 'x', positionMm: 0, divisions: 1 } }, 'sessionId'],
    ['divisions that are not a number', { reading: { kind: 'level', axis: 'x', positionMm: 0, divisions: 'two' } }, 'reading.divisions'],
    ['divisions out of range', { reading: { kind: 'level', axis: 'x', positionMm: 0, divisions: 400 } }, 'reading.divisions'],
    ['an unknown axis', { reading: { kind: 'level', axis: 'z', positionMm: 0, divisions: 1 } }, 'reading.axis'],
    ['no axis at all', { reading: { kind: 'level', positionMm: 0, divisions: 1 } }, 'reading.axis'],
  ])('answers %s with an error naming the field and stores nothing', async (_what, patch, field) => {
    const tech = await rt.as(org.users.technician);
    const before = (await listEventsBySession(db, { sessionId })).length;
    const ack = await tech.emitWithAck('reading:submit', { id: randomUUID(), sessionId, ...patch } as never);
    expect(ack).toMatchObject({ ok: false, error: { code: 'bad_request:reading', field } });
    expect((await listEventsBySession(db, { sessionId })).length).toBe(before);
  });

  it('refuses a reading from an expert (403) and stores nothing', async () => {
    const expert = await rt.as(org.users.expert);
    const before = (await listEventsBySession(db, { sessionId })).length;
    const ack = await expert.emitWithAck('reading:submit', submit(1));
    expect(ack).toMatchObject({ ok: false, error: { code: 'forbidden:reading' } });
    expect((await listEventsBySession(db, { sessionId })).length).toBe(before);
  });

  it('does not let a socket of another organisation join or post (404: the session does not exist for it)', async () => {
    const outsider = await rt.as(other.users.expert);
    expect(await outsider.emitWithAck('session:join', { sessionId, afterSeq: 0 })).toMatchObject({ ok: false, error: { code: 'not_found:session' } });
    const outsiderTech = await rt.as(other.users.technician);
    expect(await outsiderTech.emitWithAck('reading:submit', submit(1))).toMatchObject({ ok: false, error: { code: 'not_found:session' } });
  });

  it('catches a late joiner up from its last seq', async () => {
    const all = await listEventsBySession(db, { sessionId });
    const late = await rt.as(org.users.reviewer);
    const ack = await late.emitWithAck('session:join', { sessionId, afterSeq: 2 });
    expect(ack.ok && ack.events.map((e) => e.seq)).toEqual(all.filter((e) => e.seq > 2).map((e) => e.seq));
  });
});
