// The review of a session's record over HTTP as personas (real server, real database): comments pinned to moments,
// returns for rework, the technician taking it up again, approval with a drawn signature. Who may do what is the
// issue's rule (issue 6, item 3): reviewers (and admins) review; the session's technician takes a return up again.
import { randomUUID } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { eq } from 'drizzle-orm';
import { io } from 'socket.io-client';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listEventsBySession } from '@/db/queries/events';
import { openSession } from '@/db/queries/sessions';
import { levelingSessions, users, type Role } from '@/db/schema';
import type { Actor } from '@/lib/auth/actor';
import { PROTOCOL_VERSION, SOCKET_PATH } from '@/lib/realtime/contract';
import type { SessionEvent } from '@/lib/session/events';
import { foldEvents } from '@/lib/session/fold';
import { endSession } from '@/lib/session/service';
import { makeOrganisation, PASSWORD, testDb, type OrgFixture } from './helpers/fixtures';
import { api, APP_URL, signInOverHttp } from './helpers/http';
import type { TestSocket } from './helpers/realtime';

const db = testDb();
type Person = { id: string; email: string; name: string; role: Role; organisationId: string };
let org: OrgFixture;
let other: OrgFixture;
let observer: Person;
const cookies: Record<string, string> = {};
const sockets: TestSocket[] = [];

async function addUser(o: OrgFixture, role: Role, label: string): Promise<Person> {
  const email = `${label}-${randomUUID().slice(0, 8)}@fixture.test`;
  const [u] = await db.insert(users).values({ organisationId: o.organisationId, role, email, name: `Review ${label}`, passwordHash: bcrypt.hashSync(PASSWORD, 4) }).returning();
  return { id: u!.id, email, name: u!.name, role, organisationId: o.organisationId };
}
const actorOf = (u: Person): Actor => ({ id: u.id, name: u.name, role: u.role, organisationId: u.organisationId, unitSystem: 'metric' });

/** A fresh session of the fixture organisation: its technician, an expert and an observer (a technician by role). */
async function liveSession(): Promise<string> {
  const { session } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20, experts: [org.users.expert.id], observers: [observer.id] });
  return session.id;
}
async function endedSession(): Promise<string> {
  const id = await liveSession();
  await endSession(db, actorOf(org.users.technician), { id: randomUUID(), sessionId: id });
  return id;
}

const log = (id: string) => listEventsBySession(db, { sessionId: id });
const count = async (id: string) => (await log(id)).length;
const row = async (id: string) => (await db.select().from(levelingSessions).where(eq(levelingSessions.id, id)))[0]!;

const review = (id: string, who: string | undefined, body: Record<string, unknown>) => api(`/api/sessions/${id}/review`, { method: 'POST', cookie: who ? cookies[who] : undefined, body });
const resume = (id: string, who: string | undefined, body: Record<string, unknown> = { id: randomUUID() }) => api(`/api/sessions/${id}/resume`, { method: 'POST', cookie: who ? cookies[who] : undefined, body });

const signature = { width: 300, height: 100, strokes: [[10, 80, 60, 20, 110, 70], [150, 50, 290, 50]] };
const comment = (atSeq = 1, text = 'Why was the twist left at the limit?') => ({ kind: 'comment', id: randomUUID(), atSeq, text });
const ret = (reasons: unknown = ['Retake the as-left along Y: the middle station is missing.']) => ({ kind: 'return', id: randomUUID(), reasons });
const approve = (sig: unknown = signature, name: unknown = 'Fixture Reviewer') => ({ kind: 'approve', id: randomUUID(), name, signature: sig });

beforeAll(async () => {
  org = await makeOrganisation(db, 'Review');
  other = await makeOrganisation(db, 'Elsewhere');
  observer = await addUser(org, 'technician', 'observer');
  const people = { tech: org.users.technician, expert: org.users.expert, observer, reviewer: org.users.reviewer, admin: org.users.admin, otherReviewer: other.users.reviewer, otherTech: other.users.technician };
  for (const [k, u] of Object.entries(people)) cookies[k] = await signInOverHttp(u.email);
});

afterAll(() => {
  for (const s of sockets) s.disconnect();
});

describe('POST /api/sessions/:id/review by standing', () => {
  it('401 signed out, nothing stored', async () => {
    const id = await endedSession();
    const before = await count(id);
    for (const body of [comment(), ret(), approve()]) expect((await review(id, undefined, body)).status).toBe(401);
    expect(await count(id)).toBe(before);
  });

  it('403 for the technician, an expert and an observer (each act); 404 for another organisation’s reviewer; nothing stored', async () => {
    const id = await endedSession();
    const before = await count(id);
    for (const who of ['tech', 'expert', 'observer']) {
      for (const body of [comment(), ret(), approve()]) {
        const res = await review(id, who, body);
        expect(res.status, `${who} ${body.kind}`).toBe(403);
        expect(res.contentType).toContain('application/problem+json');
      }
    }
    for (const body of [comment(), ret(), approve()]) expect((await review(id, 'otherReviewer', body)).json).toMatchObject({ status: 404, code: 'not_found:session' });
    expect(await count(id)).toBe(before);
    expect((await row(id)).state).toBe('ended');
  });

  it('201 for a reviewer and for an admin: each comment is an event pinned to its moment; the first puts the session in review', async () => {
    const id = await endedSession();
    const last = await count(id);
    const first = await review(id, 'reviewer', comment(2, 'Opening looks right.'));
    expect(first).toMatchObject({ status: 201, json: { duplicate: false, seq: last + 1 } });
    expect((await row(id)).state).toBe('in_review');
    const second = await review(id, 'admin', comment(last, 'Checked the end.'));
    expect(second.status).toBe(201);
    const events = await log(id);
    expect(events.slice(-2).map((e) => [e.type, e.actorRole, e.payload])).toEqual([
      ['review:commented', 'reviewer', { atSeq: 2, text: 'Opening looks right.' }],
      ['review:commented', 'admin', { atSeq: last, text: 'Checked the end.' }],
    ]);
    const state = foldEvents(events);
    expect(state.status).toBe('in_review');
    expect(state.review.comments.map((c) => c.atSeq)).toEqual([2, last]);
  });

  it('a reviewer returns with reasons, an admin may approve; another organisation’s reviewer may not', async () => {
    const returned = await endedSession();
    expect((await review(returned, 'otherReviewer', ret())).status).toBe(404);
    expect((await review(returned, 'admin', ret(['Photo of the FL jam nut missing.', 'As-left Y middle missing.']))).status).toBe(201);
    expect((await row(returned)).state).toBe('returned');
    expect(foldEvents(await log(returned)).review.returns.at(-1)?.reasons).toEqual(['Photo of the FL jam nut missing.', 'As-left Y middle missing.']);

    const approved = await endedSession();
    expect((await review(approved, 'otherReviewer', approve())).status).toBe(404);
    expect((await review(approved, 'admin', approve(signature, 'Fixture Admin'))).status).toBe(201);
    expect((await row(approved)).state).toBe('approved');
  });
});

describe('POST /api/sessions/:id/resume by standing', () => {
  it('401 signed out; 403 for an expert, an observer, a reviewer and an admin; 404 for another organisation; 201 for the technician', async () => {
    const id = await endedSession();
    expect((await review(id, 'reviewer', ret())).status).toBe(201);
    const before = await count(id);
    expect((await resume(id, undefined)).status).toBe(401);
    for (const who of ['expert', 'observer', 'reviewer', 'admin']) expect((await resume(id, who)).json, who).toMatchObject({ status: 403, code: 'forbidden:session' });
    for (const who of ['otherReviewer', 'otherTech']) expect((await resume(id, who)).status, who).toBe(404);
    expect(await count(id)).toBe(before);
    const res = await resume(id, 'tech');
    expect(res).toMatchObject({ status: 201, json: { duplicate: false, seq: before + 1 } });
    expect((await row(id)).state).toBe('live');
    const state = foldEvents(await log(id));
    expect(state.status).toBe('live');
    expect(state.ended).toBeNull();
  });
});

describe('state rules', () => {
  it('409 for approving, commenting on or returning a live session; nothing stored', async () => {
    const id = await liveSession();
    const before = await count(id);
    for (const body of [approve(), comment(), ret()]) expect((await review(id, 'reviewer', body)).json, String(body.kind)).toMatchObject({ status: 409, code: 'conflict:session' });
    expect(await count(id)).toBe(before);
    expect((await row(id)).approvedAt).toBeNull();
  });

  it('409 for resuming a session that was not returned (live or ended)', async () => {
    const live = await liveSession();
    expect((await resume(live, 'tech')).status).toBe(409);
    const ended = await endedSession();
    const before = await count(ended);
    expect((await resume(ended, 'tech')).json).toMatchObject({ status: 409, code: 'conflict:session', detail: expect.stringContaining('not returned') });
    expect(await count(ended)).toBe(before);
  });

  it('409 for returning twice, and for approving a returned session; a comment on it is taken', async () => {
    const id = await endedSession();
    expect((await review(id, 'reviewer', ret())).status).toBe(201);
    const before = await count(id);
    expect((await review(id, 'reviewer', ret(['Again.']))).status).toBe(409);
    expect((await review(id, 'reviewer', approve())).status).toBe(409);
    expect(await count(id)).toBe(before);
    expect((await review(id, 'reviewer', comment(1, 'Note for the rework.'))).status).toBe(201);
    expect((await row(id)).state).toBe('returned');
  });

  it('409 for any act once approved', async () => {
    const id = await endedSession();
    expect((await review(id, 'reviewer', approve())).status).toBe(201);
    const before = await count(id);
    for (const body of [approve(), comment(), ret()]) expect((await review(id, 'admin', body)).status, String(body.kind)).toBe(409);
    expect((await resume(id, 'tech')).status).toBe(409);
    expect(await count(id)).toBe(before);
  });
});

describe('bad bodies', () => {
  it('400 naming the field, nothing stored', async () => {
    const id = await endedSession();
    const before = await count(id);
    const wide = { width: 300, height: 100, strokes: [[10, 10, 301, 50]] };
    const low = { width: 300, height: 100, strokes: [[10, 10, 20, 101]] };
    const cases: [Record<string, unknown>, string][] = [
      [{ ...ret([]) }, 'reasons'],
      [{ ...ret(['   ']) }, 'reasons.0'],
      [{ ...ret('one reason') }, 'reasons'],
      [{ ...approve({ ...signature, strokes: [] }) }, 'signature.strokes'],
      [{ ...approve(wide) }, 'signature.strokes'],
      [{ ...approve(low) }, 'signature.strokes'],
      [{ ...approve({ ...signature, strokes: [[10, 10]] }) }, 'signature.strokes.0'],
      [{ ...approve({ ...signature, strokes: [[10.5, 10, 20, 20]] }) }, 'signature.strokes.0.0'],
      [{ ...approve(signature, '') }, 'name'],
      [{ kind: 'approve', id: randomUUID(), name: 'No Signature' }, 'signature'],
      [{ ...comment(before + 1) }, 'atSeq'],
      [{ ...comment(-1) }, 'atSeq'],
      [{ ...comment(1, '') }, 'text'],
      [{ ...comment(), id: 'not-a-uuid' }, 'id'],
      [{ ...comment(), kind: 'praise' }, 'kind'],
      [{ ...comment(), extra: true }, ''],
    ];
    for (const [body, field] of cases) {
      const res = await review(id, 'reviewer', body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.contentType).toContain('application/problem+json');
      if (field) expect(res.json.field, JSON.stringify(body)).toBe(field);
    }
    expect((await resume(id, 'tech', { id: 'nope' })).json).toMatchObject({ status: 400, field: 'id' });
    expect((await api(`/api/sessions/${id}/review`, { method: 'POST', cookie: cookies.reviewer, rawBody: '{not json' })).status).toBe(400);
    expect((await api(`/api/sessions/not-a-uuid/review`, { method: 'POST', cookie: cookies.reviewer, body: comment() })).json).toMatchObject({ status: 400, field: 'id' });
    expect(await count(id)).toBe(before);
    const r = await row(id);
    expect(r.state).toBe('ended');
    expect(r.approvedAt).toBeNull();
  });
});

describe('idempotent by id', () => {
  it('a resent comment, return, resume or approval is stored once and answered with the stored seq', async () => {
    const id = await endedSession();
    const c = comment(1);
    const first = await review(id, 'reviewer', c);
    const again = await review(id, 'reviewer', c);
    expect(first.status).toBe(201);
    expect(again).toMatchObject({ status: 200, json: { duplicate: true, seq: first.json.seq } });

    const r = ret();
    const returned = await review(id, 'reviewer', r);
    // Resent after the state moved on (returned): still the stored event's answer, not a 409.
    expect(await review(id, 'reviewer', r)).toMatchObject({ status: 200, json: { duplicate: true, seq: returned.json.seq } });

    const body = { id: randomUUID() };
    const resumed = await resume(id, 'tech', body);
    expect(resumed.status).toBe(201);
    expect(await resume(id, 'tech', body)).toMatchObject({ status: 200, json: { duplicate: true, seq: resumed.json.seq } });

    await endSession(db, actorOf(org.users.technician), { id: randomUUID(), sessionId: id });
    const a = approve();
    const approved = await review(id, 'reviewer', a);
    expect(approved.status).toBe(201);
    expect(await review(id, 'reviewer', a)).toMatchObject({ status: 200, json: { duplicate: true, seq: approved.json.seq } });

    const types = (await log(id)).map((e) => e.type).filter((t) => t.startsWith('review:') || t === 'session:resumed');
    expect(types).toEqual(['review:commented', 'review:returned', 'session:resumed', 'review:approved']);
  });
});

describe('the whole review, with the field view’s socket listening', () => {
  it('comment → in review → return → returned (broadcast) → resume → live → end → approve: approved_at set, the signature kept', async () => {
    const id = await endedSession();
    // The technician's field view joins the session's room on the real server and must get the review's events live.
    const socket: TestSocket = io(APP_URL, { path: SOCKET_PATH, auth: { protocol: PROTOCOL_VERSION }, extraHeaders: { cookie: cookies.tech! }, transports: ['websocket'], reconnection: false, forceNew: true });
    sockets.push(socket);
    await new Promise<void>((resolve, reject) => {
      socket.once('connect', () => resolve());
      socket.once('connect_error', reject);
    });
    const joined = await socket.timeout(10_000).emitWithAck('session:join', { sessionId: id, afterSeq: 0 });
    expect(joined.ok).toBe(true);
    const heard = (type: 'review:returned' | 'session:resumed' | 'review:approved' | 'review:commented') =>
      new Promise<SessionEvent>((resolve, reject) => {
        const timer = setTimeout(() => reject(new Error(`no ${type} broadcast`)), 10_000);
        socket.once(type, (e: SessionEvent) => {
          clearTimeout(timer);
          resolve(e);
        });
      });

    expect((await row(id)).approvedAt).toBeNull();
    const commented = heard('review:commented');
    expect((await review(id, 'reviewer', comment(3, 'Look here.'))).status).toBe(201);
    expect((await commented).payload).toEqual({ atSeq: 3, text: 'Look here.' });
    expect((await row(id)).state).toBe('in_review');

    const returned = heard('review:returned');
    expect((await review(id, 'reviewer', ret(['Retake the as-left.']))).status).toBe(201);
    expect((await returned).payload).toEqual({ reasons: ['Retake the as-left.'] });

    const resumed = heard('session:resumed');
    expect((await resume(id, 'tech')).status).toBe(201);
    expect((await resumed).sessionId).toBe(id);
    expect((await row(id)).state).toBe('live');

    await endSession(db, actorOf(org.users.technician), { id: randomUUID(), sessionId: id });
    expect((await row(id)).state).toBe('ended');
    const approvedEvent = heard('review:approved');
    const t0 = Date.now();
    expect((await review(id, 'reviewer', approve(signature, '  Rhea Fixture  '))).status).toBe(201);
    expect((await approvedEvent).payload).toEqual({ name: 'Rhea Fixture', signature });
    const r = await row(id);
    expect(r.state).toBe('approved');
    expect(r.approvedAt).not.toBeNull();
    // The server's clock and this process's agree to within a minute (same host).
    expect(Math.abs(r.approvedAt!.getTime() - t0)).toBeLessThan(60_000);
    const state = foldEvents(await log(id));
    expect(state.status).toBe('approved');
    expect(state.review.approval).toMatchObject({ name: 'Rhea Fixture', signature });
    expect(state.review.returns).toHaveLength(1);
    expect(state.review.resumes).toHaveLength(1);
  });
});
