import { readdir, readFile } from 'node:fs/promises';
import path from 'node:path';
import { eq, inArray, sql } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { dueReminders, machines, sites, visits } from '@/db/schema';
import { nextDueOn } from '@/lib/fleet/due';
import { addDays, addMonths, todayUtc } from '@/lib/dates';
import { makeOrganisation, testDb, type OrgFixture } from './helpers/fixtures';
import { api, signInOverHttp } from './helpers/http';

const db = testDb();
let org: OrgFixture;
const cookies: Record<string, string> = {};
const today = todayUtc(new Date());
const ids: Record<string, string> = {};

type Mail = { to: string[]; subject: string; text: string };
/** Messages the loopback SMTP fake caught for one address (the running server's MAILBOX_DIR). */
async function mailTo(address: string): Promise<Mail[]> {
  const dir = process.env.MAILBOX_DIR;
  if (!dir) throw new Error('MAILBOX_DIR is not set');
  const out: Mail[] = [];
  for (const n of (await readdir(dir).catch(() => [] as string[])).filter((f) => f.endsWith('.json'))) {
    const m = JSON.parse(await readFile(path.join(dir, n), 'utf8')) as Mail;
    if (m.to.some((t) => t.toLowerCase() === address.toLowerCase())) out.push(m);
  }
  return out;
}

const hours = (h: number) => new Date(Date.now() + h * 3_600_000);

beforeAll(async () => {
  org = await makeOrganisation(db, 'Reminders');
  for (const role of ['technician', 'admin'] as const) cookies[role] = await signInOverHttp(org.users[role].email);
  const [site] = await db.select({ id: sites.id }).from(sites).where(eq(sites.organisationId, org.organisationId));
  const machine = (serial: string, priorLeveledOn: string, months: number) => ({
    organisationId: org.organisationId,
    siteId: site!.id,
    model: 'Reminder mill',
    serial: `${serial}-${org.organisationId.slice(0, 6)}`,
    tableLengthMm: 800,
    tableWidthMm: 400,
    travelXMm: 600,
    travelYMm: 400,
    travelZMm: 400,
    checkIntervalMonths: months,
    priorLeveledOn,
  });
  // Due in 10 days (within the default 14-day warning) and due in 60 days (not yet).
  const [soon, later] = await db.insert(machines).values([machine('SOON', addMonths(addDays(today, 10), -6), 6), machine('LATER', addMonths(addDays(today, 60), -6), 6)]).returning();
  ids.soon = soon!.id;
  ids.later = later!.id;
  const visit = (scheduledFor: Date, state: 'scheduled' | 'cancelled' = 'scheduled') => ({
    organisationId: org.organisationId,
    machineId: org.machineId,
    technicianId: org.users.technician.id,
    expertId: org.users.expert.id,
    scheduledFor,
    state,
    createdById: org.users.admin.id,
  });
  const rows = await db.insert(visits).values([visit(hours(3)), visit(hours(72)), visit(hours(5), 'cancelled')]).returning();
  ids.tomorrow = rows[0]!.id;
  ids.inThreeDays = rows[1]!.id;
  ids.cancelled = rows[2]!.id;
});

describe('POST /api/reminders/run', () => {
  it('answers 401 without a session and 403 for a technician, sending nothing', async () => {
    expect((await api('/api/reminders/run', { method: 'POST' })).status).toBe(401);
    const tech = await api('/api/reminders/run', { cookie: cookies.technician, method: 'POST' });
    expect(tech.status).toBe(403);
    expect(tech.json.code).toBe('forbidden:visit');
    const rows = await db.select().from(dueReminders).where(inArray(dueReminders.machineId, [org.machineId, ids.soon!, ids.later!]));
    expect(rows).toHaveLength(0);
  });

  it('sends each reminder once, even when two runs race, and a third run sends nothing', async () => {
    const [a, b] = await Promise.all([
      api('/api/reminders/run', { cookie: cookies.admin, method: 'POST' }),
      api('/api/reminders/run', { cookie: cookies.admin, method: 'POST' }),
    ]);
    expect(a.status).toBe(200);
    expect(b.status).toBe(200);
    // the never-leveled fixture machine and the one due in 10 days; the visit 3 h away (not the one in 3 days, not the cancelled one)
    expect(Number(a.json.dueReminders) + Number(b.json.dueReminders)).toBe(2);
    expect(Number(a.json.visitReminders) + Number(b.json.visitReminders)).toBe(1);
    const third = await api('/api/reminders/run', { cookie: cookies.admin, method: 'POST' });
    expect(third.json).toEqual({ dueReminders: 0, visitReminders: 0 });

    const stored = await db.select().from(dueReminders).where(inArray(dueReminders.machineId, [org.machineId, ids.soon!, ids.later!]));
    expect(stored.map((r) => r.machineId).sort()).toEqual([org.machineId, ids.soon!].sort());
    expect(stored.find((r) => r.machineId === ids.soon)!.dueOn).toBe(nextDueOn(addMonths(addDays(today, 10), -6), 6));
    const [remindedVisit] = await db.select().from(visits).where(eq(visits.id, ids.tomorrow!));
    expect(remindedVisit!.reminderSentAt).not.toBeNull();
    const others = await db.select({ sent: visits.reminderSentAt }).from(visits).where(inArray(visits.id, [ids.inThreeDays!, ids.cancelled!]));
    expect(others.every((v) => v.sent === null)).toBe(true);
  });

  it('mailed the admins one message per due machine and the technician and expert one visit reminder', async () => {
    await new Promise((r) => setTimeout(r, 300));
    const adminMail = await mailTo(org.users.admin.email);
    const soonSerial = `SOON-${org.organisationId.slice(0, 6)}`;
    const dueOn = nextDueOn(addMonths(addDays(today, 10), -6), 6);
    expect(adminMail.filter((m) => m.subject === `Reminder mill ${soonSerial} at Reminders site is due for leveling on ${dueOn}`)).toHaveLength(1);
    expect(adminMail.filter((m) => m.subject.startsWith('Reminders VMC'))).toHaveLength(1);
    expect(adminMail).toHaveLength(2);
    const techMail = (await mailTo(org.users.technician.email)).filter((m) => m.subject.startsWith('Reminder: leveling visit'));
    expect(techMail).toHaveLength(1);
    expect(techMail[0]!.to.map((t) => t.toLowerCase())).toContain(org.users.expert.email.toLowerCase());
    expect(techMail[0]!.text).toContain('within the next 24 hours');
  });

  it('reminds again for a new due date, and for a rescheduled visit', async () => {
    // A leveling on record today moves the fixture machine's due date 9 months on: nothing due, nothing sent.
    await db.update(machines).set({ priorLeveledOn: today }).where(eq(machines.id, org.machineId));
    // Pulling the 3-day visit into the next 24 h makes it due for its reminder.
    await db.update(visits).set({ scheduledFor: hours(20) }).where(eq(visits.id, ids.inThreeDays!));
    const res = await api('/api/reminders/run', { cookie: cookies.admin, method: 'POST' });
    expect(res.json).toEqual({ dueReminders: 0, visitReminders: 1 });
    // Due date moved into the warning window by a shorter interval: a reminder for that new date.
    await db.update(machines).set({ priorLeveledOn: addMonths(addDays(today, 3), -1), checkIntervalMonths: 1 }).where(eq(machines.id, org.machineId));
    const again = await api('/api/reminders/run', { cookie: cookies.admin, method: 'POST' });
    expect(again.json).toEqual({ dueReminders: 1, visitReminders: 0 });
    const count = await db.execute<{ n: number }>(sql`select count(*)::int as n from due_reminders where machine_id = ${org.machineId}`);
    expect(count.rows[0]!.n).toBe(2);
  });
});
