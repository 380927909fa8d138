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
  const { session } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20, experts: [org.users.expert.id] });
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

  it('carries a move from the expert to the technician and the answer back, each stored once and in order', async () => {
    const tech = await rt.as(org.users.technician);
    const expert = await rt.as(org.users.expert);
    await tech.emitWithAck('session:join', { sessionId, afterSeq: 0 });
    await expert.emitWithAck('session:join', { sessionId, afterSeq: 0 });
    const screws = (await listEventsBySession(db, { sessionId })).find((e) => e.type === 'session:opened')!.payload as { screws: { id: string; liftPerTurnMm: number }[] };
    const screw = screws.screws[0]!;
    const moveId = randomUUID();
    const arriving = waitFor(tech, 'move:sent');
    const sent = await expert.emitWithAck('move:send', { id: moveId, sessionId, stage: 'rough-level', screwId: screw.id, turns: 0.25, recommended: false });
    expect(sent).toMatchObject({ ok: true, duplicate: false });
    const move = await arriving;
    // 0.25 turn of the fixture's 3 mm pitch (M24 coarse, ISO 261) raises 750 µm; a quarter turn is 90° of swing.
    expect(move.payload).toMatchObject({ moveId, screwId: screw.id, turns: 0.25, degrees: 90, raiseUm: 750 });

    const answered = waitFor(expert, 'move:answered');
    const answerId = randomUUID();
    const done = await tech.emitWithAck('move:answer', { id: answerId, sessionId, moveId, outcome: 'done', turns: 0.2 });
    expect(done).toMatchObject({ ok: true, duplicate: false });
    expect((await answered).payload).toMatchObject({ moveId, outcome: 'done', turns: 0.2, raiseUm: 600 });
    // the same answer resent (a lost ack) is a duplicate, not a second answer; a new answer to it is refused
    expect(await tech.emitWithAck('move:answer', { id: answerId, sessionId, moveId, outcome: 'done', turns: 0.2 })).toMatchObject({ ok: true, duplicate: true });
    expect(await tech.emitWithAck('move:answer', { id: randomUUID(), sessionId, moveId, outcome: 'cannot', reason: 'seized' })).toMatchObject({
      ok: false,
      error: { code: 'conflict:move', field: 'moveId' },
    });
  });

  it('refuses an answer to a move that was never sent, naming moveId, and a move from the technician', async () => {
    const tech = await rt.as(org.users.technician);
    const before = (await listEventsBySession(db, { sessionId })).length;
    expect(await tech.emitWithAck('move:answer', { id: randomUUID(), sessionId, moveId: randomUUID(), outcome: 'cannot', reason: 'no such screw' })).toMatchObject({
      ok: false,
      error: { code: 'bad_request:moveId', field: 'moveId' },
    });
    expect(await tech.emitWithAck('move:send', { id: randomUUID(), sessionId, stage: 'twist', screwId: randomUUID(), turns: 1 })).toMatchObject({
      ok: false,
      error: { code: 'forbidden:move' },
    });
    expect(await tech.emitWithAck('move:answer', { id: randomUUID(), sessionId, moveId: randomUUID(), outcome: 'cannot', reason: '' })).toMatchObject({
      ok: false,
      error: { field: 'reason' },
    });
    expect((await listEventsBySession(db, { sessionId })).length).toBe(before);
  });

  it('lets a checklist item of the stage be marked and refuses one that is not on it', async () => {
    const tech = await rt.as(org.users.technician);
    expect(await tech.emitWithAck('check:mark', { id: randomUUID(), sessionId, stage: 'prepare', item: 'table-clean', done: true })).toMatchObject({ ok: true });
    expect(await tech.emitWithAck('check:mark', { id: randomUUID(), sessionId, stage: 'prepare', item: 'coffee', done: true })).toMatchObject({
      ok: false,
      error: { code: 'bad_request:item', field: 'item' },
    });
  });

  it('converts a reversal into slope and zero error (reversal formulas, TRADE.md) and keeps the stage it was taken in', async () => {
    const tech = await rt.as(org.users.technician);
    const ack = await tech.emitWithAck('reading:submit', { id: randomUUID(), sessionId, reading: { kind: 'reversal', stage: 'zero-level', axis: 'x', firstDiv: 3, secondDiv: -1 } });
    expect(ack.ok).toBe(true);
    const stored = (await listEventsBySession(db, { sessionId })).at(-1)!;
    // slope = (r0 − r180) / 2 = 2 div; zero error = (r0 + r180) / 2 = 1 div, so |r0 + r180| = 2 div > 0.5: does not repeat.
    expect(stored.payload).toMatchObject({ kind: 'reversal', stage: 'zero-level', slopeDiv: 2, zeroErrorDiv: 1, repeats: false });
  });

  it('ends the session, after which nothing more is recorded (409)', async () => {
    const { session } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20, experts: [org.users.expert.id] });
    const expert = await rt.as(org.users.expert);
    const tech = await rt.as(org.users.technician);
    const storedBefore = { id: randomUUID(), sessionId: session.id, reading: { kind: 'level' as const, axis: 'x' as const, positionMm: 0, divisions: 0.5 } };
    const first = await tech.emitWithAck('reading:submit', storedBefore);
    expect(await expert.emitWithAck('session:end', { id: randomUUID(), sessionId: session.id })).toMatchObject({ ok: true });
    // a reading stored before the end and resent after it (its ack was lost) still gets its ack, as a duplicate
    expect(await tech.emitWithAck('reading:submit', storedBefore)).toMatchObject({ ok: true, duplicate: true, seq: first.ok ? first.seq : -1 });
    expect(await tech.emitWithAck('reading:submit', { id: randomUUID(), sessionId: session.id, reading: { kind: 'level', axis: 'x', positionMm: 0, divisions: 1 } })).toMatchObject({
      ok: false,
      error: { code: 'conflict:session' },
    });
  });
});
