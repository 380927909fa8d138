import { randomUUID } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { createDb, type Db } from '@/db/client';
import { customers, machines, organisations, screws, sites, users, type Role } from '@/db/schema';

export const PASSWORD = 'fixture-password-1';
const passwordHash = bcrypt.hashSync(PASSWORD, 4);

let shared: Db | undefined;
/** The test database the test script started (real PostgreSQL, never a mock). */
export function testDb(): Db {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is not set: run the integration tests through `npm test`');
  shared ??= createDb(url, 5);
  return shared;
}

/** A fixture machine's table and travels, in mm (the same for every integration test's machine). */
export const MACHINE_SIZE = { tableLengthMm: 1000, tableWidthMm: 500, travelXMm: 800, travelYMm: 500, travelZMm: 500 } as const;

export type OrgFixture = {
  organisationId: string;
  machineId: string;
  users: Record<Role, { id: string; email: string; name: string; role: Role; organisationId: string }>;
};

/** A fresh organisation with one user per role and one 4-screw machine; tests stay apart by organisation. */
export async function makeOrganisation(db: Db, label = 'Fixture'): Promise<OrgFixture> {
  const tag = randomUUID().slice(0, 8);
  const [org] = await db.insert(organisations).values({ name: `${label} org ${tag}` }).returning();
  const roles: Role[] = ['technician', 'expert', 'reviewer', 'admin'];
  const rows = await db
    .insert(users)
    .values(roles.map((role) => ({ organisationId: org!.id, role, email: `${role}-${tag}@fixture.test`, name: `${label} ${role}`, passwordHash })))
    .returning();
  const [customer] = await db.insert(customers).values({ organisationId: org!.id, name: `${label} customer` }).returning();
  const [site] = await db.insert(sites).values({ organisationId: org!.id, customerId: customer!.id, name: `${label} site` }).returning();
  const [machine] = await db
    .insert(machines)
    .values({ organisationId: org!.id, siteId: site!.id, model: `${label} VMC`, serial: tag, ...MACHINE_SIZE })
    .returning();
  await db.insert(screws).values(
    [
      ['FL', -900, -750],
      ['FR', 900, -750],
      ['RL', -900, 750],
      ['RR', 900, 750],
    ].map(([label, xMm, yMm]) => ({ machineId: machine!.id, label: label as string, kind: 'corner' as const, xMm: xMm as number, yMm: yMm as number, pitchMm: 3 })),
  );
  const byRole = Object.fromEntries(rows.map((u) => [u.role, { id: u.id, email: u.email, name: u.name, role: u.role, organisationId: u.organisationId }]));
  return { organisationId: org!.id, machineId: machine!.id, users: byRole as OrgFixture['users'] };
}
