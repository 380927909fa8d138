import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { and, count, eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { instruments, machines, screws, visitInstruments, visits } from '@/db/schema';
import { addDays, todayUtc } from '@/lib/dates';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { api, signInOverHttp } from './helpers/http';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
const cookies: Record<string, string> = {};
const today = todayUtc(new Date());
const inDays = (days: number, hour = 9) => new Date(`${addDays(today, days)}T${String(hour).padStart(2, '0')}:30:00Z`).toISOString();
const instrumentIds: Record<string, string> = {};
let otherInstrumentId: string;

type Mail = { to: string[]; subject: string; text: string; receivedAt: string };
/** Messages the loopback SMTP fake caught for one address (MAILBOX_DIR of the running server), waiting up to 5 s. */
async function mailTo(address: string, match: (m: Mail) => boolean = () => true, timeoutMs = 5000): Promise<Mail[]> {
  const dir = process.env.MAILBOX_DIR;
  if (!dir) throw new Error('MAILBOX_DIR is not set');
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const names = (await readdir(dir).catch(() => [] as string[])).filter((n) => n.endsWith('.json'));
    const mails: Mail[] = [];
    for (const n of names) {
      const m = JSON.parse(await readFile(path.join(dir, n), 'utf8')) as Mail;
      if (m.to.some((t) => t.toLowerCase() === address.toLowerCase()) && match(m)) mails.push(m);
    }
    if (mails.length > 0 || Date.now() > deadline) return mails;
    await new Promise((r) => setTimeout(r, 200));
  }
}

const countVisits = async (organisationId: string) => (await db.select({ n: count() }).from(visits).where(eq(visits.organisationId, organisationId)))[0]!.n;

const body = (patch: Record<string, unknown> = {}) => ({
  machineId: org.machineId,
  technicianId: org.users.technician.id,
  expertId: org.users.expert.id,
  scheduledFor: inDays(7),
  notes: 'Bring the long straightedge.',
  ...patch,
});

async function schedule(patch: Record<string, unknown> = {}) {
  const res = await api('/api/visits', { cookie: cookies.admin, method: 'POST', body: body(patch) });
  expect(res.status).toBe(201);
  return (res.json.visit as { id: string }).id;
}

beforeAll(async () => {
  org = await makeOrganisation(db, 'Visits');
  other = await makeOrganisation(db, 'VisitsElsewhere');
  for (const role of ['technician', 'expert', 'reviewer', 'admin'] as const) cookies[role] = await signInOverHttp(org.users[role].email);
  cookies.outsider = await signInOverHttp(other.users.admin.email);
  const rows = await db
    .insert(instruments)
    .values([
      { organisationId: org.organisationId, kind: 'level', model: 'Fixture level', serial: `CUR-${org.organisationId.slice(0, 4)}`, calibrationDue: addDays(today, 200) },
      { organisationId: org.organisationId, kind: 'indicator', model: 'Fixture indicator', serial: `EXP-${org.organisationId.slice(0, 4)}`, calibrationDue: addDays(today, -3) },
      { organisationId: other.organisationId, kind: 'level', model: 'Elsewhere level', serial: 'ELSE-1', calibrationDue: addDays(today, 200) },
    ])
    .returning();
  instrumentIds.current = rows[0]!.id;
  instrumentIds.expired = rows[1]!.id;
  otherInstrumentId = rows[2]!.id;
});

describe('visits: who may call', () => {
  const id = randomUUID();
  it.each([
    ['GET', '/api/visits'],
    ['POST', '/api/visits'],
    ['GET', `/api/visits/${id}`],
    ['PATCH', `/api/visits/${id}`],
    ['POST', `/api/visits/${id}/instruments`],
    ['DELETE', `/api/visits/${id}/instruments/${randomUUID()}`],
  ])('answers %s %s with 401 when nobody is signed in', async (method, p) => {
    const res = await api(p, { method, body: method === 'POST' || method === 'PATCH' ? {} : undefined });
    expect(res.status).toBe(401);
    expect(res.json.code).toBe('unauthorized:auth');
  });

  it.each(['technician', 'expert', 'reviewer'])('refuses a %s scheduling a visit (403), storing nothing', async (role) => {
    const before = await countVisits(org.organisationId);
    const res = await api('/api/visits', { cookie: cookies[role], method: 'POST', body: body() });
    expect(res.status).toBe(403);
    expect(res.json.code).toBe('forbidden:visit');
    expect(await countVisits(org.organisationId)).toBe(before);
  });
});

describe('POST /api/visits', () => {
  it.each([
    ['a machine id that is not a UUID', { machineId: 'vx-800' }, 'machineId'],
    ['no technician', { technicianId: undefined }, 'technicianId'],
    ['a time in the past', { scheduledFor: new Date(Date.now() - 3_600_000).toISOString() }, 'scheduledFor'],
    ['a time without a zone', { scheduledFor: '2030-01-01T09:00' }, 'scheduledFor'],
    ['an expert as technician', { technicianId: '__expert__' }, 'technicianId'],
    ['a technician as expert', { expertId: '__technician__' }, 'expertId'],
    ['another organisation’s technician', { technicianId: '__outsider__' }, 'technicianId'],
    ['notes too long', { notes: 'x'.repeat(2001) }, 'notes'],
    ['an unknown field', { colour: 'red' }, undefined],
  ])('refuses %s with a 400 naming the field, storing nothing', async (_what, patch, field) => {
    const resolved = Object.fromEntries(
      Object.entries(patch).map(([k, v]) => [k, v === '__expert__' ? org.users.expert.id : v === '__technician__' ? org.users.technician.id : v === '__outsider__' ? other.users.technician.id : v]),
    );
    const before = await countVisits(org.organisationId);
    const res = await api('/api/visits', { cookie: cookies.admin, method: 'POST', body: body(resolved) });
    expect(res.status).toBe(400);
    expect(res.json.code).toBe('bad_request:visit');
    if (field) {
      expect(res.json.field).toBe(field);
      expect(String(res.json.detail)).toMatch(new RegExp(`^${field}: `));
    }
    expect(await countVisits(org.organisationId)).toBe(before);
  });

  it('answers 404 for another organisation’s machine, storing nothing', async () => {
    const before = await countVisits(org.organisationId);
    const res = await api('/api/visits', { cookie: cookies.admin, method: 'POST', body: body({ machineId: other.machineId }) });
    expect(res.status).toBe(404);
    expect(res.json.code).toBe('not_found:machine');
    expect(await countVisits(org.organisationId)).toBe(before);
  });

  it('schedules a visit (201) and mails the technician and the expert a plain-text notice with machine, site and time', async () => {
    const at = inDays(9, 13);
    const id = await schedule({ scheduledFor: at });
    const [stored] = await db.select().from(visits).where(eq(visits.id, id));
    expect(stored).toMatchObject({ organisationId: org.organisationId, state: 'scheduled', createdById: org.users.admin.id, notes: 'Bring the long straightedge.' });
    expect(stored!.scheduledFor.toISOString()).toBe(at);
    const mails = await mailTo(org.users.technician.email, (m) => m.text.includes(at));
    expect(mails).toHaveLength(1);
    expect(mails[0]!.to.map((t) => t.toLowerCase())).toContain(org.users.expert.email.toLowerCase());
    expect(mails[0]!.subject).toContain('Leveling visit scheduled');
    expect(mails[0]!.text).toContain('Visits VMC');
    expect(mails[0]!.text).toContain('Visits site');
    expect(mails[0]!.text).toMatch(/\d{2}:30 UTC/);
  });
});

describe('GET /api/visits', () => {
  let early: string;
  let late: string;
  beforeAll(async () => {
    early = await schedule({ scheduledFor: inDays(2) });
    late = await schedule({ scheduledFor: inDays(40) });
  });

  it('lists only the organisation’s visits, sorted and paged in the database', async () => {
    const res = await api('/api/visits?pageSize=100', { cookie: cookies.reviewer });
    expect(res.status).toBe(200);
    const rows = res.json.rows as { id: string; scheduledFor: string; machineSerial: string; technicianName: string }[];
    expect(rows.map((r) => r.scheduledFor)).toEqual([...rows.map((r) => r.scheduledFor)].sort());
    expect(rows[0]!.id).toBe(early);
    expect(rows.at(-1)!.id).toBe(late);
    expect(rows[0]!.technicianName).toBe('Visits technician');
    const outsider = await api('/api/visits?pageSize=100', { cookie: cookies.outsider });
    expect((outsider.json.rows as { id: string }[]).some((r) => r.id === early)).toBe(false);
    const desc = await api('/api/visits?dir=desc&pageSize=1', { cookie: cookies.technician });
    expect((desc.json.rows as { id: string }[])[0]!.id).toBe(late);
    expect(desc.json.pageSize).toBe(1);
  });

  it('filters by UTC day range and state', async () => {
    const day = addDays(today, 40);
    const res = await api(`/api/visits?from=${day}&to=${day}`, { cookie: cookies.technician });
    expect((res.json.rows as { id: string }[]).map((r) => r.id)).toEqual([late]);
    const done = await api('/api/visits?state=completed', { cookie: cookies.technician });
    expect((done.json.rows as { state: string }[]).every((r) => r.state === 'completed')).toBe(true);
  });

  it.each([
    ['state=done', 'state'],
    ['from=tomorrow', 'from'],
    [`from=${addDays(today, 5)}&to=${today}`, 'to'],
    ['sort=technician', 'sort'],
    ['pageSize=1000', 'pageSize'],
  ])('refuses %s with a 400 naming %s', async (query, field) => {
    const res = await api(`/api/visits?${query}`, { cookie: cookies.technician });
    expect(res.status).toBe(400);
    expect(res.json).toMatchObject({ code: 'bad_request:visit', field });
  });
});

describe('GET and PATCH /api/visits/[id]', () => {
  it('shows a visit to anyone of the organisation and 404 to another organisation', async () => {
    const id = await schedule();
    const mine = await api(`/api/visits/${id}`, { cookie: cookies.expert });
    expect(mine.status).toBe(200);
    expect(mine.json).toMatchObject({ visit: { id, state: 'scheduled' }, machine: { id: org.machineId }, technician: { id: org.users.technician.id }, instruments: [] });
    const theirs = await api(`/api/visits/${id}`, { cookie: cookies.outsider });
    expect(theirs.status).toBe(404);
    expect(theirs.json.code).toBe('not_found:visit');
    const bad = await api('/api/visits/not-a-uuid', { cookie: cookies.expert });
    expect(bad.status).toBe(400);
    expect(bad.json.field).toBe('id');
  });

  it('moves scheduled → in progress → completed, and refuses illegal moves with a 409 naming both states', async () => {
    const id = await schedule();
    const skip = await api(`/api/visits/${id}`, { cookie: cookies.admin, method: 'PATCH', body: { state: 'completed' } });
    expect(skip.status).toBe(409);
    expect(skip.json.code).toBe('conflict:visit');
    expect(String(skip.json.detail)).toContain('scheduled → completed');
    const start = await api(`/api/visits/${id}`, { cookie: cookies.admin, method: 'PATCH', body: { state: 'in_progress' } });
    expect(start.status).toBe(200);
    const move = await api(`/api/visits/${id}`, { cookie: cookies.admin, method: 'PATCH', body: { scheduledFor: inDays(12) } });
    expect(move.status).toBe(409);
    expect(move.json.field).toBe('scheduledFor');
    const done = await api(`/api/visits/${id}`, { cookie: cookies.admin, method: 'PATCH', body: { state: 'completed' } });
    expect(done.status).toBe(200);
    const cancel = await api(`/api/visits/${id}`, { cookie: cookies.admin, method: 'PATCH', body: { state: 'cancelled' } });
    expect(cancel.status).toBe(409);
    expect(String(cancel.json.detail)).toContain('completed → cancelled');
    const [stored] = await db.select().from(visits).where(eq(visits.id, id));
    expect(stored!.state).toBe('completed');
  });

  it('cancels a scheduled visit', async () => {
    const id = await schedule();
    const res = await api(`/api/visits/${id}`, { cookie: cookies.admin, method: 'PATCH', body: { state: 'cancelled', notes: 'Customer shut down for the holidays.' } });
    expect(res.status).toBe(200);
    expect(res.json.visit).toMatchObject({ state: 'cancelled', notes: 'Customer shut down for the holidays.' });
  });

  it('reschedules: stores the time, clears a sent reminder and mails the new time', async () => {
    const id = await schedule();
    await db.update(visits).set({ reminderSentAt: new Date() }).where(eq(visits.id, id));
    const at = inDays(21, 7);
    const res = await api(`/api/visits/${id}`, { cookie: cookies.admin, method: 'PATCH', body: { scheduledFor: at } });
    expect(res.status).toBe(200);
    const [stored] = await db.select().from(visits).where(eq(visits.id, id));
    expect(stored!.scheduledFor.toISOString()).toBe(at);
    expect(stored!.reminderSentAt).toBeNull();
    const mails = await mailTo(org.users.technician.email, (m) => m.subject.includes('rescheduled') && m.text.includes(at));
    expect(mails).toHaveLength(1);
  });

  it('refuses a change by a non-admin (403), by another organisation (404), and bad input (400) without changing anything', async () => {
    const id = await schedule();
    const tech = await api(`/api/visits/${id}`, { cookie: cookies.technician, method: 'PATCH', body: { notes: 'mine now' } });
    expect(tech.status).toBe(403);
    const outsider = await api(`/api/visits/${id}`, { cookie: cookies.outsider, method: 'PATCH', body: { notes: 'ours now' } });
    expect(outsider.status).toBe(404);
    for (const [patch, field] of [
      [{ state: 'done' }, 'state'],
      [{ scheduledFor: '2001-01-01T00:00:00Z' }, 'scheduledFor'],
      [{}, undefined],
    ] as const) {
      const res = await api(`/api/visits/${id}`, { cookie: cookies.admin, method: 'PATCH', body: patch });
      expect(res.status).toBe(400);
      if (field) expect(res.json.field).toBe(field);
    }
    const [stored] = await db.select().from(visits).where(eq(visits.id, id));
    expect(stored).toMatchObject({ state: 'scheduled', notes: 'Bring the long straightedge.' });
  });
});

describe('instruments for a visit', () => {
  let visitId: string;
  beforeAll(async () => {
    visitId = await schedule({ scheduledFor: inDays(1) });
  });
  const chosen = async () => db.select().from(visitInstruments).where(eq(visitInstruments.visitId, visitId));

  it('lets the visit’s technician choose a current instrument, once', async () => {
    const res = await api(`/api/visits/${visitId}/instruments`, { cookie: cookies.technician, method: 'POST', body: { instrumentId: instrumentIds.current } });
    expect(res.status).toBe(201);
    expect(res.json.instrument).toMatchObject({ instrumentId: instrumentIds.current, overrideReason: null, status: 'current' });
    const again = await api(`/api/visits/${visitId}/instruments`, { cookie: cookies.admin, method: 'POST', body: { instrumentId: instrumentIds.current } });
    expect(again.status).toBe(409);
    expect(await chosen()).toHaveLength(1);
  });

  it('refuses an expert or reviewer (403) and another organisation (404 for the visit and for its instrument)', async () => {
    for (const role of ['expert', 'reviewer']) {
      const res = await api(`/api/visits/${visitId}/instruments`, { cookie: cookies[role], method: 'POST', body: { instrumentId: instrumentIds.expired } });
      expect(res.status).toBe(403);
      expect(res.json.code).toBe('forbidden:visit');
    }
    const outsider = await api(`/api/visits/${visitId}/instruments`, { cookie: cookies.outsider, method: 'POST', body: { instrumentId: otherInstrumentId } });
    expect(outsider.status).toBe(404);
    expect(outsider.json.code).toBe('not_found:visit');
    const theirInstrument = await api(`/api/visits/${visitId}/instruments`, { cookie: cookies.admin, method: 'POST', body: { instrumentId: otherInstrumentId } });
    expect(theirInstrument.status).toBe(404);
    expect(theirInstrument.json.code).toBe('not_found:instrument');
    expect(await chosen()).toHaveLength(1);
  });

  it('refuses bad input with a 400 naming the field', async () => {
    const res = await api(`/api/visits/${visitId}/instruments`, { cookie: cookies.admin, method: 'POST', body: { instrumentId: 'LV-2207' } });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe('instrumentId');
    const del = await api(`/api/visits/${visitId}/instruments/nope`, { cookie: cookies.admin, method: 'DELETE' });
    expect(del.status).toBe(400);
    expect(del.json.field).toBe('instrumentId');
  });

  it('refuses an instrument past its calibration due date (409 naming serial and date) unless an admin gives a written reason', async () => {
    const due = addDays(today, -3);
    const serial = `EXP-${org.organisationId.slice(0, 4)}`;
    const plain = await api(`/api/visits/${visitId}/instruments`, { cookie: cookies.admin, method: 'POST', body: { instrumentId: instrumentIds.expired } });
    expect(plain.status).toBe(409);
    expect(plain.json.code).toBe('conflict:calibration');
    expect(String(plain.json.detail)).toContain(serial);
    expect(String(plain.json.detail)).toContain(due);
    const byTech = await api(`/api/visits/${visitId}/instruments`, {
      cookie: cookies.technician,
      method: 'POST',
      body: { instrumentId: instrumentIds.expired, overrideReason: 'The spare is at another site today.' },
    });
    expect(byTech.status).toBe(409);
    expect(byTech.json.code).toBe('conflict:calibration');
    const short = await api(`/api/visits/${visitId}/instruments`, { cookie: cookies.admin, method: 'POST', body: { instrumentId: instrumentIds.expired, overrideReason: 'ok' } });
    expect(short.status).toBe(409);
    expect(short.json.field).toBe('overrideReason');
    expect(await chosen()).toHaveLength(1);

    const reason = 'Checked against the reference block this morning; recalibration booked.';
    const allowed = await api(`/api/visits/${visitId}/instruments`, { cookie: cookies.admin, method: 'POST', body: { instrumentId: instrumentIds.expired, overrideReason: reason } });
    expect(allowed.status).toBe(201);
    const [row] = await db.select().from(visitInstruments).where(and(eq(visitInstruments.visitId, visitId), eq(visitInstruments.instrumentId, instrumentIds.expired!)));
    expect(row).toMatchObject({ overrideReason: reason, overrideById: org.users.admin.id });
    expect(Math.abs(row!.overrideAt!.getTime() - Date.now())).toBeLessThan(60_000);
    const shown = await api(`/api/visits/${visitId}`, { cookie: cookies.technician });
    expect((shown.json.instruments as { instrumentId: string; status: string; overrideByName: string }[]).find((i) => i.instrumentId === instrumentIds.expired)).toMatchObject({
      status: 'expired',
      overrideByName: 'Visits admin',
    });
  });

  it('takes an instrument off the visit; a second time is a 404', async () => {
    const res = await api(`/api/visits/${visitId}/instruments/${instrumentIds.current}`, { cookie: cookies.technician, method: 'DELETE' });
    expect(res.status).toBe(200);
    const again = await api(`/api/visits/${visitId}/instruments/${instrumentIds.current}`, { cookie: cookies.technician, method: 'DELETE' });
    expect(again.status).toBe(404);
    const byExpert = await api(`/api/visits/${visitId}/instruments/${instrumentIds.expired}`, { cookie: cookies.expert, method: 'DELETE' });
    expect(byExpert.status).toBe(403);
    expect((await chosen()).map((r) => r.instrumentId)).toEqual([instrumentIds.expired]);
  });

  it('refuses changes to the instruments of a cancelled visit (409)', async () => {
    const id = await schedule();
    await api(`/api/visits/${id}`, { cookie: cookies.admin, method: 'PATCH', body: { state: 'cancelled' } });
    const res = await api(`/api/visits/${id}/instruments`, { cookie: cookies.admin, method: 'POST', body: { instrumentId: instrumentIds.current } });
    expect(res.status).toBe(409);
    expect(res.json.code).toBe('conflict:visit');
  });
});

describe('a leveling session opened for a visit', () => {
  it('records the visit on the session and refuses a visit of another machine or another organisation', async () => {
    const visitId = await schedule({ scheduledFor: inDays(2) });
    const opened = await api('/api/sessions', { cookie: cookies.technician, method: 'POST', body: { machineId: org.machineId, visitId, experts: [org.users.expert.id] } });
    expect(opened.status).toBe(201);
    const sessionId = (opened.json.session as { id: string }).id;
    const { listVisitSessions } = await import('@/db/queries/visits');
    expect((await listVisitSessions(db, { visitId })).map((s) => s.id)).toEqual([sessionId]);

    // A second machine of the same organisation: the visit is not for it.
    const [first] = await db.select().from(machines).where(eq(machines.id, org.machineId));
    const [second] = await db
      .insert(machines)
      .values({ ...first!, id: randomUUID(), serial: `${first!.serial}-B`, createdAt: undefined })
      .returning();
    await db.insert(screws).values((await db.select().from(screws).where(eq(screws.machineId, org.machineId))).map((sc) => ({ ...sc, id: randomUUID(), machineId: second!.id })));
    const wrongMachine = await api('/api/sessions', { cookie: cookies.technician, method: 'POST', body: { machineId: second!.id, visitId } });
    expect(wrongMachine.status).toBe(400);
    expect(wrongMachine.json).toMatchObject({ field: 'visitId' });

    const theirVisit = await api('/api/visits', { cookie: cookies.outsider, method: 'POST', body: { ...body(), machineId: other.machineId, technicianId: other.users.technician.id, expertId: other.users.expert.id } });
    expect(theirVisit.status).toBe(201);
    const foreign = await api('/api/sessions', {
      cookie: cookies.technician,
      method: 'POST',
      body: { machineId: org.machineId, visitId: (theirVisit.json.visit as { id: string }).id },
    });
    expect(foreign.status).toBe(404);
    expect(foreign.json).toMatchObject({ code: 'not_found:visit', field: 'visitId' });
  });
});
