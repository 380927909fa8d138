// session:leave and link:ping answer ok for anyone signed in (tests/integration/access/matrix.ts), but only a socket
// that joined the session may stir its room (issue 7): a stranger's leave or ping sends no presence:changed there.
// No waiting for silence: after the stranger's command, a reviewer joins, and the first presence:changed the room
// gets must be the one that lists the reviewer.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openSession } from '@/db/queries/sessions';
import type { Presence } from '@/lib/realtime/contract';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { bootRealtime, waitFor, type TestSocket } from './helpers/realtime';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
let rt: Awaited<ReturnType<typeof bootRealtime>>;

beforeAll(async () => {
  org = await makeOrganisation(db, 'Leave');
  other = await makeOrganisation(db, 'Stranger');
  rt = await bootRealtime(db);
});
afterAll(() => rt.close());

async function liveSession() {
  const { session } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20, experts: [org.users.expert.id] });
  return session.id;
}

/** The technician in the session's room, keeping every presence:changed it gets from now on. */
async function technicianIn(sessionId: string) {
  const tech = await rt.as(org.users.technician);
  expect(await tech.emitWithAck('session:join', { sessionId, afterSeq: 0 })).toMatchObject({ ok: true });
  const seen: Presence[][] = [];
  tech.on('presence:changed', (p) => {
    if (p.sessionId === sessionId) seen.push(p.presence);
  });
  return { tech, seen };
}

/** A reviewer joins; resolves once the technician has the presence:changed that lists the reviewer. */
async function reviewerJoins(tech: TestSocket, sessionId: string) {
  const listed = new Promise<void>((resolve) => {
    const look = (p: { sessionId: string; presence: Presence[] }) => {
      if (p.sessionId !== sessionId || !p.presence.some((x) => x.userId === org.users.reviewer.id)) return;
      tech.off('presence:changed', look);
      resolve();
    };
    tech.on('presence:changed', look);
  });
  const reviewer = await rt.as(org.users.reviewer);
  expect(await reviewer.emitWithAck('session:join', { sessionId, afterSeq: 0 })).toMatchObject({ ok: true });
  await listed;
}

const hasReviewer = (presence: Presence[]) => presence.some((p) => p.userId === org.users.reviewer.id);

describe('session:leave', () => {
  it.each([
    ['another organisation’s admin', () => other.users.admin],
    ['a colleague who never joined', () => org.users.expert],
  ])('from %s answers ok and announces nothing in the session’s room', async (_who, stranger) => {
    const sessionId = await liveSession();
    const { tech, seen } = await technicianIn(sessionId);
    const outsider = await rt.as(stranger());
    expect(await outsider.emitWithAck('session:leave', { sessionId })).toEqual({ ok: true });
    await reviewerJoins(tech, sessionId);
    expect(seen).toHaveLength(1);
    expect(hasReviewer(seen[0]!)).toBe(true);
  });

  it('from a socket that joined tells the room it has gone', async () => {
    const sessionId = await liveSession();
    const { tech } = await technicianIn(sessionId);
    const expert = await rt.as(org.users.expert);
    const joined = waitFor(tech, 'presence:changed');
    await expert.emitWithAck('session:join', { sessionId, afterSeq: 0 });
    expect((await joined).presence.map((p) => p.userId)).toContain(org.users.expert.id);
    const left = waitFor(tech, 'presence:changed');
    expect(await expert.emitWithAck('session:leave', { sessionId })).toEqual({ ok: true });
    expect((await left).presence.map((p) => p.userId)).toEqual([org.users.technician.id]);
  });
});

describe('link:ping', () => {
  it('from a socket that did not join answers the time and announces nothing in the session’s room', async () => {
    const sessionId = await liveSession();
    const { tech, seen } = await technicianIn(sessionId);
    const outsider = await rt.as(other.users.admin);
    const ack = await outsider.emitWithAck('link:ping', { sessionId, rttMs: 40 });
    expect(ack).toMatchObject({ ok: true, serverTs: expect.any(String) });
    await reviewerJoins(tech, sessionId);
    expect(seen).toHaveLength(1);
    expect(seen[0]!.every((p) => p.rttMs === null)).toBe(true);
  });

  it('from a socket that joined keeps its round trip for the room', async () => {
    const sessionId = await liveSession();
    const { tech } = await technicianIn(sessionId);
    const changed = waitFor(tech, 'presence:changed');
    expect(await tech.emitWithAck('link:ping', { sessionId, rttMs: 40 })).toMatchObject({ ok: true });
    expect((await changed).presence).toEqual([expect.objectContaining({ userId: org.users.technician.id, rttMs: 40 })]);
  });
});
