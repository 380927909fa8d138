import { sql } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { levelingSessions, machines, sites } from '@/db/schema';
import { dueStatus, nextDueOn } from '@/lib/fleet/due';
import { addDays, addMonths, todayUtc } from '@/lib/dates';
import { MONTH_CASES } from '../unit/fleet/due-cases';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { api, signInOverHttp } from './helpers/http';

const db = testDb();
let org: OrgFixture;
let other: OrgFixture;
let cookie: string;
const today = todayUtc(new Date());
type Row = { machineId: string; serial: string; model: string; lastLeveledOn: string | null; nextDueOn: string | null; status: string };
const made: Record<string, { id: string; serial: string; lastOn: string | null; months: number }> = {};

async function addMachine(siteId: string, key: string, model: string, priorLeveledOn: string | null, months: number) {
  const serial = `DUE-${key}-${org.organisationId.slice(0, 6)}`;
  const [m] = await db
    .insert(machines)
    .values({ organisationId: org.organisationId, siteId, model, serial, tableLengthMm: 800, tableWidthMm: 400, travelXMm: 600, travelYMm: 400, travelZMm: 400, checkIntervalMonths: months, priorLeveledOn })
    .returning();
  made[key] = { id: m!.id, serial, lastOn: priorLeveledOn, months };
  return m!;
}

beforeAll(async () => {
  org = await makeOrganisation(db, 'Due');
  other = await makeOrganisation(db, 'DueElsewhere');
  cookie = await signInOverHttp(org.users.technician.email);
  const [site] = await db.select({ id: sites.id }).from(sites).where(sql`${sites.organisationId} = ${org.organisationId}`);
  // overdue: leveled 9 months and 10 days ago with a 9-month interval
  await addMachine(site!.id, 'A', 'Due Alpha mill', addMonths(addDays(today, -10), -9), 9);
  // due soon: falls due in 5 days with a 6-month interval
  await addMachine(site!.id, 'B', 'Due Bravo lathe', addMonths(addDays(today, 5), -6), 6);
  // fine: falls due in about 100 days
  await addMachine(site!.id, 'C', 'Due Charlie drill', addMonths(addDays(today, 100), -12), 12);
  // old paper record (overdue by it) superseded by an approved session 20 days ago: fine
  const d = await addMachine(site!.id, 'D', 'Due Delta bridge', addMonths(today, -24), 9);
  const approvedOn = addDays(today, -20);
  await db.insert(levelingSessions).values({
    organisationId: org.organisationId,
    machineId: d.id,
    technicianId: org.users.technician.id,
    state: 'approved',
    approvedAt: new Date(`${approvedOn}T12:00:00Z`),
    levelDivisionUrad: 20,
  });
  made.D!.lastOn = approvedOn;
  made.fixture = { id: org.machineId, serial: '', lastOn: null, months: 9 };
});

describe('month arithmetic: lib/fleet/due.ts against PostgreSQL itself', () => {
  it.each(MONTH_CASES)('%s + %i months: PostgreSQL and nextDueOn both give %s', async (last, months, expected) => {
    const res = await db.execute<{ a: string; b: string }>(
      sql`select to_char((${last}::date + make_interval(months => ${months}::int))::date, 'YYYY-MM-DD') as a,
                 to_char((${last}::date + (${months}::int * interval '1 month'))::date, 'YYYY-MM-DD') as b`,
    );
    expect(res.rows[0]).toEqual({ a: expected, b: expected });
    expect(nextDueOn(last, months)).toBe(expected);
  });
});

describe('GET /api/due', () => {
  it('answers 401 without a session', async () => {
    const res = await api('/api/due');
    expect(res.status).toBe(401);
    expect(res.json.code).toBe('unauthorized:auth');
  });

  it('lists the organisation’s machines, never leveled first, then by next due date, with the same dates as lib/fleet/due.ts', async () => {
    const res = await api('/api/due?pageSize=50', { cookie });
    expect(res.status).toBe(200);
    const rows = res.json.rows as Row[];
    expect(res.json.total).toBe(5);
    expect(res.json.soonDays).toBe(14); // the organisation's reminder_days_before default
    expect(rows.map((r) => r.machineId)).toEqual([made.fixture!.id, made.A!.id, made.B!.id, made.C!.id, made.D!.id]);
    for (const r of rows) {
      const m = Object.values(made).find((x) => x.id === r.machineId)!;
      expect(r.lastLeveledOn).toBe(m.lastOn);
      const expected = m.lastOn ? nextDueOn(m.lastOn, m.months) : null;
      expect(r.nextDueOn).toBe(expected);
      expect(r.status).toBe(dueStatus(expected, today, 14));
    }
    expect(rows.map((r) => r.status)).toEqual(['overdue', 'overdue', 'due-soon', 'ok', 'ok']);
    expect(rows.some((r) => r.machineId === other.machineId)).toBe(false);
  });

  it('filters by status and pages on the server', async () => {
    const overdue = await api('/api/due?status=overdue', { cookie });
    expect((overdue.json.rows as Row[]).map((r) => r.machineId)).toEqual([org.machineId, made.A!.id]);
    const soon = await api('/api/due?status=due-soon', { cookie });
    expect((soon.json.rows as Row[]).map((r) => r.machineId)).toEqual([made.B!.id]);
    const page2 = await api('/api/due?pageSize=2&page=2', { cookie });
    expect(page2.json).toMatchObject({ total: 5, page: 2, pageSize: 2 });
    expect((page2.json.rows as Row[]).map((r) => r.machineId)).toEqual([made.B!.id, made.C!.id]);
  });

  it('takes soonDays: with 3 days’ warning the machine due in 5 days is fine', async () => {
    const res = await api('/api/due?status=due-soon&soonDays=3', { cookie });
    expect(res.json.total).toBe(0);
    const wide = await api('/api/due?status=due-soon&soonDays=120', { cookie });
    expect((wide.json.rows as Row[]).map((r) => r.machineId)).toEqual([made.B!.id, made.C!.id]);
  });

  it('searches model, serial, customer and site, and sorts by model', async () => {
    const bySerial = await api(`/api/due?q=${encodeURIComponent(made.C!.serial)}`, { cookie });
    expect((bySerial.json.rows as Row[]).map((r) => r.machineId)).toEqual([made.C!.id]);
    const byModel = await api('/api/due?q=bravo', { cookie });
    expect((byModel.json.rows as Row[]).map((r) => r.machineId)).toEqual([made.B!.id]);
    const bySite = await api('/api/due?q=Due%20site', { cookie });
    expect(bySite.json.total).toBe(5);
    const sorted = await api('/api/due?sort=model&dir=desc', { cookie });
    const models = (sorted.json.rows as Row[]).map((r) => r.model);
    expect(models).toEqual([...models].sort().reverse());
  });

  it.each([
    ['status=soon', 'status'],
    ['sort=serial', 'sort'],
    ['soonDays=-1', 'soonDays'],
    ['soonDays=many', 'soonDays'],
    ['page=0', 'page'],
  ])('refuses %s with a 400 naming %s', async (query, field) => {
    const res = await api(`/api/due?${query}`, { cookie });
    expect(res.status).toBe(400);
    expect(res.json).toMatchObject({ code: 'bad_request:due', field });
  });
});
