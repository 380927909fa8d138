// The bad-input fuzzing's own organisation: one of everything a route or command can point at, the people who may
// use each, and a fingerprint of every row the organisation owns (so a refused request is seen to change nothing).
import { randomUUID } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { eq, sql } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { openSession } from '@/db/queries/sessions';
import { contacts, customers, instruments, sites, users, visits, type Role } from '@/db/schema';
import type { Actor } from '@/lib/auth/actor';
import { endSession, sendMove } from '@/lib/session/service';
import { makeOrganisation, PASSWORD, type OrgFixture } from '../helpers/fixtures';
import { api, signInOverHttp } from '../helpers/http';

export type World = Awaited<ReturnType<typeof makeWorld>>;

const actorOf = (u: OrgFixture['users'][Role]): Actor => ({ ...u, unitSystem: 'metric' });

export async function makeWorld(db: Db) {
  const org = await makeOrganisation(db, 'Bad input');
  const organisationId = org.organisationId;
  const [customer] = await db.select().from(customers).where(eq(customers.organisationId, organisationId));
  const [site] = await db.select().from(sites).where(eq(sites.organisationId, organisationId));
  const [contact] = await db.insert(contacts).values({ organisationId, customerId: customer!.id, name: 'Bad input contact', email: 'contact@fixture.test' }).returning();
  const [instrument] = await db
    .insert(instruments)
    .values({ organisationId, kind: 'level', model: 'Bad input level', serial: `BI-${randomUUID().slice(0, 8)}`, sensitivityValue: 0.02, sensitivityUnit: 'mm/m', vialCount: 1, calibrationDue: '2099-01-01' })
    .returning();
  const [visit] = await db
    .insert(visits)
    .values({ organisationId, machineId: org.machineId, technicianId: org.users.technician.id, scheduledFor: new Date(Date.now() + 7 * 86_400_000), createdById: org.users.admin.id })
    .returning();
  // A person an admin changes (never the admin themselves).
  const [colleague] = await db
    .insert(users)
    .values({ organisationId, role: 'technician', email: `colleague-${randomUUID().slice(0, 8)}@fixture.test`, name: 'Bad input colleague', passwordHash: bcrypt.hashSync(PASSWORD, 4) })
    .returning();

  const open = async () =>
    (await openSession(db, { organisationId, machineId: org.machineId, technician: org.users.technician, levelDivisionUrad: 20, experts: [org.users.expert.id] })).session.id;
  const liveSessionId = await open();
  const endedSessionId = await open();
  await endSession(db, actorOf(org.users.technician), { id: randomUUID(), sessionId: endedSessionId });
  const screws = await screwIdsOf(db, org.machineId);
  const move = await sendMove(db, actorOf(org.users.expert), { id: randomUUID(), sessionId: liveSessionId, stage: 'rough-level', screwId: screws[0]!, turns: 0.25, recommended: true });

  const cookies = {} as Record<Role, string>;
  for (const role of ['technician', 'expert', 'reviewer', 'admin'] as const) cookies[role] = await signInOverHttp(org.users[role].email);
  const exported = await api(`/api/sessions/${endedSessionId}/export`, { cookie: cookies.admin });
  if (exported.status !== 200) throw new Error(`export for the import's base failed (${exported.status})`);

  return {
    org,
    organisationId,
    machineId: org.machineId,
    machineSerial: (await db.execute<{ serial: string }>(sql`select serial from machines where id = ${org.machineId}`)).rows[0]!.serial,
    customer: customer!,
    site: site!,
    contactId: contact!.id,
    instrumentId: instrument!.id,
    visitId: visit!.id,
    colleagueId: colleague!.id,
    liveSessionId,
    endedSessionId,
    screwIds: screws,
    moveId: move.event.id,
    exportFile: exported.json as Record<string, unknown>,
    cookies,
  };
}

async function screwIdsOf(db: Db, machineId: string): Promise<string[]> {
  const rows = await db.execute<{ id: string }>(sql`select id from screws where machine_id = ${machineId} order by label`);
  return rows.rows.map((r) => r.id);
}

/** Tables whose rows belong to one organisation, with the condition that picks that organisation's rows ($1). */
const OWNED: Record<string, string> = {
  organisations: 'id = $1',
  users: 'organisation_id = $1',
  customers: 'organisation_id = $1',
  contacts: 'organisation_id = $1',
  sites: 'organisation_id = $1',
  machines: 'organisation_id = $1',
  screws: 'machine_id in (select id from machines where organisation_id = $1)',
  instruments: 'organisation_id = $1',
  visits: 'organisation_id = $1',
  visit_instruments: 'visit_id in (select id from visits where organisation_id = $1)',
  due_reminders: 'machine_id in (select id from machines where organisation_id = $1)',
  invitations: 'organisation_id = $1',
  leveling_sessions: 'organisation_id = $1',
  session_participants: 'session_id in (select id from leveling_sessions where organisation_id = $1)',
  session_events: 'session_id in (select id from leveling_sessions where organisation_id = $1)',
};

const FINGERPRINT_SQL = `select json_build_object(${Object.entries(OWNED)
  .map(([table, where]) => `'${table}', (select count(*) || ':' || md5(coalesce(string_agg(t::text, '|' order by t::text), '')) from ${table} t where ${where})`)
  .join(', ')}) as rows`;

/** Per table, the count and a digest of every row the organisation owns: equal fingerprints mean nothing was stored, changed or deleted. */
export async function fingerprint(db: Db, organisationId: string): Promise<Record<string, string>> {
  const res = await db.$client.query<{ rows: Record<string, string> }>(FINGERPRINT_SQL, [organisationId]);
  return res.rows[0]!.rows;
}
