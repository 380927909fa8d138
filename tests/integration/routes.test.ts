import { randomUUID } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { listEventsBySession } from '@/db/queries/events';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { api, signInOverHttp } from './helpers/http';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
const cookies: Record<string, string> = {};
let sessionId: string;

beforeAll(async () => {
  org = await makeOrganisation(db, 'Routes');
  other = await makeOrganisation(db, 'Elsewhere');
  for (const role of ['technician', 'expert', 'reviewer'] as const) cookies[role] = await signInOverHttp(org.users[role].email);
  cookies.outsider = await signInOverHttp(other.users.technician.email);
  // The expert coaches (a participant): only participants and the organisation's readers see a session's log.
  const opened = await api('/api/sessions', { cookie: cookies.technician, method: 'POST', body: { machineId: org.machineId, experts: [org.users.expert.id] } });
  expect(opened.status).toBe(201);
  sessionId = (opened.json.session as { id: string }).id;
});

const reading = (patch: Record<string, unknown> = {}) => ({ id: randomUUID(), reading: { kind: 'level', axis: 'y', positionMm: -250, divisions: -1, ...patch } });

describe('route handlers over HTTP', () => {
  it('reports the app and the database as up', async () => {
    const res = await api('/api/health');
    expect(res.status).toBe(200);
    expect(res.json).toMatchObject({ app: 'up', database: 'up' });
  });

  it.each([
    ['GET', '/api/sessions'],
    ['POST', '/api/sessions'],
    ['GET', '/api/machines'],
    ['GET', `/api/sessions/${randomUUID()}`],
    ['GET', `/api/sessions/${randomUUID()}/events`],
    ['POST', `/api/sessions/${randomUUID()}/readings`],
  ])('answers %s %s with 401 problem+json when nobody is signed in', async (method, path) => {
    const res = await api(path, { method, body: method === 'POST' ? {} : undefined });
    expect(res.status).toBe(401);
    expect(res.contentType).toContain('application/problem+json');
    expect(res.json.code).toBe('unauthorized:auth');
  });

  it('refuses a wrong password', async () => {
    await expect(signInOverHttp(org.users.expert.email, 'not-the-password')).rejects.toThrow(/sign-in failed/);
  });

  it('records a technician reading (201), stores it with the converted slope, and a resend is stored once (200)', async () => {
    const body = reading();
    const first = await api(`/api/sessions/${sessionId}/readings`, { cookie: cookies.technician, method: 'POST', body });
    expect(first.status).toBe(201);
    expect(first.json).toMatchObject({ duplicate: false, event: { type: 'reading:recorded', payload: { axis: 'y', divisions: -1, slopeUrad: -20 } } });
    const again = await api(`/api/sessions/${sessionId}/readings`, { cookie: cookies.technician, method: 'POST', body });
    expect(again.status).toBe(200);
    expect(again.json).toMatchObject({ duplicate: true, seq: first.json.seq });
    const events = await api(`/api/sessions/${sessionId}/events?after=1`, { cookie: cookies.expert });
    expect((events.json.events as { id: string }[]).filter((e) => e.id === body.id)).toHaveLength(1);
  });

  it.each([
    ['divisions not a number', reading({ divisions: 'NaN' }), 'reading.divisions'],
    ['divisions out of range', reading({ divisions: 101 }), 'reading.divisions'],
    ['a missing axis', { id: randomUUID(), reading: { kind: 'level', positionMm: 0, divisions: 1 } }, 'reading.axis'],
    ['a position beyond any machine', reading({ positionMm: 1e6 }), 'reading.positionMm'],
    ['an id that is not a UUID', { ...reading(), id: 'r-1' }, 'id'],
    ['an unknown extra field', { ...reading(), note: 'x' }, undefined],
  ])('refuses %s with a 400 naming the field, storing nothing', async (_what, body, field) => {
    const before = (await listEventsBySession(db, { sessionId })).length;
    const res = await api(`/api/sessions/${sessionId}/readings`, { cookie: cookies.technician, method: 'POST', body });
    expect(res.status).toBe(400);
    expect(res.json.code).toBe('bad_request:reading');
    if (field) expect(res.json.field).toBe(field);
    expect(String(res.json.detail)).toMatch(field ? new RegExp(`^${field.replace('.', '\\.')}: `) : /note/);
    expect((await listEventsBySession(db, { sessionId })).length).toBe(before);
  });

  it('refuses a body that is not JSON with a 400', async () => {
    const res = await api(`/api/sessions/${sessionId}/readings`, { cookie: cookies.technician, method: 'POST', rawBody: '{"id":' });
    expect(res.status).toBe(400);
    expect(res.json.detail).toBe('The body must be JSON');
  });

  it('refuses readings from an expert and a reviewer with 403', async () => {
    for (const role of ['expert', 'reviewer']) {
      const res = await api(`/api/sessions/${sessionId}/readings`, { cookie: cookies[role], method: 'POST', body: reading() });
      expect(res.status).toBe(403);
    }
  });

  it('hides another organisation’s session behind a 404 on every route', async () => {
    for (const [method, path] of [
      ['GET', `/api/sessions/${sessionId}`],
      ['GET', `/api/sessions/${sessionId}/events`],
      ['POST', `/api/sessions/${sessionId}/readings`],
    ] as const) {
      const res = await api(path, { cookie: cookies.outsider, method, body: method === 'POST' ? reading() : undefined });
      expect(res.status, `${method} ${path}`).toBe(404);
    }
    const res = await api('/api/sessions', { cookie: cookies.outsider, method: 'POST', body: { machineId: org.machineId } });
    expect(res.status).toBe(404);
  });

  it('lets only a technician open a session', async () => {
    const res = await api('/api/sessions', { cookie: cookies.expert, method: 'POST', body: { machineId: org.machineId } });
    expect(res.status).toBe(403);
  });

  it('validates the events query', async () => {
    const res = await api(`/api/sessions/${sessionId}/events?after=-3`, { cookie: cookies.expert });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe('after');
  });

  it('lists the organisation’s machines and sessions only', async () => {
    const machines = await api('/api/machines', { cookie: cookies.outsider });
    expect((machines.json.rows as { id: string }[]).map((m) => m.id)).toEqual([other.machineId]);
    const sessions = await api('/api/sessions', { cookie: cookies.outsider });
    expect(sessions.json.sessions).toEqual([]);
  });
});
