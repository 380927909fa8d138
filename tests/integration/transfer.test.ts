// Export and import of a session's record over HTTP as personas (real server, real database): the JSON export is the
// whole log and verifies itself; the CSV has one row per reading; an import verifies the hash chain, refuses a changed
// file naming the first bad event, and stores a good one unchanged in one transaction.
import { randomUUID } from 'node:crypto';
import { eq } from 'drizzle-orm';
import Papa from 'papaparse';
import { beforeAll, describe, expect, it } from 'vitest';
import { listEventsBySession } from '@/db/queries/events';
import { levelingSessions, sessionParticipants } from '@/db/schema';
import type { Actor } from '@/lib/auth/actor';
import type { SessionEvent } from '@/lib/session/events';
import { eventHash, verifyChain } from '@/lib/session/hash-chain';
import { endSession } from '@/lib/session/service';
import type { SessionStage } from '@/lib/session/stages';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { api, APP_URL, signInOverHttp } from './helpers/http';
import { chainedLog, sessionFileOf } from './helpers/session-file';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
const cookies: Record<string, string> = {};
const actorOf = (u: OrgFixture['users']['technician']): Actor => ({ id: u.id, name: u.name, role: u.role, organisationId: u.organisationId, unitSystem: 'metric' });

/** A GET whose body is a file: status, headers and text. */
async function download(path: string, cookie?: string) {
  const res = await fetch(`${APP_URL}${path}`, { headers: cookie ? { cookie } : {} });
  return { status: res.status, disposition: res.headers.get('content-disposition') ?? '', contentType: res.headers.get('content-type') ?? '', text: await res.text() };
}

/** A log as another Levelwire would have written it; an expert who has no account here coaches. */
function builtLog({ machineId, technicianId }: { machineId: string; technicianId: string }) {
  const { sessionId, events, add } = chainedLog({ machineId, technicianId });
  const expertId = randomUUID();
  const level = (stage: SessionStage, axis: 'x' | 'y', positionMm: number, divisions: number) =>
    add('reading:recorded', { kind: 'level', stage, axis, positionMm, divisions, slopeUrad: divisions * 20 });
  add('participant:added', { userId: expertId, name: 'Expert from elsewhere', part: 'expert' });
  add('stage:entered', { stage: 'rough-level' });
  level('rough-level', 'x', 0, 3);
  level('rough-level', 'y', 0, -2);
  add('note:posted', { text: 'Bubble settles slowly; waited 30 s' }, expertId, 'expert');
  add('session:ended', {}, expertId, 'expert');
  return { sessionId, events, expertId };
}

const fileOf = (events: SessionEvent[], sessionId = events[0]!.sessionId) => sessionFileOf(events, undefined, sessionId);
const postImport = (body: unknown, cookie = cookies.admin, query = '') => api(`/api/sessions/import${query}`, { method: 'POST', cookie, body });
const stored = async (sessionId: string) => (await db.select().from(levelingSessions).where(eq(levelingSessions.id, sessionId))).length;

beforeAll(async () => {
  org = await makeOrganisation(db, 'Transfer');
  other = await makeOrganisation(db, 'Elsewhere');
  for (const role of ['technician', 'expert', 'reviewer', 'admin'] as const) cookies[role] = await signInOverHttp(org.users[role].email);
  cookies.otherAdmin = await signInOverHttp(other.users.admin.email);
});

describe('GET /api/sessions/:id/export', () => {
  let sessionId: string;
  const readings = [
    { kind: 'level', stage: 'rough-level', axis: 'x', positionMm: 0, divisions: 2.5 },
    { kind: 'level', stage: 'rough-level', axis: 'y', positionMm: 0, divisions: -1 },
    { kind: 'reversal', stage: 'zero-level', axis: 'x', firstDiv: 1, secondDiv: -0.5 },
    { kind: 'sweep', stage: 'spindle-sweep', frontUm: 3, backUm: -2, leftUm: 1, rightUm: 0 },
  ];

  beforeAll(async () => {
    const opened = await api('/api/sessions', { method: 'POST', cookie: cookies.technician, body: { machineId: org.machineId, experts: [org.users.expert.id] } });
    expect(opened.status).toBe(201);
    sessionId = (opened.json.session as { id: string }).id;
    for (const reading of readings) {
      const res = await api(`/api/sessions/${sessionId}/readings`, { method: 'POST', cookie: cookies.technician, body: { id: randomUUID(), reading } });
      expect(res.status).toBe(201);
    }
    await endSession(db, actorOf(org.users.expert), { id: randomUUID(), sessionId });
  });

  it('401 signed out, 400 naming format, 404 for another organisation', async () => {
    expect((await api(`/api/sessions/${sessionId}/export`)).status).toBe(401);
    expect((await api(`/api/sessions/${sessionId}/export?format=xml`, { cookie: cookies.technician })).json).toMatchObject({ status: 400, field: 'format' });
    expect((await api(`/api/sessions/${sessionId}/export`, { cookie: cookies.otherAdmin })).status).toBe(404);
  });

  it('JSON: the whole log as an attachment named by serial, day and id; its chain verifies to the head the session row holds', async () => {
    const res = await download(`/api/sessions/${sessionId}/export?format=json`, cookies.expert);
    expect(res.status).toBe(200);
    const [row] = await db.select().from(levelingSessions).where(eq(levelingSessions.id, sessionId));
    const serial = (await api(`/api/machines/${org.machineId}`, { cookie: cookies.admin })).json.machine as { serial: string };
    expect(res.disposition).toBe(`attachment; filename="levelwire-session-${serial.serial}-${row!.createdAt.toISOString().slice(0, 10)}-${sessionId.slice(0, 8)}.json"`);
    const file = JSON.parse(res.text) as { format: string; version: number; session: { id: string; state: string; machine: { serial: string } }; events: SessionEvent[] };
    expect(file).toMatchObject({ format: 'levelwire-session', version: 1, session: { id: sessionId, state: 'ended', machine: { serial: serial.serial } } });
    expect(file.events).toHaveLength(row!.lastSeq);
    expect(verifyChain(file.events)).toEqual({ ok: true, count: row!.lastSeq, head: row!.lastHash });
  });

  it('CSV: a header and one row per reading (the reviewer reads every session)', async () => {
    const res = await download(`/api/sessions/${sessionId}/export?format=csv`, cookies.reviewer);
    expect(res.status).toBe(200);
    expect(res.contentType).toContain('text/csv');
    expect(res.disposition).toMatch(/^attachment; filename="levelwire-session-.+\.csv"$/);
    const rows = Papa.parse<Record<string, string>>(res.text, { header: true, skipEmptyLines: true }).data;
    expect(rows).toHaveLength(readings.length);
    expect(rows.map((r) => r.kind)).toEqual(['level', 'level', 'reversal', 'sweep']);
    // 2.5 divisions of a 20 µrad/div level (the session's default, 0.02 mm/m per JIS B 7510) is 50 µrad.
    expect(Number(rows[0]!.slope_urad)).toBeCloseTo(50, 9);
    expect(rows[2]!.zero_error_div).toBe('0.25'); // (1 + (−0.5)) / 2: TRADE.md §3
    expect(rows[3]!.front_um).toBe('3');
  });

  it('the exported file imported by another organisation: a 409, its id being taken, without saying what the session holds', async () => {
    const file = JSON.parse((await download(`/api/sessions/${sessionId}/export`, cookies.admin)).text);
    expect(verifyChain(file.events).ok).toBe(true);
    const taken = await postImport(file, cookies.otherAdmin, `?machineId=${other.machineId}`);
    expect(String(taken.json.detail)).not.toMatch(/events|head/);
    expect(taken).toMatchObject({ status: 409, json: { code: 'conflict:import', field: 'session.id' } });
  });
});

describe('POST /api/sessions/import', () => {
  it('401 signed out; 403 for a technician, an expert and a reviewer; nothing stored', async () => {
    const { sessionId, events } = builtLog({ machineId: org.machineId, technicianId: org.users.technician.id });
    expect((await postImport(fileOf(events), '')).status).toBe(401);
    for (const role of ['technician', 'expert', 'reviewer'] as const) {
      expect((await postImport(fileOf(events), cookies[role])).json).toMatchObject({ status: 403, code: 'forbidden:session' });
    }
    expect(await stored(sessionId)).toBe(0);
  });

  it('201: stored unchanged; /verify agrees; the events read back equal the file’s; the same file again is a 409', async () => {
    const { sessionId, events, expertId } = builtLog({ machineId: org.machineId, technicianId: org.users.technician.id });
    const res = await postImport(fileOf(events));
    expect(res.status).toBe(201);
    expect(res.json).toMatchObject({
      session: { id: sessionId, state: 'ended', machineId: org.machineId, technicianId: org.users.technician.id, technicianFromLog: true, participants: 1, events: events.length },
      verdict: { ok: true, count: events.length, head: events.at(-1)!.hash },
      replayUrl: `/sessions/${sessionId}/replay`,
    });
    const [row] = await db.select().from(levelingSessions).where(eq(levelingSessions.id, sessionId));
    expect(row).toMatchObject({ organisationId: org.organisationId, state: 'ended', lastSeq: events.length, lastHash: events.at(-1)!.hash, approvedAt: null, levelDivisionUrad: 20 });
    // Participants: only people with an account here (the expert from elsewhere is in the log, not in the table).
    const parts = await db.select().from(sessionParticipants).where(eq(sessionParticipants.sessionId, sessionId));
    expect(parts.map((p) => [p.userId, p.part])).toEqual([[org.users.technician.id, 'technician']]);
    expect((await listEventsBySession(db, { sessionId })).map((e) => e.actorId)).toContain(expertId);

    const verify = await api(`/api/sessions/${sessionId}/verify`, { cookie: cookies.reviewer });
    expect(verify.json.verdict).toEqual({ ok: true, count: events.length, head: events.at(-1)!.hash });
    const back = await api(`/api/sessions/${sessionId}/events`, { cookie: cookies.technician });
    expect(back.json.events).toEqual(events);

    const again = await postImport(fileOf(events));
    expect(again).toMatchObject({ status: 409, json: { code: 'conflict:import' } });
    expect(String(again.json.detail)).toMatch(/already in Levelwire/);
  });

  it('409 naming the difference when a longer record of the same session arrives', async () => {
    const { events } = builtLog({ machineId: org.machineId, technicianId: org.users.technician.id });
    expect((await postImport(fileOf(events))).status).toBe(201);
    const prevHash = events.at(-1)!.hash;
    const more = { ...events.at(-1)!, seq: events.length + 1, id: randomUUID(), type: 'review:commented' as const, payload: { atSeq: 3, text: 'Check the Y reading' }, actorRole: 'reviewer', serverTs: '2025-11-04T08:00:00.000Z', prevHash };
    const longer = [...events, { ...more, hash: eventHash(prevHash, more) }] as SessionEvent[];
    const res = await postImport(fileOf(longer));
    expect(res.status).toBe(409);
    expect(String(res.json.detail)).toContain(`holds ${events.length} events`);
    expect(String(res.json.detail)).toContain(`the file ${longer.length}`);
  });

  it('a technician with no account here: the importing admin stands in the technician column; an approval sets approved_at', async () => {
    const stranger = randomUUID();
    const { sessionId, events } = builtLog({ machineId: org.machineId, technicianId: stranger });
    const prevHash = events.at(-1)!.hash;
    const approval = { ...events.at(-1)!, seq: events.length + 1, id: randomUUID(), type: 'review:approved' as const, payload: { name: 'Reviewer Elsewhere', signature: { width: 300, height: 100, strokes: [[10, 10, 80, 40]] } }, actorId: randomUUID(), actorRole: 'reviewer', serverTs: '2025-11-05T10:00:00.000Z', prevHash };
    const res = await postImport(fileOf([...events, { ...approval, hash: eventHash(prevHash, approval) } as SessionEvent]));
    expect(res.json).toMatchObject({ session: { state: 'approved', technicianId: org.users.admin.id, technicianFromLog: false, participants: 0 } });
    const [row] = await db.select().from(levelingSessions).where(eq(levelingSessions.id, sessionId));
    expect(row!.approvedAt?.toISOString()).toBe('2025-11-05T10:00:00.000Z');
  });

  it('refuses a file with one reading’s divisions changed, naming that seq; nothing stored', async () => {
    const { sessionId, events } = builtLog({ machineId: org.machineId, technicianId: org.users.technician.id });
    const file = JSON.parse(JSON.stringify(fileOf(events)));
    const i = events.findIndex((e) => e.type === 'reading:recorded');
    file.events[i].payload.divisions = 0.5;
    const res = await postImport(file);
    expect(res).toMatchObject({ status: 400, json: { code: 'bad_request:import', brokenEvent: { seq: i + 1, type: 'reading:recorded', reason: 'content does not match its hash' } } });
    expect(String(res.json.detail)).toContain(`seq ${i + 1} (reading:recorded)`);
    expect(await stored(sessionId)).toBe(0);
  });

  it('refuses a file with an event deleted, naming the gap; nothing stored', async () => {
    const { sessionId, events } = builtLog({ machineId: org.machineId, technicianId: org.users.technician.id });
    const res = await postImport(fileOf([...events.slice(0, 6), ...events.slice(7)]));
    expect(res).toMatchObject({ status: 400, json: { brokenEvent: { seq: 8, reason: 'expected seq 7, found 8' } } });
    expect(await stored(sessionId)).toBe(0);
  });

  it('400 naming the path for malformed JSON and wrong shapes; nothing stored', async () => {
    const { sessionId, events } = builtLog({ machineId: org.machineId, technicianId: org.users.technician.id });
    const notJson = await api('/api/sessions/import', { method: 'POST', cookie: cookies.admin, rawBody: `{"format":"levelwire-session","events":[` });
    expect(notJson).toMatchObject({ status: 400, json: { field: 'file' } });
    const wrong = JSON.parse(JSON.stringify(fileOf(events)));
    wrong.events[4].payload.axis = 'z';
    expect((await postImport(wrong)).json).toMatchObject({ status: 400, field: 'events.4.payload.axis' });
    expect((await postImport({ ...fileOf(events), version: 7 })).json).toMatchObject({ status: 400, field: 'version' });
    expect((await postImport([1, 2])).json).toMatchObject({ status: 400, field: 'file' });
    expect((await postImport(fileOf(events), cookies.admin, '?machineId=nope')).json).toMatchObject({ status: 400, field: 'machineId' });
    expect(await stored(sessionId)).toBe(0);
  });

  it('a machine of another organisation is a 400 naming machineId, in the log or in ?machineId=; a machine of one’s own given instead is taken', async () => {
    const { sessionId, events } = builtLog({ machineId: other.machineId, technicianId: org.users.technician.id });
    expect((await postImport(fileOf(events))).json).toMatchObject({ status: 400, field: 'machineId' });
    expect((await postImport(fileOf(events), cookies.admin, `?machineId=${other.machineId}`)).json).toMatchObject({ status: 400, field: 'machineId' });
    expect(await stored(sessionId)).toBe(0);
    const res = await postImport(fileOf(events), cookies.admin, `?machineId=${org.machineId}`);
    expect(res).toMatchObject({ status: 201, json: { session: { machineId: org.machineId } } });
  });
});
