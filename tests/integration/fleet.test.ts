import { randomUUID } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { machines, screws, sites } from '@/db/schema';
import { footprintTemplate } from '@/lib/fleet/footprint';
import { CSV_COLUMNS } from '@/lib/fleet/machines-csv';
import { MACHINE_SIZE, makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { APP_URL, api, signInOverHttp } from './helpers/http';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
let siteId: string;
const cookie = {} as Record<'technician' | 'expert' | 'reviewer' | 'admin' | 'rivalAdmin', string>;

beforeAll(async () => {
  org = await makeOrganisation(db, 'Fleet');
  other = await makeOrganisation(db, 'Rival');
  const [machine] = await db.select().from(machines).where(eq(machines.id, org.machineId));
  siteId = machine!.siteId;
  for (const role of ['technician', 'expert', 'reviewer', 'admin'] as const) cookie[role] = await signInOverHttp(org.users[role].email);
  cookie.rivalAdmin = await signInOverHttp(other.users.admin.email);
});

const newMachine = (patch: Record<string, unknown> = {}) => ({
  siteId,
  model: 'Fixture VMC',
  serial: `FX-${randomUUID().slice(0, 8)}`,
  ...MACHINE_SIZE,
  checkIntervalMonths: 9,
  screws: footprintTemplate(6, 2000, 1500),
  ...patch,
});

async function csvImport(cookieHeader: string, text: string) {
  const res = await fetch(`${APP_URL}/api/machines/import`, { method: 'POST', headers: { cookie: cookieHeader, 'content-type': 'text/csv' }, body: text });
  return { status: res.status, json: (await res.json()) as Record<string, unknown> };
}

describe('machines', () => {
  it('lets an admin add a machine with its footprint, and everyone in the organisation read it', async () => {
    const body = newMachine();
    const res = await api('/api/machines', { cookie: cookie.admin, method: 'POST', body });
    expect(res.status).toBe(201);
    const id = (res.json.machine as { id: string }).id;
    for (const role of ['technician', 'expert', 'reviewer'] as const) {
      const read = await api(`/api/machines/${id}`, { cookie: cookie[role] });
      expect(read.status).toBe(200);
      expect((read.json.machine as { screws: unknown[] }).screws).toHaveLength(6);
    }
  });

  it.each(['technician', 'expert', 'reviewer'] as const)('refuses a %s adding or changing a machine (403)', async (role) => {
    expect((await api('/api/machines', { cookie: cookie[role], method: 'POST', body: newMachine() })).status).toBe(403);
    expect((await api(`/api/machines/${org.machineId}`, { cookie: cookie[role], method: 'PATCH', body: { model: 'x' } })).status).toBe(403);
  });

  it('answers 401 without a session on every machine route', async () => {
    for (const [method, path] of [
      ['GET', '/api/machines'],
      ['POST', '/api/machines'],
      ['GET', `/api/machines/${org.machineId}`],
      ['PATCH', `/api/machines/${org.machineId}`],
      ['GET', '/api/machines/export'],
      ['POST', '/api/machines/import'],
    ] as const) {
      expect((await api(path, { method, body: method === 'GET' ? undefined : {} })).status, `${method} ${path}`).toBe(401);
    }
  });

  it('hides another organisation’s machine (404) and its site (400 naming siteId)', async () => {
    expect((await api(`/api/machines/${org.machineId}`, { cookie: cookie.rivalAdmin })).status).toBe(404);
    expect((await api(`/api/machines/${org.machineId}`, { cookie: cookie.rivalAdmin, method: 'PATCH', body: { model: 'taken' } })).status).toBe(404);
    const res = await api('/api/machines', { cookie: cookie.rivalAdmin, method: 'POST', body: newMachine() });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe('siteId');
  });

  it.each([
    ['collinear screws', { screws: [0, 500, 1000, 1500].map((x, i) => ({ ...footprintTemplate(4, 2000, 1500)[i]!, xMm: x, yMm: 0 })) }, 'screws', /one line/],
    ['two screws on one spot', { screws: footprintTemplate(4, 2000, 1500).map((s, i) => (i === 1 ? { ...s, xMm: -1000 } : s)) }, 'screws.1.xMm', /50 mm apart/],
    ['a zero pitch', { screws: footprintTemplate(4, 2000, 1500).map((s) => ({ ...s, thread: { unit: 'mm', value: 0 } })) }, 'screws.0.thread.value', /greater than zero/],
    ['a table length that is not a number', { tableLengthMm: 'long' }, 'tableLengthMm', /must be a number/],
    ['a check interval of 0 months', { checkIntervalMonths: 0 }, 'checkIntervalMonths', /at least 1 month/],
  ])('refuses %s with a 400 naming the field, storing nothing', async (_what, patch, field, message) => {
    const body = newMachine(patch);
    const res = await api('/api/machines', { cookie: cookie.admin, method: 'POST', body });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe(field);
    expect(String(res.json.detail)).toMatch(message);
    expect(await db.select().from(machines).where(eq(machines.serial, body.serial))).toEqual([]);
  });

  it('refuses a second machine with the same serial (409)', async () => {
    const body = newMachine();
    expect((await api('/api/machines', { cookie: cookie.admin, method: 'POST', body })).status).toBe(201);
    const again = await api('/api/machines', { cookie: cookie.admin, method: 'POST', body });
    expect(again.status).toBe(409);
    expect(again.json.field).toBe('serial');
  });

  it('replaces a footprint keeping the ids of screws whose labels stay', async () => {
    const before = await db.select().from(screws).where(eq(screws.machineId, org.machineId));
    const fl = before.find((s) => s.label === 'FL')!;
    const next = footprintTemplate(6, 2000, 1500, { unit: 'tpi', value: 8 });
    const res = await api(`/api/machines/${org.machineId}`, { cookie: cookie.admin, method: 'PATCH', body: { screws: next } });
    expect(res.status).toBe(200);
    const after = await db.select().from(screws).where(eq(screws.machineId, org.machineId));
    expect(after.map((s) => s.label).sort()).toEqual(['FL', 'FR', 'ML', 'MR', 'RL', 'RR']);
    const flAfter = after.find((s) => s.label === 'FL')!;
    expect(flAfter.id).toBe(fl.id);
    expect(flAfter.pitchMm).toBeCloseTo(3.175, 12); // 8 tpi: 25.4 / 8 mm (NIST inch; ASME B1.1 1-8 UNC)
    expect(flAfter.threadTpi).toBe(8);
  });

  it('lists one page at a time, sorted and filtered in the database', async () => {
    const tag = randomUUID().slice(0, 6);
    for (const n of ['c', 'a', 'b']) expect((await api('/api/machines', { cookie: cookie.admin, method: 'POST', body: newMachine({ model: `Sorted ${tag} ${n}` }) })).status).toBe(201);
    const page1 = await api(`/api/machines?q=Sorted%20${tag}&sort=model&dir=desc&pageSize=2`, { cookie: cookie.expert });
    expect(page1.status).toBe(200);
    expect(page1.json).toMatchObject({ total: 3, page: 1, pageSize: 2 });
    expect((page1.json.rows as { model: string }[]).map((r) => r.model)).toEqual([`Sorted ${tag} c`, `Sorted ${tag} b`]);
    const page2 = await api(`/api/machines?q=Sorted%20${tag}&sort=model&dir=desc&pageSize=2&page=2`, { cookie: cookie.expert });
    expect((page2.json.rows as { model: string }[]).map((r) => r.model)).toEqual([`Sorted ${tag} a`]);
    const rival = await api(`/api/machines?q=Sorted%20${tag}`, { cookie: cookie.rivalAdmin });
    expect(rival.json.total).toBe(0);
  });

  it.each([
    ['sort=price', 'sort'],
    ['dir=up', 'dir'],
    ['page=0', 'page'],
    ['pageSize=5000', 'pageSize'],
  ])('refuses the list query %s with a 400 naming %s', async (qs, field) => {
    const res = await api(`/api/machines?${qs}`, { cookie: cookie.admin });
    expect(res.status).toBe(400);
    expect(res.json.field).toBe(field);
  });
});

describe('machine CSV over HTTP', () => {
  it('exports the organisation’s machines one row per screw, as an attachment', async () => {
    const res = await fetch(`${APP_URL}/api/machines/export`, { headers: { cookie: cookie.reviewer } });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="levelwire-machines-/);
    const lines = (await res.text()).trim().split('\r\n');
    expect(lines[0]).toBe(CSV_COLUMNS.join(','));
    expect(lines.length).toBeGreaterThan(1);
    expect(lines.every((l, i) => i === 0 || !l.includes('Rival'))).toBe(true);
  });

  it('imports a whole file, or refuses it whole naming each bad row; nothing is half-imported', async () => {
    const [site] = await db.select().from(sites).where(eq(sites.id, siteId));
    const serialA = `IMP-${randomUUID().slice(0, 6)}`;
    const serialB = `IMP-${randomUUID().slice(0, 6)}`;
    const row = (serial: string, label: string, kind: string, x: number, y: number) =>
      [serial, 'Imported VMC', 'Fleet customer', site!.name, 1000, 500, 800, 500, 500, 9, '', label, kind, x, y, 'mm', 3, '', 80].join(',');
    const good = [row(serialA, 'FL', 'corner', -900, -700), row(serialA, 'FR', 'corner', 900, -700), row(serialA, 'RL', 'corner', -900, 700), row(serialA, 'RR', 'corner', 900, 700)];
    const bad = [row(serialB, 'FL', 'corner', -900, -700), row(serialB, 'FR', 'corner', 900, -700), row(serialB, 'RL', 'sideways', -900, 700)];
    const refused = await csvImport(cookie.admin, [CSV_COLUMNS.join(','), ...good, ...bad].join('\n'));
    expect(refused.status).toBe(400);
    expect(refused.json.problems).toEqual([{ line: 8, field: 'screw_kind', message: 'must be corner, middle or outrigger' }]);
    expect(await db.select().from(machines).where(eq(machines.serial, serialA))).toEqual([]);

    const accepted = await csvImport(cookie.admin, [CSV_COLUMNS.join(','), ...good].join('\n'));
    expect(accepted).toEqual({ status: 200, json: { created: 1, updated: 0 } });
    const again = await csvImport(cookie.admin, [CSV_COLUMNS.join(','), ...good].join('\n'));
    expect(again.json).toEqual({ created: 0, updated: 1 });
    expect((await csvImport(cookie.expert, [CSV_COLUMNS.join(','), ...good].join('\n'))).status).toBe(403);
  });
});

describe('customers, sites and contacts', () => {
  it('lets an admin add a customer, a site and a contact, and others read them', async () => {
    const c = await api('/api/customers', { cookie: cookie.admin, method: 'POST', body: { name: 'New demo customer' } });
    expect(c.status).toBe(201);
    const customerId = (c.json.customer as { id: string }).id;
    const s = await api('/api/sites', { cookie: cookie.admin, method: 'POST', body: { customerId, name: 'Hall A', floorNotes: '250 mm slab, isolation pads' } });
    expect(s.status).toBe(201);
    const k = await api(`/api/customers/${customerId}/contacts`, { cookie: cookie.admin, method: 'POST', body: { name: 'Lead', email: 'lead@example.test', receivesReports: true } });
    expect(k.status).toBe(201);
    const read = await api(`/api/customers/${customerId}`, { cookie: cookie.technician });
    expect(read.json.customer).toMatchObject({ name: 'New demo customer', contacts: [{ name: 'Lead', receivesReports: true }], sites: [{ name: 'Hall A', machineCount: 0 }] });
  });

  it('refuses bad input naming the field, other roles (403) and other organisations (404)', async () => {
    const empty = await api('/api/customers', { cookie: cookie.admin, method: 'POST', body: { name: '' } });
    expect([empty.status, empty.json.field]).toEqual([400, 'name']);
    const badMail = await api(`/api/customers/${randomUUID()}/contacts`, { cookie: cookie.admin, method: 'POST', body: { name: 'x', email: 'not-mail' } });
    expect([badMail.status, badMail.json.field]).toEqual([400, 'email']);
    expect((await api('/api/customers', { cookie: cookie.technician, method: 'POST', body: { name: 'x' } })).status).toBe(403);
    expect((await api(`/api/sites/${siteId}`, { cookie: cookie.rivalAdmin })).status).toBe(404);
    const foreign = await api('/api/sites', { cookie: cookie.rivalAdmin, method: 'POST', body: { customerId: randomUUID(), name: 'x' } });
    expect([foreign.status, foreign.json.field]).toEqual([400, 'customerId']);
    expect((await api(`/api/contacts/${randomUUID()}`, { cookie: cookie.admin, method: 'DELETE' })).status).toBe(404);
  });
});

describe('unit preference', () => {
  it('stores each user’s own choice and refuses anything but inch or metric', async () => {
    const me = await api('/api/me', { cookie: cookie.reviewer, method: 'PATCH', body: { unitSystem: 'metric' } });
    expect(me.json.me).toMatchObject({ id: org.users.reviewer.id, unitSystem: 'metric' });
    expect((await api('/api/me', { cookie: cookie.reviewer })).json.me).toMatchObject({ unitSystem: 'metric' });
    const bad = await api('/api/me', { cookie: cookie.reviewer, method: 'PATCH', body: { unitSystem: 'cubits' } });
    expect([bad.status, bad.json.field]).toEqual([400, 'unitSystem']);
    expect((await api('/api/me', { method: 'PATCH', body: { unitSystem: 'inch' } })).status).toBe(401);
  });
});
