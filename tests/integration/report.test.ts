// The service report over HTTP against the real server and database: a session made through the routes (opened,
// readings, ended, approved), its PDF read back with pdf-parse, who may read it, the e-mail to the customer's
// contact with the signed read-only link, and the link itself (signed out, expired, tampered).
import { randomUUID } from 'node:crypto';
import { readdir, readFile } from 'node:fs/promises';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import { eq } from 'drizzle-orm';
import { simpleParser, type ParsedMail } from 'mailparser';
import { PDFParse } from 'pdf-parse';
import { SMTPServer } from 'smtp-server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listEventsBySession } from '@/db/queries/events';
import { contacts, customers, instruments, machines, sites, users, visitInstruments, visits, type Role } from '@/db/schema';
import type { Actor } from '@/lib/auth/actor';
import { env } from '@/lib/env';
import { formatLength, formatSlope, type UnitSystem } from '@/lib/leveling/units';
import { signReportLink } from '@/lib/report/link';
import { sendReport } from '@/lib/report/service';
import { foldEvents } from '@/lib/session/fold';
import { verifyChain } from '@/lib/session/hash-chain';
import { endSession } from '@/lib/session/service';
import { summarizeSession } from '@/lib/session/summary';
import { makeOrganisation, PASSWORD, testDb, type OrgFixture } from './helpers/fixtures';
import { api, APP_URL, signInOverHttp } from './helpers/http';

const db = testDb();
type Person = { id: string; email: string; name: string; role: Role; organisationId: string };
const actorOf = (u: Person, unitSystem: UnitSystem = 'inch'): Actor => ({ id: u.id, name: u.name, role: u.role, organisationId: u.organisationId, unitSystem });

let org: OrgFixture;
let other: OrgFixture;
let outsider: Person;
let serial: string;
let contactEmail: string;
let approvedId: string;
let liveId: string;
let endedId: string;
let otherApprovedId: string;
const cookies: Record<string, string> = {};

/** The server's secret: the test script passes it (npm test), or the development server's .data/nextauth-secret. */
async function serverSecret(): Promise<string> {
  if (process.env.NEXTAUTH_SECRET) return process.env.NEXTAUTH_SECRET;
  return (await readFile('.data/nextauth-secret', 'utf8')).trim();
}

async function addUser(o: OrgFixture, role: Role, label: string): Promise<Person> {
  const email = `${label}-${randomUUID().slice(0, 8)}@fixture.test`;
  const [u] = await db.insert(users).values({ organisationId: o.organisationId, role, email, name: `Report ${label}`, passwordHash: bcrypt.hashSync(PASSWORD, 4) }).returning();
  return { id: u!.id, email, name: u!.name, role, organisationId: o.organisationId };
}

async function customerIdOf(o: OrgFixture): Promise<string> {
  const [row] = await db.select({ id: customers.id }).from(machines).innerJoin(sites, eq(sites.id, machines.siteId)).innerJoin(customers, eq(customers.id, sites.customerId)).where(eq(machines.id, o.machineId));
  return row!.id;
}

const post = (p: string, cookie: string | undefined, body: unknown) => api(p, { method: 'POST', ...(cookie ? { cookie } : {}), body });

/** Opens a session through the route as the organisation's technician, with its expert, for a visit when given. */
async function openOverHttp(o: OrgFixture, cookie: string, visitId?: string): Promise<string> {
  const res = await post('/api/sessions', cookie, { machineId: o.machineId, experts: [o.users.expert.id], ...(visitId ? { visitId } : {}) });
  expect(res.status).toBe(201);
  return (res.json.session as { id: string }).id;
}

/** Readings through the route: a rough-level round (as found), then a full lock-and-as-left round. */
async function takeReadings(sessionId: string, cookie: string, asLeftSweepUm: { frontUm: number; backUm: number; leftUm: number; rightUm: number }) {
  const reading = async (r: object) => expect((await post(`/api/sessions/${sessionId}/readings`, cookie, { id: randomUUID(), reading: r })).status).toBe(201);
  await reading({ kind: 'level', stage: 'rough-level', axis: 'x', positionMm: 0, divisions: 3 });
  await reading({ kind: 'level', stage: 'rough-level', axis: 'y', positionMm: 0, divisions: -2 });
  // The fixture's travel is 500 mm: across at −250, 0, +250; along at five stations.
  for (const [p, d] of [[-250, 0.5], [0, 0.25], [250, -0.25]] as const) await reading({ kind: 'level', stage: 'lock-as-left', axis: 'x', positionMm: p, divisions: d });
  for (const [p, d] of [[-250, 0.5], [-125, 0.5], [0, -0.25], [125, 0], [250, 0.25]] as const) await reading({ kind: 'level', stage: 'lock-as-left', axis: 'y', positionMm: p, divisions: d });
  await reading({ kind: 'sweep', stage: 'lock-as-left', ...asLeftSweepUm });
}

const signature = { width: 300, height: 100, strokes: [[10, 60, 40, 20, 70, 80, 100, 30], [150, 50, 260, 60]] };

async function endAndApprove(o: OrgFixture, sessionId: string, reviewerCookie: string) {
  await endSession(db, actorOf(o.users.technician), { id: randomUUID(), sessionId });
  const res = await post(`/api/sessions/${sessionId}/review`, reviewerCookie, { kind: 'approve', id: randomUUID(), name: o.users.reviewer.name, signature });
  expect(res.status).toBe(201);
}

async function pdfText(bytes: ArrayBuffer | Buffer): Promise<string> {
  const parser = new PDFParse({ data: new Uint8Array(bytes) });
  try {
    // pdf.js reads µ (U+00B5) back as Greek mu (U+03BC); fold it back before comparing.
    return (await parser.getText()).text.replace(/\u03bc/g, 'µ');
  } finally {
    await parser.destroy();
  }
}

async function getPdf(p: string, cookie?: string) {
  const res = await fetch(`${APP_URL}${p}`, { headers: cookie ? { cookie } : {} });
  return { res, bytes: await res.arrayBuffer() };
}

/** The as-left figures the summary gives for a session, as text in `units` (magnitudes; signs aside). */
async function asLeftFigures(sessionId: string, units: UnitSystem): Promise<string[]> {
  const summary = summarizeSession(foldEvents(await listEventsBySession(db, { sessionId })));
  return summary.measures.map((m) => {
    if (m.asLeft.value === null) throw new Error(`${m.measure} has no as-left value`);
    return m.unit === 'urad' ? formatSlope(Math.abs(m.asLeft.value), units) : formatLength(Math.abs(m.asLeft.value), units);
  });
}

/** Messages the running server's mail fake caught for one address, waiting briefly for delivery. */
async function mailTo(address: string, ms = 8_000): Promise<{ subject: string; text: string }[]> {
  const dir = process.env.MAILBOX_DIR;
  if (!dir) throw new Error('MAILBOX_DIR is not set');
  const until = Date.now() + ms;
  for (;;) {
    const found: { subject: string; text: string }[] = [];
    for (const name of (await readdir(dir).catch(() => [] as string[])).filter((n) => n.endsWith('.json'))) {
      const mail = JSON.parse(await readFile(path.join(dir, name), 'utf8')) as { subject: string; text: string; to: string[] };
      if (mail.to.some((t) => t.toLowerCase() === address.toLowerCase())) found.push(mail);
    }
    if (found.length > 0 || Date.now() > until) return found;
    await new Promise((r) => setTimeout(r, 100));
  }
}

const linkIn = (text: string) => /(https?:\/\/\S+\/api\/reports\/([A-Za-z0-9_-]+\.[A-Za-z0-9_-]+))/.exec(text);

beforeAll(async () => {
  org = await makeOrganisation(db, 'Report');
  other = await makeOrganisation(db, 'Elsewhere');
  outsider = await addUser(org, 'technician', 'outsider');
  [{ serial }] = await db.select({ serial: machines.serial }).from(machines).where(eq(machines.id, org.machineId)) as [{ serial: string }];

  // The customer's contacts: one without an e-mail, one marked to receive reports (the other organisation has none).
  contactEmail = `lead-${randomUUID().slice(0, 8)}@customer.test`;
  const customerId = await customerIdOf(org);
  await db.insert(contacts).values([
    { organisationId: org.organisationId, customerId, name: 'Aaron Nomail', email: '' },
    { organisationId: org.organisationId, customerId, name: 'Casey Lead', email: contactEmail, receivesReports: true },
  ]);
  // A visit with one level, so the report has instruments with calibration dates.
  const [level] = await db
    .insert(instruments)
    .values({ organisationId: org.organisationId, kind: 'level', model: 'Fixture precision level', serial: `LV-${randomUUID().slice(0, 6)}`, sensitivityValue: 0.02, sensitivityUnit: 'mm/m', calibratedOn: '2025-09-01', calibrationDue: '2099-09-01' })
    .returning();
  const [visit] = await db.insert(visits).values({ organisationId: org.organisationId, machineId: org.machineId, technicianId: org.users.technician.id, expertId: org.users.expert.id, scheduledFor: new Date(), createdById: org.users.admin.id }).returning();
  await db.insert(visitInstruments).values({ visitId: visit!.id, instrumentId: level!.id });

  const people = { tech: org.users.technician, expert: org.users.expert, reviewer: org.users.reviewer, admin: org.users.admin, outsider, otherAdmin: other.users.admin, otherTech: other.users.technician, otherReviewer: other.users.reviewer };
  for (const [k, u] of Object.entries(people)) cookies[k] = await signInOverHttp(u.email);

  approvedId = await openOverHttp(org, cookies.tech!, visit!.id);
  await takeReadings(approvedId, cookies.tech!, { frontUm: 2, backUm: 9, leftUm: 0, rightUm: 5 });
  await endAndApprove(org, approvedId, cookies.reviewer!);

  liveId = await openOverHttp(org, cookies.tech!);
  endedId = await openOverHttp(org, cookies.tech!);
  await endSession(db, actorOf(org.users.technician), { id: randomUUID(), sessionId: endedId });

  otherApprovedId = await openOverHttp(other, cookies.otherTech!);
  await takeReadings(otherApprovedId, cookies.otherTech!, { frontUm: 0, backUm: 1, leftUm: 0, rightUm: 1 });
  await endAndApprove(other, otherApprovedId, cookies.otherReviewer!);
}, 120_000);

describe('GET /api/sessions/:id/report', () => {
  it.each(['inch', 'metric'] as const)('serves the approved session’s PDF; its text holds the as-left figures in %s units, the serial and the chain head', async (units) => {
    const { res, bytes } = await getPdf(`/api/sessions/${approvedId}/report?units=${units}`, cookies.reviewer);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/pdf');
    expect(res.headers.get('content-disposition')).toMatch(new RegExp(`^inline; filename="levelwire-report-${serial}-\\d{4}-\\d{2}-\\d{2}\\.pdf"$`));
    expect(res.headers.get('cache-control')).toBe('private, no-store');
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
    const text = await pdfText(bytes);
    for (const figure of await asLeftFigures(approvedId, units)) expect(text).toContain(figure);
    const chain = verifyChain(await listEventsBySession(db, { sessionId: approvedId }));
    if (!chain.ok) throw new Error('the stored chain does not verify');
    expect(text).toContain(chain.head);
    expect(text).toContain(`${chain.count} in the session’s log, hash chain verified`);
    expect(text).toContain(`serial ${serial}`);
    expect(text).toContain(org.users.reviewer.name);
    expect(text).toContain('Fixture precision level');
    expect(text).toContain(units === 'inch' ? 'Figures in inch: slopes in in/10 in' : 'Figures in metric: slopes in mm/m');
  });

  it('uses the reader’s own units without ?units= (the reviewer’s preference is inch by default)', async () => {
    const text = await pdfText((await getPdf(`/api/sessions/${approvedId}/report`, cookies.reviewer)).bytes);
    expect(text).toContain('inch: slopes in in/10 in');
  });

  it('is readable by every participant (the expert) and says “not yet approved” for an ended record', async () => {
    expect((await getPdf(`/api/sessions/${approvedId}/report`, cookies.expert)).res.status).toBe(200);
    const { res, bytes } = await getPdf(`/api/sessions/${endedId}/report`, cookies.tech);
    expect(res.status).toBe(200);
    expect(await pdfText(bytes)).toContain('Not yet approved');
  });

  it('401 signed out, 404 for another organisation, 403 for a technician who takes no part, 409 naming a live session, 400 naming units', async () => {
    const path = `/api/sessions/${approvedId}/report`;
    expect(await api(path)).toMatchObject({ status: 401, contentType: 'application/problem+json' });
    expect((await api(path, { cookie: cookies.otherAdmin })).json).toMatchObject({ status: 404, code: 'not_found:session' });
    expect((await api(path, { cookie: cookies.outsider })).json).toMatchObject({ status: 403, code: 'forbidden:session' });
    expect((await api(`/api/sessions/${liveId}/report`, { cookie: cookies.reviewer })).json).toMatchObject({ status: 409, code: 'conflict:report', detail: expect.stringContaining('is live') });
    expect((await api(`${path}?units=furlong`, { cookie: cookies.reviewer })).json).toMatchObject({ status: 400, field: 'units' });
    expect((await api('/api/sessions/not-a-uuid/report', { cookie: cookies.reviewer })).json).toMatchObject({ status: 400, field: 'id' });
  });
});

describe('POST /api/sessions/:id/report/send and the signed link', () => {
  let link: RegExpExecArray;

  it('401 signed out, 403 for the technician, 404 for another organisation, 409 before approval, 400 naming days', async () => {
    const path = `/api/sessions/${approvedId}/report/send`;
    expect((await post(path, undefined, {})).status).toBe(401);
    expect((await post(path, cookies.tech, {})).json).toMatchObject({ status: 403, code: 'forbidden:session' });
    expect((await post(path, cookies.otherAdmin, {})).json).toMatchObject({ status: 404 });
    expect((await post(`/api/sessions/${endedId}/report/send`, cookies.reviewer, {})).json).toMatchObject({ status: 409, code: 'conflict:report', detail: expect.stringContaining('ended') });
    expect((await post(path, cookies.reviewer, { days: 0 })).json).toMatchObject({ status: 400, field: 'days' });
    expect((await post(path, cookies.reviewer, { days: 7, cc: 'x' })).json).toMatchObject({ status: 400 });
  });

  it('GET names who would receive it (reviewers and admins): the contact marked to receive reports, or null', async () => {
    const path = `/api/sessions/${approvedId}/report/send`;
    expect((await api(path)).status).toBe(401);
    expect((await api(path, { cookie: cookies.tech })).json).toMatchObject({ status: 403 });
    expect((await api(path, { cookie: cookies.otherAdmin })).json).toMatchObject({ status: 404 });
    expect((await api(path, { cookie: cookies.admin })).json).toEqual({ recipient: { name: 'Casey Lead', email: contactEmail }, linkDays: 14 });
    expect((await api(`/api/sessions/${otherApprovedId}/report/send`, { cookie: cookies.otherReviewer })).json).toMatchObject({ recipient: null });
  });

  it('409 naming the customer when no contact has an e-mail', async () => {
    const res = await post(`/api/sessions/${otherApprovedId}/report/send`, cookies.otherReviewer, {});
    expect(res.json).toMatchObject({ status: 409, code: 'conflict:contact', detail: expect.stringContaining('Elsewhere customer') });
  });

  it('mails the contact marked to receive reports, with the link; answers the address and an expiry 14 days on', async () => {
    const before = Date.now();
    const res = await post(`/api/sessions/${approvedId}/report/send`, cookies.reviewer, {});
    expect(res.status).toBe(200);
    const sent = res.json.sent as { to: { name: string; email: string }; expiresAt: string };
    expect(sent.to).toEqual({ name: 'Casey Lead', email: contactEmail });
    const expires = Date.parse(sent.expiresAt);
    expect(expires).toBeGreaterThanOrEqual(before + 14 * 86_400_000 - 1000);
    expect(expires).toBeLessThanOrEqual(Date.now() + 14 * 86_400_000 + 1000);
    expect(JSON.stringify(res.json)).not.toContain('/api/reports/');

    const [mail] = await mailTo(contactEmail);
    expect(mail, 'a mail in the fake mailbox').toBeDefined();
    expect(mail!.subject).toContain(serial);
    expect(mail!.text).toContain('The service report is attached');
    link = linkIn(mail!.text)!;
    expect(link, 'a report link in the mail').not.toBeNull();
  });

  it('serves the PDF by the link to someone signed out, read-only and not cached', async () => {
    const res = await fetch(link[1]!.replace(/^https?:\/\/[^/]+/, APP_URL));
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/pdf');
    expect(res.headers.get('cache-control')).toBe('private, no-store');
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
    const text = await pdfText(await res.arrayBuffer());
    expect(text).toContain(`serial ${serial}`);
    for (const figure of await asLeftFigures(approvedId, 'inch')) expect(text).toContain(figure);
  });

  it('refuses the link with any one character changed (403), never serving another session', async () => {
    const token = link[2]!;
    for (const i of [0, 5, token.indexOf('.') + 3, token.length - 1]) {
      const changed = token.slice(0, i) + (token[i] === 'A' ? 'B' : 'A') + token.slice(i + 1);
      const res = await api(`/api/reports/${changed}`);
      expect(res.status, `changed at ${i}`).toBe(403);
      expect(res.json).toMatchObject({ code: 'forbidden:report_link' });
    }
  });

  it('410 for a genuine link past its expiry, saying when it expired; 404 for a genuine link to a record that is not approved', async () => {
    const secret = await serverSecret();
    const expired = signReportLink({ sessionId: approvedId, expiresAt: new Date(Date.now() - 60_000), units: 'metric' }, secret);
    const res = await api(`/api/reports/${expired}`);
    expect(res).toMatchObject({ status: 410, contentType: 'application/problem+json' });
    expect(res.json.detail).toMatch(/expired on \d{4}-\d\d-\d\d \d\d:\d\d UTC/);
    const notApproved = signReportLink({ sessionId: endedId, expiresAt: new Date(Date.now() + 60_000), units: 'metric' }, secret);
    expect((await api(`/api/reports/${notApproved}`)).status).toBe(404);
  });
});

describe('the report e-mail as it leaves (sendReport in this process, to a loopback SMTP server of its own)', () => {
  let smtp: SMTPServer;
  const received: ParsedMail[] = [];

  beforeAll(async () => {
    smtp = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS'],
      logger: false,
      onData(stream, _session, callback) {
        simpleParser(stream).then((m) => {
          received.push(m);
          callback();
        }, callback);
      },
    });
    await new Promise<void>((resolve) => smtp.listen(0, '127.0.0.1', resolve));
    // lib/env reads the environment once, at its first use: nothing in this process has used it yet.
    process.env.SMTP_URL = `smtp://127.0.0.1:${(smtp.server.address() as AddressInfo).port}`;
  });
  afterAll(() => new Promise<void>((resolve) => smtp.close(() => resolve())));

  it('attaches the PDF (application/pdf, named by serial and date) whose text holds the as-left figures, and carries the link', async () => {
    expect(env().SMTP_URL).toBe(process.env.SMTP_URL);
    const sent = await sendReport(db, actorOf(org.users.reviewer, 'metric'), approvedId, { baseUrl: 'http://levelwire.test', days: 3, secret: 'in-process-secret-0123456789' });
    expect(sent.to.email).toBe(contactEmail);
    const mail = received.at(-1)!;
    expect(mail.to && !Array.isArray(mail.to) ? mail.to.value.map((a) => a.address) : []).toEqual([contactEmail]);
    expect(mail.attachments).toHaveLength(1);
    const [pdf] = mail.attachments;
    expect(pdf!.contentType).toBe('application/pdf');
    expect(pdf!.filename).toBe(sent.fileName);
    expect(pdf!.filename).toMatch(new RegExp(`^levelwire-report-${serial}-\\d{4}-\\d{2}-\\d{2}\\.pdf$`));
    const text = await pdfText(pdf!.content);
    for (const figure of await asLeftFigures(approvedId, 'metric')) expect(text).toContain(figure);
    expect(mail.text).toMatch(/http:\/\/levelwire\.test\/api\/reports\/[A-Za-z0-9_-]+\.[A-Za-z0-9_-]{43}/);
  });
});
