// Every PATCH route changes only the keys its body names (issue 7): a record is stored with every column set to
// something other than its default, one field is PATCHed, and the row read back from the database differs in that
// field alone. Zod applies defaults even under `.partial()`, so a PATCH of one contact field used to clear the
// contact's e-mail, phone and report flag.
import { randomUUID } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { asc, eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { contacts, customers, instruments, machines, screws, sites, users, visits } from '@/db/schema';
import { makeOrganisation, PASSWORD, testDb, type OrgFixture } from './helpers/fixtures';
import { api, signInOverHttp } from './helpers/http';

const db = testDb();
let org: OrgFixture;
let admin: string;
let technician: string;

const days = (n: number) => new Date(Date.now() + n * 86_400_000);
const isoDay = (n: number) => days(n).toISOString().slice(0, 10);

beforeAll(async () => {
  org = await makeOrganisation(db, 'Patch');
  admin = await signInOverHttp(org.users.admin.email);
  technician = await signInOverHttp(org.users.technician.email);
});

/**
 * PATCHes `body` and reads the record back: 200, the fields `changed` names hold their new values, and every other
 * column is as it was before.
 */
async function expectOnly<T extends Record<string, unknown>>(path: string, body: Record<string, unknown>, read: () => Promise<T>, changed: Partial<T>, cookie = admin) {
  const before = await read();
  for (const [key, value] of Object.entries(changed)) expect(before[key], `${key} must start out different`).not.toEqual(value);
  const res = await api(path, { method: 'PATCH', cookie, body });
  expect(res, JSON.stringify(res.json)).toMatchObject({ status: 200 });
  expect(await read()).toEqual({ ...before, ...changed });
}

async function expect400(path: string, body: unknown, read: () => Promise<unknown>) {
  const before = await read();
  const res = await api(path, { method: 'PATCH', cookie: admin, body });
  expect(res.status).toBe(400);
  expect(res.contentType).toContain('application/problem+json');
  expect(await read()).toEqual(before);
}

describe('PATCH /api/customers/:id', () => {
  let id: string;
  const read = async () => (await db.select().from(customers).where(eq(customers.id, id)))[0]!;
  beforeAll(async () => {
    const [row] = await db.insert(customers).values({ organisationId: org.organisationId, name: 'Patch press shop', notes: 'Two shifts' }).returning();
    id = row!.id;
  });

  it('a new name keeps the notes', async () => {
    await expectOnly(`/api/customers/${id}`, { name: 'Patch stamping works' }, read, { name: 'Patch stamping works' });
  });
  it('new notes keep the name', async () => {
    await expectOnly(`/api/customers/${id}`, { notes: 'Ask for the foreman' }, read, { notes: 'Ask for the foreman' });
  });
  it('a body naming nothing, or a key it does not know, is a 400 and changes nothing', async () => {
    await expect400(`/api/customers/${id}`, {}, read);
    await expect400(`/api/customers/${id}`, { organisationId: randomUUID() }, read);
  });
});

describe('PATCH /api/contacts/:id', () => {
  let id: string;
  const read = async () => (await db.select().from(contacts).where(eq(contacts.id, id)))[0]!;
  beforeAll(async () => {
    const [customer] = await db.insert(customers).values({ organisationId: org.organisationId, name: 'Patch contact customer' }).returning();
    const [row] = await db
      .insert(contacts)
      .values({ organisationId: org.organisationId, customerId: customer!.id, name: 'Lead', email: 'lead@patch.test', phone: '+1 555 0100', position: 'Maintenance lead', receivesReports: true })
      .returning();
    id = row!.id;
  });

  it('a new position keeps the e-mail, phone and report flag', async () => {
    await expectOnly(`/api/contacts/${id}`, { position: 'Plant engineer' }, read, { position: 'Plant engineer' });
  });
  it('each other field alone changes only itself', async () => {
    await expectOnly(`/api/contacts/${id}`, { name: 'Second lead' }, read, { name: 'Second lead' });
    await expectOnly(`/api/contacts/${id}`, { email: 'second@patch.test' }, read, { email: 'second@patch.test' });
    await expectOnly(`/api/contacts/${id}`, { phone: '+1 555 0199' }, read, { phone: '+1 555 0199' });
    await expectOnly(`/api/contacts/${id}`, { receivesReports: false }, read, { receivesReports: false });
  });
  it('an empty body is a 400 and changes nothing', async () => {
    await expect400(`/api/contacts/${id}`, {}, read);
  });
});

describe('PATCH /api/sites/:id', () => {
  let id: string;
  const read = async () => (await db.select().from(sites).where(eq(sites.id, id)))[0]!;
  beforeAll(async () => {
    const [customer] = await db.insert(customers).values({ organisationId: org.organisationId, name: 'Patch site customer' }).returning();
    const [row] = await db
      .insert(sites)
      .values({ organisationId: org.organisationId, customerId: customer!.id, name: 'Hall A', address: '1 Works Road', floorNotes: 'Isolated slab', accessNotes: 'Gate 3' })
      .returning();
    id = row!.id;
  });

  it('each field alone changes only itself', async () => {
    await expectOnly(`/api/sites/${id}`, { accessNotes: 'Gate 4, sign in at the lodge' }, read, { accessNotes: 'Gate 4, sign in at the lodge' });
    await expectOnly(`/api/sites/${id}`, { name: 'Hall B' }, read, { name: 'Hall B' });
    await expectOnly(`/api/sites/${id}`, { address: '2 Works Road' }, read, { address: '2 Works Road' });
    await expectOnly(`/api/sites/${id}`, { floorNotes: 'Grouted pads' }, read, { floorNotes: 'Grouted pads' });
  });
  it('the customer cannot be changed, and an empty body is a 400', async () => {
    await expect400(`/api/sites/${id}`, { customerId: randomUUID() }, read);
    await expect400(`/api/sites/${id}`, {}, read);
  });
});

describe('PATCH /api/machines/:id', () => {
  let id: string;
  const read = async () => {
    const [machine] = await db.select().from(machines).where(eq(machines.id, id));
    const footprint = await db.select().from(screws).where(eq(screws.machineId, id)).orderBy(asc(screws.label));
    return { ...machine!, footprint };
  };
  beforeAll(async () => {
    const [machine] = await db.select().from(machines).where(eq(machines.id, org.machineId));
    const [row] = await db
      .insert(machines)
      .values({
        organisationId: org.organisationId,
        siteId: machine!.siteId,
        model: 'Patch HMC',
        serial: `P-${randomUUID().slice(0, 8)}`,
        tableLengthMm: 1200,
        tableWidthMm: 600,
        travelXMm: 1000,
        travelYMm: 600,
        travelZMm: 550,
        checkIntervalMonths: 6,
        priorLeveledOn: '2025-03-04',
        twistTolUrad: 25,
        bowTolUrad: 30,
        sweepTolUm: 10,
      })
      .returning();
    id = row!.id;
    await db.insert(screws).values(
      [
        ['FL', -500, -300],
        ['FR', 500, -300],
        ['RL', -500, 300],
        ['RR', 500, 300],
      ].map(([label, xMm, yMm]) => ({ machineId: id, label: label as string, kind: 'corner' as const, xMm: xMm as number, yMm: yMm as number, pitchMm: 3, specHeightMm: 40 })),
    );
  });

  it('each field alone changes only itself; the footprint stays', async () => {
    await expectOnly(`/api/machines/${id}`, { checkIntervalMonths: 12 }, read, { checkIntervalMonths: 12 });
    await expectOnly(`/api/machines/${id}`, { twistTolUrad: 18 }, read, { twistTolUrad: 18 });
    await expectOnly(`/api/machines/${id}`, { model: 'Patch HMC 2' }, read, { model: 'Patch HMC 2' });
    await expectOnly(`/api/machines/${id}`, { priorLeveledOn: null }, read, { priorLeveledOn: null });
  });
});

describe('PATCH /api/instruments/:id', () => {
  let id: string;
  const read = async () => (await db.select().from(instruments).where(eq(instruments.id, id)))[0]!;
  beforeAll(async () => {
    const [row] = await db
      .insert(instruments)
      .values({
        organisationId: org.organisationId,
        kind: 'level',
        model: 'Patch precision level',
        serial: `PL-${randomUUID().slice(0, 8)}`,
        sensitivityValue: 0.02,
        sensitivityUnit: 'mm/m',
        vialCount: 1,
        calibratedOn: isoDay(-30),
        calibrationDue: isoDay(300),
        certificateKey: 'instruments/patch/certificate.pdf',
        certificateName: 'certificate.pdf',
        certificateType: 'application/pdf',
        certificateBytes: 1234,
      })
      .returning();
    id = row!.id;
  });

  it('each field alone changes only itself; the certificate stays', async () => {
    await expectOnly(`/api/instruments/${id}`, { vialCount: 2 }, read, { vialCount: 2 });
    await expectOnly(`/api/instruments/${id}`, { model: 'Patch master level' }, read, { model: 'Patch master level' });
    await expectOnly(`/api/instruments/${id}`, { calibrationDue: isoDay(320) }, read, { calibrationDue: isoDay(320) });
    await expectOnly(`/api/instruments/${id}`, { active: false }, read, { active: false });
  });
});

describe('PATCH /api/visits/:id', () => {
  let id: string;
  const scheduledFor = days(20);
  const read = async () => (await db.select().from(visits).where(eq(visits.id, id)))[0]!;
  beforeAll(async () => {
    const [row] = await db
      .insert(visits)
      .values({
        organisationId: org.organisationId,
        machineId: org.machineId,
        technicianId: org.users.technician.id,
        expertId: org.users.expert.id,
        scheduledFor,
        notes: 'Bring the long straightedge',
        createdById: org.users.admin.id,
        reminderSentAt: days(-1),
      })
      .returning();
    id = row!.id;
  });

  it('new notes keep the time, the state and the reminder', async () => {
    await expectOnly(`/api/visits/${id}`, { notes: 'Bring two levels' }, read, { notes: 'Bring two levels' });
  });
  it('the same time again changes nothing', async () => {
    await expectOnly(`/api/visits/${id}`, { scheduledFor: scheduledFor.toISOString() }, read, {});
  });
  it('a new state keeps the notes and the time', async () => {
    await expectOnly(`/api/visits/${id}`, { state: 'in_progress' }, read, { state: 'in_progress' });
  });
});

describe('PATCH /api/users/:id', () => {
  let id: string;
  const read = async () => (await db.select().from(users).where(eq(users.id, id)))[0]!;
  beforeAll(async () => {
    const [row] = await db
      .insert(users)
      .values({ organisationId: org.organisationId, role: 'technician', email: `patch-${randomUUID().slice(0, 8)}@fixture.test`, name: 'Patch colleague', passwordHash: bcrypt.hashSync(PASSWORD, 4), unitSystem: 'metric' })
      .returning();
    id = row!.id;
  });

  it('a new role keeps the user active; deactivating keeps the role', async () => {
    await expectOnly(`/api/users/${id}`, { role: 'expert' }, read, { role: 'expert' });
    await expectOnly(`/api/users/${id}`, { active: false }, read, { active: false });
  });
});

describe('PATCH /api/me', () => {
  const read = async () => (await db.select().from(users).where(eq(users.id, org.users.technician.id)))[0]!;

  it('the unit system changes and nothing else about the user', async () => {
    const { unitSystem } = await read();
    const next = unitSystem === 'metric' ? 'inch' : 'metric';
    await expectOnly('/api/me', { unitSystem: next }, read, { unitSystem: next }, technician);
  });
});
