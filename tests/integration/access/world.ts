// The records the access matrix is walked against: two organisations, a person for every column of the table signed in
// over HTTP, and real records of the first organisation (a customer with its site and contacts, a machine, an
// instrument with its certificate, a visit, sessions live, ended and approved, a photo). State-changing rows take
// fresh records from `fresh` so that one call never changes what a later one finds.
import { randomBytes, randomUUID } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import bcrypt from 'bcryptjs';
import { eq } from 'drizzle-orm';
import sharp from 'sharp';
import { listEventsBySession } from '@/db/queries/events';
import { openSession } from '@/db/queries/sessions';
import { contacts, customers, instruments, invitations, machines, sites, users, visitInstruments, visits, type Role } from '@/db/schema';
import type { Actor } from '@/lib/auth/actor';
import { addDays, todayUtc } from '@/lib/dates';
import { hashInvitationToken } from '@/lib/fleet/invitations-service';
import { signReportLink } from '@/lib/report/link';
import { approveRecord, endSession, recordReading, returnRecord, sendMove } from '@/lib/session/service';
import { makeOrganisation, PASSWORD, testDb, type OrgFixture } from '../helpers/fixtures';
import { APP_URL, signInOverHttp } from '../helpers/http';
import { chainedLog, sessionFileOf } from '../helpers/session-file';

export type Person = { id: string; email: string; name: string; role: Role; organisationId: string };

/** The columns of the access matrix: who is asking. */
export const COLUMNS = ['technician', 'expert', 'observer', 'bystander', 'reviewer', 'admin', 'other', 'anonymous'] as const;
export type Column = (typeof COLUMNS)[number];

const db = testDb();
const actorOf = (u: Person): Actor => ({ id: u.id, name: u.name, role: u.role, organisationId: u.organisationId, unitSystem: 'metric' });

/** A drawn signature as the approval form sends it (whole pixels within the pad). */
export const SIGNATURE = { width: 300, height: 100, strokes: [[10, 60, 40, 20, 70, 80, 100, 30], [150, 50, 260, 60]] };
/** The smallest PDF the upload check recognises: "%PDF-" (ISO 32000-1 §7.5.2 file header). */
export const PDF_BYTES = new TextEncoder().encode('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');

async function addUser(o: OrgFixture, role: Role, label: string): Promise<Person> {
  const email = `${label}-${randomUUID().slice(0, 8)}@fixture.test`;
  const [u] = await db.insert(users).values({ organisationId: o.organisationId, role, email, name: `Access ${label}`, passwordHash: bcrypt.hashSync(PASSWORD, 4) }).returning();
  return { id: u!.id, email, name: u!.name, role, organisationId: o.organisationId };
}

/** The server's secret (signs report links): the test script passes it, else the development server's file. */
async function serverSecret(): Promise<string> {
  if (process.env.NEXTAUTH_SECRET) return process.env.NEXTAUTH_SECRET;
  return (await readFile('.data/nextauth-secret', 'utf8')).trim();
}

/** A multipart upload as a browser sends it. */
async function upload(path: string, method: 'POST' | 'PUT', cookie: string, fields: Record<string, string>, bytes: Uint8Array, type: string) {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  form.set('file', new Blob([new Uint8Array(bytes)], { type }), type === 'application/pdf' ? 'certificate.pdf' : 'photo.png');
  const res = await fetch(`${APP_URL}${path}`, { method, headers: { cookie }, body: form });
  if (res.status >= 300) throw new Error(`${method} ${path} answered ${res.status}: ${await res.text()}`);
}

export async function buildWorld() {
  const org = await makeOrganisation(db, 'Access');
  const other = await makeOrganisation(db, 'Elsewhere');
  const observer = await addUser(org, 'technician', 'observer');
  const bystander = await addUser(org, 'technician', 'bystander');
  const u = org.users;

  const [machine] = await db.select().from(machines).where(eq(machines.id, org.machineId));
  const [site] = await db.select().from(sites).where(eq(sites.id, machine!.siteId));
  const [customer] = await db.select().from(customers).where(eq(customers.id, site!.customerId));
  const [contact] = await db
    .insert(contacts)
    .values({ organisationId: org.organisationId, customerId: customer!.id, name: 'Access lead', email: `lead-${randomUUID().slice(0, 8)}@customer.test`, receivesReports: true })
    .returning();
  const today = todayUtc();
  const [instrument] = await db
    .insert(instruments)
    .values({ organisationId: org.organisationId, kind: 'level', model: 'Access precision level', serial: `LV-${randomUUID().slice(0, 8)}`, sensitivityValue: 0.02, sensitivityUnit: 'mm/m', calibrationDue: addDays(today, 200) })
    .returning();
  const inAWeek = () => new Date(Date.now() + 7 * 86_400_000);
  const newVisit = async () => {
    const [visit] = await db
      .insert(visits)
      .values({ organisationId: org.organisationId, machineId: org.machineId, technicianId: u.technician.id, expertId: u.expert.id, scheduledFor: inAWeek(), createdById: u.admin.id })
      .returning();
    return visit!.id;
  };
  const visitId = await newVisit();

  const signIn = async <K extends string>(people: Record<K, Person>) =>
    Object.fromEntries(await Promise.all(Object.entries<Person>(people).map(async ([k, p]) => [k, await signInOverHttp(p.email)] as const))) as Record<K, string>;
  const [cookies, otherCookies] = await Promise.all([signIn({ ...u, observer, bystander }), signIn(other.users)]);

  const liveSession = async () => {
    const { session } = await openSession(db, { organisationId: org.organisationId, machineId: org.machineId, technician: u.technician, levelDivisionUrad: 20, experts: [u.expert.id], observers: [observer.id] });
    return session.id;
  };
  const endedSession = async () => {
    const id = await liveSession();
    await recordReading(db, actorOf(u.technician), { id: randomUUID(), sessionId: id, reading: { kind: 'level', stage: 'rough-level', axis: 'x', positionMm: 0, divisions: 1.5 } });
    await endSession(db, actorOf(u.technician), { id: randomUUID(), sessionId: id });
    return id;
  };
  const returnedSession = async () => {
    const id = await endedSession();
    await returnRecord(db, actorOf(u.reviewer), { id: randomUUID(), sessionId: id, reasons: ['Retake the as-left along Y.'] });
    return id;
  };
  const screwsOf = async (sessionId: string) => {
    const [opened] = await listEventsBySession(db, { sessionId, limit: 1 });
    return (opened!.payload as { screws: { id: string }[] }).screws.map((s) => s.id);
  };

  const liveSessionId = await liveSession();
  const endedSessionId = await endedSession();
  const approvedSessionId = await endedSession();
  await approveRecord(db, actorOf(u.reviewer), { id: randomUUID(), sessionId: approvedSessionId, name: u.reviewer.name, signature: SIGNATURE });
  const reportToken = signReportLink({ sessionId: approvedSessionId, expiresAt: new Date(Date.now() + 86_400_000), units: 'metric' }, await serverSecret());

  // Through the server: it owns the object store the photo and the certificate go to.
  const photoId = randomUUID();
  const png = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 40, g: 120, b: 90 } } }).png().toBuffer();
  await Promise.all([
    upload(`/api/sessions/${liveSessionId}/photos`, 'POST', cookies.technician, { id: photoId, stage: 'height-check', caption: 'Pad under FL' }, png, 'image/png'),
    upload(`/api/instruments/${instrument!.id}/certificate`, 'PUT', cookies.admin, {}, PDF_BYTES, 'application/pdf'),
  ]);

  const ids = {
    organisationId: org.organisationId,
    machineId: org.machineId,
    siteId: site!.id,
    customerId: customer!.id,
    contactId: contact!.id,
    instrumentId: instrument!.id,
    visitId,
    liveSessionId,
    endedSessionId,
    approvedSessionId,
    photoId,
  };

  /** Fresh records for rows whose allowed call changes or uses up what it touches. */
  const fresh = {
    email: (label: string) => `${label}-${randomUUID().slice(0, 8)}@fixture.test`,
    serial: (prefix: string) => `${prefix}-${randomUUID().slice(0, 8)}`,
    contact: async () => {
      const [row] = await db.insert(contacts).values({ organisationId: org.organisationId, customerId: customer!.id, name: 'Access spare contact' }).returning();
      return row!.id;
    },
    /** A technician of the first organisation no other row uses (role changes land on them). */
    user: async () => (await addUser(org, 'technician', 'spare')).id,
    invitationToken: async () => {
      const token = randomBytes(32).toString('base64url');
      await db.insert(invitations).values({ organisationId: org.organisationId, email: fresh.email('invited'), role: 'technician', tokenHash: hashInvitationToken(token), invitedById: u.admin.id, expiresAt: new Date(Date.now() + 86_400_000) });
      return token;
    },
    visit: newVisit,
    /** A visit with the instrument already chosen. */
    visitWithInstrument: async () => {
      const id = await newVisit();
      await db.insert(visitInstruments).values({ visitId: id, instrumentId: instrument!.id });
      return id;
    },
    liveSession,
    returnedSession,
    /** A move the session's expert has sent and nobody has answered yet. */
    pendingMove: async (sessionId: string) => {
      const [screwId] = await screwsOf(sessionId);
      const id = randomUUID();
      await sendMove(db, actorOf(u.expert), { id, sessionId, stage: 'rough-level', screwId: screwId!, turns: 0.25, recommended: false });
      return id;
    },
    screwsOf,
    /** A session's export file as another Levelwire wrote it, for the first organisation's machine and technician. */
    sessionFile: () => sessionFile(org.machineId, u.technician.id),
  };

  /**
   * Everything of the first organisation the other one must never see: record ids, its people and the machine's
   * serial (the CSV export names machines by serial, not id).
   */
  const markers = [...Object.values(ids), ...Object.values(u).map((p) => p.id), observer.id, bystander.id, machine!.serial, contact!.email];

  return { png, org, other, people: { ...u, observer, bystander }, cookies, otherCookies, ids, reportToken, fresh, markers, customerName: customer!.name, siteName: site!.name };
}

export type World = Awaited<ReturnType<typeof buildWorld>>;

/** The export format of GET /api/sessions/:id/export: opened, the technician, ended; each event chained as the append does. */
function sessionFile(machineId: string, technicianId: string) {
  const { events, add } = chainedLog({ machineId, technicianId });
  add('session:ended', {});
  return sessionFileOf(events, machineId);
}
