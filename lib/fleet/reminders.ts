import type { Db } from '@/db/client';
import { claimDueReminders, releaseDueReminder, type DueReminder } from '@/db/queries/due';
import { claimVisitReminders, getVisit, listAdminEmails, releaseVisitReminder } from '@/db/queries/visits';
import { sendMail } from '@/lib/mail';
import { todayUtc } from '@/lib/dates';
import { visitNotice } from './visits';

/** Visits starting within this window get their reminder. */
export const VISIT_REMINDER_WINDOW_MS = 24 * 60 * 60 * 1000;

/** Words for a due date in a reminder: "2026-03-10". Kept as the ISO day so nobody misreads day and month. */
export function dueReminderText(r: Pick<DueReminder, 'model' | 'serial' | 'siteName' | 'customerName' | 'dueOn'>, today: string) {
  const past = r.dueOn < today;
  const subject = `${r.model} ${r.serial} at ${r.siteName} is due for leveling on ${r.dueOn}`;
  const text = [
    `${r.model} ${r.serial} at ${r.siteName} (${r.customerName}) is due for leveling on ${r.dueOn}${past ? ' — that date has passed' : ''}.`,
    '',
    'Schedule a visit from the due list in Levelwire.',
    '',
    'Levelwire',
  ].join('\n');
  return { subject, text };
}

/** Mails the technician and expert of a visit its notice; false (and a log line) when the mail could not go out. */
export async function notifyVisit(db: Db, { organisationId, visitId, kind }: { organisationId: string; visitId: string; kind: 'scheduled' | 'rescheduled' | 'reminder' }): Promise<boolean> {
  const v = await getVisit(db, { organisationId, id: visitId });
  if (!v) return false;
  const to = [v.technician.email, ...(v.expert ? [v.expert.email] : [])];
  const { subject, text } = visitNotice(
    {
      scheduledFor: v.visit.scheduledFor,
      notes: v.visit.notes,
      machine: v.machine,
      site: v.site,
      customerName: v.customerName,
      technicianName: v.technician.name,
      expertName: v.expert?.name ?? null,
    },
    kind,
  );
  try {
    await sendMail({ to, subject, text });
    return true;
  } catch (e) {
    console.error(`[levelwire] visit ${kind} mail for ${visitId} failed:`, (e as Error).message);
    return false;
  }
}

/**
 * The reminder job. (a) Each machine overdue or due within its organisation's reminder_days_before gets one mail to
 * the organisation's active admins per due date; (b) each scheduled visit starting within 24 h gets one reminder to
 * its technician and expert. Both claim their rows in the database before mailing, so running twice (or in two
 * processes) sends once; a failed mail gives its claim back for the next run. `organisationId` limits it to one organisation.
 */
export async function runReminders(db: Db, now: Date, { organisationId }: { organisationId?: string } = {}): Promise<{ dueReminders: number; visitReminders: number }> {
  const today = todayUtc(now);
  let dueReminders = 0;
  const claimed = await claimDueReminders(db, { today, organisationId });
  const adminsByOrg = new Map<string, string[]>();
  for (const r of claimed) {
    if (!adminsByOrg.has(r.organisationId)) adminsByOrg.set(r.organisationId, await listAdminEmails(db, { organisationId: r.organisationId }));
    const admins = adminsByOrg.get(r.organisationId)!;
    if (admins.length === 0) continue; // nobody to tell; the claim stays so it is not retried every run
    try {
      await sendMail({ to: admins, ...dueReminderText(r, today) });
      dueReminders++;
    } catch (e) {
      console.error(`[levelwire] due reminder for machine ${r.machineId} failed:`, (e as Error).message);
      await releaseDueReminder(db, r);
    }
  }

  let visitReminders = 0;
  for (const v of await claimVisitReminders(db, { now, withinMs: VISIT_REMINDER_WINDOW_MS, organisationId })) {
    if (await notifyVisit(db, { organisationId: v.organisationId, visitId: v.id, kind: 'reminder' })) visitReminders++;
    else await releaseVisitReminder(db, { id: v.id });
  }
  return { dueReminders, visitReminders };
}
