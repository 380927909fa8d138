// Session routes over HTTP as personas (real server, real database), and every socket command for each standing.
// Who may do what is the access rule (issue 5, item 9): participants only, within their organisation; a
// reviewer reads; a technician cannot send moves; an expert cannot post readings; observers send nothing but chat.
import { randomUUID } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { eq } from 'drizzle-orm';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listEventsBySession } from '@/db/queries/events';
import { openSession } from '@/db/queries/sessions';
import { levelingSessions, users, type Role } from '@/db/schema';
import type { Actor } from '@/lib/auth/actor';
import { endSession, sendMove } from '@/lib/session/service';
import { makeOrganisation, PASSWORD, testDb, type OrgFixture } from './helpers/fixtures';
import { api, APP_URL, signInOverHttp } from './helpers/http';
import { bootRealtime, type TestSocket } from './helpers/realtime';

const db = testDb();
type Person = { id: string; email: string; name: string; role: Role; organisationId: string };
let org: OrgFixture;
let other: OrgFixture;
let observer: Person;
let outsider: Person;
let sessionId: string;
const cookies: Record<string, string> = {};

async function addUser(o: OrgFixture, role: Role, label: string): Promise<Person> {
  const email = `${label}-${randomUUID().slice(0, 8)}@fixture.test`;
  const [u] = await db.insert(users).values({ organisationId: o.organisationId, role, email, name: `Routes ${label}`, passwordHash: bcrypt.hashSync(PASSWORD, 4) }).returning();
  return { id: u!.id, email, name: u!.name, role, organisationId: o.organisationId };
}
const actorOf = (u: Person): Actor => ({ id: u.id, name: u.name, role: u.role, organisationId: u.organisationId, unitSystem: 'metric' });
const count = async (id = sessionId) => (await listEventsBySession(db, { sessionId: id })).length;
const screwIds = async (id = sessionId) => {
  const [opened] = await listEventsBySession(db, { sessionId: id, limit: 1 });
  return (opened!.payload as { screws: { id: string }[] }).screws.map((s) => s.id);
};
async function newSession() {
  const { session } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20, experts: [org.users.expert.id], observers: [observer.id] });
  return session.id;
}

beforeAll(async () => {
  org = await makeOrganisation(db, 'Routes');
  other = await makeOrganisation(db, 'Elsewhere');
  observer = await addUser(org, 'technician', 'observer');
  outsider = await addUser(org, 'expert', 'outsider');
  sessionId = await newSession();
  const people = { tech: org.users.technician, expert: org.users.expert, observer, reviewer: org.users.reviewer, admin: org.users.admin, outsider, otherTech: other.users.technician, otherAdmin: other.users.admin };
  for (const [k, u] of Object.entries(people)) cookies[k] = await signInOverHttp(u.email);
});

describe('POST /api/sessions', () => {
  const sessionsOfOrg = async () => (await db.select().from(levelingSessions).where(eq(levelingSessions.organisationId, org.organisationId))).length;

  it('401 signed out', async () => {
    expect((await api('/api/sessions', { method: 'POST', body: { machineId: org.machineId } })).status).toBe(401);
  });
  it('400 naming the field, nothing stored', async () => {
    const before = await sessionsOfOrg();
    const res = await api('/api/sessions', { method: 'POST', cookie: cookies.tech, body: { machineId: 'nope' } });
    expect(res).toMatchObject({ status: 400, json: { code: 'bad_request:session', field: 'machineId' } });
    const wrongRole = await api('/api/sessions', { method: 'POST', cookie: cookies.tech, body: { machineId: org.machineId, experts: [observer.id] } });
    expect(wrongRole).toMatchObject({ status: 400, json: { field: 'experts' } });
    expect(await sessionsOfOrg()).toBe(before);
  });
  it('403 for an expert', async () => {
    expect((await api('/api/sessions', { method: 'POST', cookie: cookies.expert, body: { machineId: org.machineId } })).json).toMatchObject({ status: 403, code: 'forbidden:session' });
  });
  it('404 for another organisation’s machine', async () => {
    expect((await api('/api/sessions', { method: 'POST', cookie: cookies.otherTech, body: { machineId: org.machineId } })).status).toBe(404);
  });
  it('201: the session, its opening and participant events, readable by the expert', async () => {
    const res = await api('/api/sessions', { method: 'POST', cookie: cookies.tech, body: { machineId: org.machineId, experts: [org.users.expert.id], observers: [observer.id] } });
    expect(res.status).toBe(201);
    const id = (res.json.session as { id: string }).id;
    const events = await api(`/api/sessions/${id}/events`, { cookie: cookies.expert });
    expect((events.json.events as { type: string }[]).map((e) => e.type)).toEqual(['session:opened', 'participant:added', 'participant:added', 'participant:added']);
  });
});

describe('GET /api/sessions', () => {
  it('401 signed out', async () => {
    expect((await api('/api/sessions')).status).toBe(401);
  });
  it('lists the caller’s sessions with their standing; readers see every one of their organisation; others none', async () => {
    const standingIn = async (who: string) => ((await api('/api/sessions', { cookie: cookies[who] })).json.sessions as { id: string; standing: string }[]).find((s) => s.id === sessionId)?.standing;
    expect(await standingIn('tech')).toBe('technician');
    expect(await standingIn('expert')).toBe('expert');
    expect(await standingIn('observer')).toBe('observer');
    expect(await standingIn('reviewer')).toBe('reader');
    expect(await standingIn('outsider')).toBeUndefined();
    expect(await standingIn('otherAdmin')).toBeUndefined();
    const row = ((await api('/api/sessions', { cookie: cookies.tech })).json.sessions as Record<string, unknown>[]).find((s) => s.id === sessionId);
    expect(row).toMatchObject({ state: 'live', demo: false, machine: { id: org.machineId }, technician: { id: org.users.technician.id }, customer: { name: 'Routes customer' }, site: { name: 'Routes site' } });
  });
});

describe('GET /api/sessions/:id/events', () => {
  it('401, 400 naming after, 403 for a non-participant, 404 for another organisation, 200 after a seq', async () => {
    expect((await api(`/api/sessions/${sessionId}/events`)).status).toBe(401);
    expect((await api(`/api/sessions/${sessionId}/events?after=-1`, { cookie: cookies.tech })).json).toMatchObject({ status: 400, field: 'after' });
    expect((await api(`/api/sessions/${sessionId}/events`, { cookie: cookies.outsider })).json).toMatchObject({ status: 403, code: 'forbidden:session' });
    expect((await api(`/api/sessions/${sessionId}/events`, { cookie: cookies.otherAdmin })).status).toBe(404);
    const res = await api(`/api/sessions/${sessionId}/events?after=2`, { cookie: cookies.reviewer });
    expect(res.status).toBe(200);
    expect((res.json.events as { seq: number }[]).every((e) => e.seq > 2)).toBe(true);
  });
});

describe('POST /api/sessions/:id/readings', () => {
  const level = (divisions: unknown) => ({ id: randomUUID(), reading: { kind: 'level', stage: 'rough-level', axis: 'x', positionMm: 0, divisions } });

  it('401, 400 naming the field with nothing stored, 403 for an expert, 404 for another organisation', async () => {
    expect((await api(`/api/sessions/${sessionId}/readings`, { method: 'POST', body: level(1) })).status).toBe(401);
    const before = await count();
    expect((await api(`/api/sessions/${sessionId}/readings`, { method: 'POST', cookie: cookies.tech, body: level('two') })).json).toMatchObject({ status: 400, field: 'reading.divisions' });
    const height = { id: randomUUID(), reading: { kind: 'height', stage: 'height-check', screwId: randomUUID(), heightMm: 80 } };
    expect((await api(`/api/sessions/${sessionId}/readings`, { method: 'POST', cookie: cookies.tech, body: height })).json).toMatchObject({ status: 400, field: 'reading.screwId' });
    expect((await api(`/api/sessions/${sessionId}/readings`, { method: 'POST', cookie: cookies.expert, body: level(1) })).json).toMatchObject({ status: 403, code: 'forbidden:reading' });
    expect((await api(`/api/sessions/${sessionId}/readings`, { method: 'POST', cookie: cookies.otherTech, body: level(1) })).status).toBe(404);
    expect(await count()).toBe(before);
  });
  it('201 for each kind of reading; a resend is stored once', async () => {
    const [screwId] = await screwIds();
    const bodies = [
      level(1.5),
      { id: randomUUID(), reading: { kind: 'reversal', stage: 'zero-level', axis: 'x', firstDiv: 1, secondDiv: -1 } },
      { id: randomUUID(), reading: { kind: 'height', stage: 'height-check', screwId, heightMm: 80.1 } },
      { id: randomUUID(), reading: { kind: 'sweep', stage: 'spindle-sweep', frontUm: 2, backUm: -2, leftUm: 0, rightUm: 1 } },
    ];
    for (const body of bodies) {
      const before = await count();
      const first = await api(`/api/sessions/${sessionId}/readings`, { method: 'POST', cookie: cookies.tech, body });
      expect(first).toMatchObject({ status: 201, json: { duplicate: false } });
      const again = await api(`/api/sessions/${sessionId}/readings`, { method: 'POST', cookie: cookies.tech, body });
      expect(again).toMatchObject({ status: 200, json: { duplicate: true, seq: first.json.seq } });
      expect(await count()).toBe(before + 1);
    }
  });
  it('409 once the session has ended', async () => {
    const ended = await newSession();
    await endSession(db, actorOf(org.users.expert), { id: randomUUID(), sessionId: ended });
    expect((await api(`/api/sessions/${ended}/readings`, { method: 'POST', cookie: cookies.tech, body: level(1) })).json).toMatchObject({ status: 409, code: 'conflict:session' });
  });
});

describe('/api/sessions/:id/participants', () => {
  it('GET lists the participants with their parts for anyone who may see the session', async () => {
    expect((await api(`/api/sessions/${sessionId}/participants`)).status).toBe(401);
    const res = await api(`/api/sessions/${sessionId}/participants`, { cookie: cookies.reviewer });
    expect((res.json.participants as { userId: string; part: string }[]).map((p) => [p.userId, p.part])).toEqual([
      [org.users.technician.id, 'technician'],
      [org.users.expert.id, 'expert'],
      [observer.id, 'observer'],
    ]);
    expect((await api(`/api/sessions/${sessionId}/participants`, { cookie: cookies.outsider })).status).toBe(403);
    expect((await api(`/api/sessions/${sessionId}/participants`, { cookie: cookies.otherAdmin })).status).toBe(404);
  });
  it('POST: 401, 400 naming the field with nothing stored, 403 for the expert and the observer, 404 for another organisation', async () => {
    const id = await newSession();
    const path = `/api/sessions/${id}/participants`;
    expect((await api(path, { method: 'POST', body: { userId: outsider.id, part: 'observer' } })).status).toBe(401);
    const before = await count(id);
    expect((await api(path, { method: 'POST', cookie: cookies.tech, body: { userId: outsider.id, part: 'boss' } })).json).toMatchObject({ status: 400, field: 'part' });
    expect((await api(path, { method: 'POST', cookie: cookies.tech, body: { userId: other.users.expert.id, part: 'expert' } })).json).toMatchObject({ status: 400, field: 'userId' });
    expect((await api(path, { method: 'POST', cookie: cookies.tech, body: { userId: observer.id, part: 'expert' } })).json).toMatchObject({ status: 400, field: 'userId' });
    expect((await api(path, { method: 'POST', cookie: cookies.expert, body: { userId: outsider.id, part: 'observer' } })).json).toMatchObject({ status: 403, code: 'forbidden:participant' });
    expect((await api(path, { method: 'POST', cookie: cookies.observer, body: { userId: outsider.id, part: 'observer' } })).status).toBe(403);
    expect((await api(path, { method: 'POST', cookie: cookies.otherAdmin, body: { userId: outsider.id, part: 'observer' } })).status).toBe(404);
    expect(await count(id)).toBe(before);
  });
  it('POST: 201 for the technician and for an admin, stored once as participant:added; 409 when already in or ended', async () => {
    const id = await newSession();
    const path = `/api/sessions/${id}/participants`;
    const added = await api(path, { method: 'POST', cookie: cookies.tech, body: { userId: outsider.id, part: 'expert' } });
    expect(added).toMatchObject({ status: 201, json: { participant: { userId: outsider.id, part: 'expert' } } });
    const last = (await listEventsBySession(db, { sessionId: id })).at(-1)!;
    expect(last).toMatchObject({ seq: added.json.seq, type: 'participant:added', actorId: org.users.technician.id });
    const before = await count(id);
    expect((await api(path, { method: 'POST', cookie: cookies.tech, body: { userId: outsider.id, part: 'observer' } })).json).toMatchObject({ status: 409, code: 'conflict:participant', field: 'userId' });
    expect(await count(id)).toBe(before);
    expect((await api(path, { method: 'POST', cookie: cookies.admin, body: { userId: org.users.reviewer.id, part: 'observer' } })).status).toBe(201);
    await endSession(db, actorOf(org.users.expert), { id: randomUUID(), sessionId: id });
    expect((await api(path, { method: 'POST', cookie: cookies.admin, body: { userId: org.users.admin.id, part: 'observer' } })).json).toMatchObject({ status: 409, code: 'conflict:session' });
  });
});

describe('GET /api/people', () => {
  it('401 signed out; 400 naming role; the organisation’s active people of the role, for anyone signed in', async () => {
    expect((await api('/api/people?role=expert')).status).toBe(401);
    expect((await api('/api/people?role=wizard', { cookie: cookies.tech })).json).toMatchObject({ status: 400, field: 'role' });
    const res = await api('/api/people?role=expert', { cookie: cookies.observer });
    expect(res.status).toBe(200);
    const people = res.json.people as { id: string; name: string; role: string }[];
    expect(people.map((p) => p.id).sort()).toEqual([org.users.expert.id, outsider.id].sort());
    expect(Object.keys(people[0]!).sort()).toEqual(['id', 'name', 'role']);
    const all = (await api('/api/people', { cookie: cookies.tech })).json.people as { id: string }[];
    expect(all).toHaveLength(6);
  });
});

describe('photos', () => {
  let png: Buffer;
  const pdf = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
  beforeAll(async () => {
    // A 1200 × 900 test card: the thumbnail must come back 320 px on its long side.
    png = await sharp({ create: { width: 1200, height: 900, channels: 3, background: { r: 40, g: 120, b: 90 } } }).png().toBuffer();
  });
  async function post(cookie: string | undefined, fields: Record<string, string>, file: Buffer | null, type = 'image/png', id = sessionId) {
    const form = new FormData();
    for (const [k, v] of Object.entries(fields)) form.set(k, v);
    if (file) form.set('file', new Blob([new Uint8Array(file)], { type }), 'photo');
    const res = await fetch(`${APP_URL}/api/sessions/${id}/photos`, { method: 'POST', headers: cookie ? { cookie } : {}, body: form });
    return { status: res.status, json: (await res.json().catch(() => ({}))) as Record<string, unknown> };
  }
  const fields = () => ({ id: randomUUID(), stage: 'height-check', caption: 'Pad under FL' });

  it('401 signed out', async () => {
    expect((await post(undefined, fields(), png)).status).toBe(401);
  });
  it('400 naming the field with nothing stored: a PDF, no file, a bad stage, a long caption, a bad id', async () => {
    const before = await count();
    expect((await post(cookies.tech, fields(), pdf, 'application/pdf')).json).toMatchObject({ status: 400, field: 'file' });
    expect((await post(cookies.tech, fields(), pdf, 'image/png')).json).toMatchObject({ status: 400, field: 'file' });
    expect((await post(cookies.tech, fields(), null)).json).toMatchObject({ status: 400, field: 'file' });
    expect((await post(cookies.tech, { ...fields(), stage: 'polish' }, png)).json).toMatchObject({ status: 400, field: 'stage' });
    expect((await post(cookies.tech, { ...fields(), caption: 'x'.repeat(201) }, png)).json).toMatchObject({ status: 400, field: 'caption' });
    expect((await post(cookies.tech, { ...fields(), id: 'one' }, png)).json).toMatchObject({ status: 400, field: 'id' });
    expect(await count()).toBe(before);
  });
  it('400 naming the file when it is over 10 MB', async () => {
    const big = Buffer.concat([png, Buffer.alloc(10 * 1024 * 1024 + 1)]);
    expect((await post(cookies.tech, fields(), big)).json).toMatchObject({ status: 400, field: 'file' });
  });
  it('403 for the expert, the observer and a reader; 404 for another organisation', async () => {
    const before = await count();
    for (const who of ['expert', 'observer', 'reviewer']) expect((await post(cookies[who], fields(), png)).json).toMatchObject({ status: 403, code: 'forbidden:photo' });
    expect((await post(cookies.otherTech, fields(), png)).status).toBe(404);
    expect(await count()).toBe(before);
  });
  it('201 for the technician with a 320 px WebP thumbnail; a resend is stored once; every standing reads it', async () => {
    const f = fields();
    const before = await count();
    const first = await post(cookies.tech, f, png);
    expect(first).toMatchObject({ status: 201, json: { duplicate: false, photoId: f.id } });
    const again = await post(cookies.tech, f, png);
    expect(again).toMatchObject({ status: 200, json: { duplicate: true, seq: first.json.seq, photoId: f.id } });
    expect(await count()).toBe(before + 1);
    const event = (await listEventsBySession(db, { sessionId })).at(-1)!;
    expect(event).toMatchObject({ type: 'photo:attached', payload: { photoId: f.id, stage: 'height-check', caption: 'Pad under FL', contentType: 'image/png', bytes: png.byteLength } });

    for (const who of ['tech', 'expert', 'observer', 'reviewer']) {
      const full = await fetch(`${APP_URL}/api/sessions/${sessionId}/photos/${f.id}`, { headers: { cookie: cookies[who]! } });
      expect(full.status).toBe(200);
      expect(full.headers.get('content-type')).toBe('image/png');
      expect(full.headers.get('x-content-type-options')).toBe('nosniff');
      expect(full.headers.get('content-security-policy')).toContain('sandbox');
      expect(full.headers.get('cache-control')).toContain('private');
      expect(Buffer.from(await full.arrayBuffer()).equals(png)).toBe(true);
    }
    const thumb = await fetch(`${APP_URL}/api/sessions/${sessionId}/photos/${f.id}?size=thumb`, { headers: { cookie: cookies.observer! } });
    expect(thumb.headers.get('content-type')).toBe('image/webp');
    const meta = await sharp(Buffer.from(await thumb.arrayBuffer())).metadata();
    expect(meta).toMatchObject({ format: 'webp', width: 320, height: 240 });
  });
  it('GET: 401, 400 naming size, 403 for a non-participant, 404 for another organisation or an unknown photo', async () => {
    const f = fields();
    await post(cookies.tech, f, png);
    const path = `/api/sessions/${sessionId}/photos/${f.id}`;
    expect((await api(path)).status).toBe(401);
    expect((await api(`${path}?size=huge`, { cookie: cookies.tech })).json).toMatchObject({ status: 400, field: 'size' });
    expect((await api(path, { cookie: cookies.outsider })).status).toBe(403);
    expect((await api(path, { cookie: cookies.otherAdmin })).status).toBe(404);
    expect((await api(`/api/sessions/${sessionId}/photos/${randomUUID()}`, { cookie: cookies.tech })).json).toMatchObject({ status: 404, code: 'not_found:photo' });
  });
});

describe('socket commands by standing', () => {
  let rt: Awaited<ReturnType<typeof bootRealtime>>;
  beforeAll(async () => {
    rt = await bootRealtime(db);
  });
  afterAll(() => rt.close());

  type Standing = 'technician' | 'expert' | 'observer' | 'reader' | 'non-participant' | 'other organisation';
  const personas: Record<Standing, () => Person> = {
    technician: () => org.users.technician,
    expert: () => org.users.expert,
    observer: () => observer,
    reader: () => org.users.reviewer,
    'non-participant': () => outsider,
    'other organisation': () => other.users.technician,
  };
  type Cmd = 'reading:submit' | 'stage:enter' | 'check:mark' | 'move:send' | 'move:answer' | 'note:post' | 'session:end';
  /** Issue 5, item 9: who may send each command (the rest get 403; another organisation 404). */
  const allowed: Record<Cmd, Standing[]> = {
    'reading:submit': ['technician'],
    'stage:enter': ['technician'],
    'check:mark': ['technician'],
    'move:answer': ['technician'],
    'move:send': ['expert'],
    'note:post': ['technician', 'expert', 'observer'],
    'session:end': ['technician', 'expert'],
  };
  /** A valid payload for each command in a fresh session (a pending move is made for move:answer). */
  async function payload(cmd: Cmd, id: string): Promise<Record<string, unknown>> {
    const [screwId] = await screwIds(id);
    const base = { id: randomUUID(), sessionId: id };
    switch (cmd) {
      case 'reading:submit':
        return { ...base, reading: { kind: 'level', stage: 'rough-level', axis: 'y', positionMm: 0, divisions: -0.5 } };
      case 'stage:enter':
        return { ...base, stage: 'height-check' };
      case 'check:mark':
        return { ...base, stage: 'prepare', item: 'table-clean', done: true };
      case 'move:send':
        return { ...base, stage: 'rough-level', screwId, turns: 0.25 };
      case 'move:answer': {
        const move = { id: randomUUID(), sessionId: id, stage: 'rough-level' as const, screwId: screwId!, turns: 0.25, recommended: false };
        await sendMove(db, actorOf(org.users.expert), move);
        return { ...base, moveId: move.id, outcome: 'done', turns: 0.25 };
      }
      case 'note:post':
        return { ...base, text: 'Checked the pads.' };
      case 'session:end':
        return { ...base, reason: 'done for today' };
    }
  }
  const rows = (Object.keys(allowed) as Cmd[]).flatMap((cmd) => (Object.keys(personas) as Standing[]).map((standing) => [cmd, standing] as const));

  it.each(rows)('%s by the %s', async (cmd, standing) => {
    const id = await newSession();
    const socket: TestSocket = await rt.as(personas[standing]());
    const body = await payload(cmd, id);
    const before = await count(id);
    const ack = (await socket.emitWithAck(cmd, body as never)) as { ok: boolean; seq?: number; error?: { code: string } };
    if (allowed[cmd].includes(standing)) {
      expect(ack).toMatchObject({ ok: true, duplicate: false });
      expect(await count(id)).toBe(before + 1);
    } else {
      expect(ack.ok).toBe(false);
      expect(ack.error!.code).toMatch(standing === 'other organisation' ? /^not_found:/ : /^forbidden:/);
      expect(await count(id)).toBe(before);
    }
  });

  it.each(Object.keys(personas) as Standing[])('session:join by the %s', async (standing) => {
    const socket = await rt.as(personas[standing]());
    const ack = (await socket.emitWithAck('session:join', { sessionId, afterSeq: 0 })) as { ok: boolean; error?: { code: string } };
    if (standing === 'non-participant') expect(ack).toMatchObject({ ok: false, error: { code: 'forbidden:session' } });
    else if (standing === 'other organisation') expect(ack).toMatchObject({ ok: false, error: { code: 'not_found:session' } });
    else expect(ack.ok).toBe(true);
  });
});

describe('GET /api/sessions/:id/verify', () => {
  it('recomputes the chain from what is stored: every event counted and the head the session row holds', async () => {
    const res = await api(`/api/sessions/${sessionId}/verify`, { cookie: cookies.reviewer });
    expect(res.status).toBe(200);
    const [row] = await db.select({ lastSeq: levelingSessions.lastSeq, lastHash: levelingSessions.lastHash }).from(levelingSessions).where(eq(levelingSessions.id, sessionId));
    expect(res.json.verdict).toEqual({ ok: true, count: row!.lastSeq, head: row!.lastHash });
  });
  it('401 signed out, 403 for someone of the organisation who takes no part, 404 for another organisation', async () => {
    expect((await api(`/api/sessions/${sessionId}/verify`)).status).toBe(401);
    expect((await api(`/api/sessions/${sessionId}/verify`, { cookie: cookies.outsider })).status).toBe(403);
    expect((await api(`/api/sessions/${sessionId}/verify`, { cookie: cookies.otherAdmin })).status).toBe(404);
    expect((await api(`/api/sessions/not-a-uuid/verify`, { cookie: cookies.tech })).json).toMatchObject({ status: 400, field: 'id' });
  });
});
