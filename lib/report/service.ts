/**
 * The report's three doors: a signed-in reader downloads it, a reviewer e-mails it to the customer with a signed
 * read-only link, and anyone holding a valid link reads it. Each checks who is asking (or the link) before the
 * database is read for more; none writes to the session's log or anywhere else.
 */
import type { Db } from '@/db/client';
import type { Actor } from '@/lib/auth/actor';
import { assertCan } from '@/lib/auth/policy';
import { AppError } from '@/lib/errors';
import type { UnitSystem } from '@/lib/leveling/units';
import { sendMail } from '@/lib/mail';
import { accessSession } from '@/lib/session/service';
import { loadReportFacts, reportRecipient, type ReportFacts } from './facts';
import { signReportLink, type ReportLinkClaims } from './link';
import { reportFileName, reportInputOf } from './model';
import { renderReportPdf } from './pdf';

export type RenderedReport = { pdf: Buffer; fileName: string; units: UnitSystem };

const stateWords: Record<string, string> = { planned: 'planned', live: 'live', ended: 'ended', in_review: 'in review', returned: 'returned', approved: 'approved' };

async function render(facts: ReportFacts, units: UnitSystem, now: Date): Promise<RenderedReport> {
  const input = reportInputOf(facts, units, now);
  return { pdf: await renderReportPdf(input), fileName: reportFileName(input), units };
}

/** The facts of a session the actor may read (404 another organisation's, 403 a non-participant). */
async function factsFor(db: Db, actor: Actor, sessionId: string): Promise<ReportFacts> {
  await accessSession(db, actor, sessionId);
  const facts = await loadReportFacts(db, { sessionId, organisationId: actor.organisationId });
  if (!facts) throw new AppError('not_found:session', 'No such session');
  return facts;
}

/**
 * The report of a session for anyone who may read it, in `units` (default: the actor's). A session still live (or
 * planned) has no report yet: 409 naming its state. Until approved the report says "not yet approved".
 */
export async function reportForReader(db: Db, actor: Actor, sessionId: string, { units, now = new Date() }: { units?: UnitSystem; now?: Date } = {}): Promise<RenderedReport> {
  const facts = await factsFor(db, actor, sessionId);
  if (facts.session.state === 'live' || facts.session.state === 'planned') {
    throw new AppError('conflict:report', `The session is ${stateWords[facts.session.state]}; its report is made once the technician has ended it`);
  }
  return render(facts, units ?? actor.unitSystem, now);
}

export type SentReport = { to: { name: string; email: string }; expiresAt: string; fileName: string; units: UnitSystem };

/**
 * E-mails an approved session's report to the customer's contact (the one marked to receive reports, else the first
 * with an e-mail), the PDF attached, with a signed read-only link valid `days` days. Reviewers and admins only.
 * Nothing is stored: the link's signature is its record.
 */
export async function sendReport(
  db: Db,
  actor: Actor,
  sessionId: string,
  { baseUrl, days, secret, now = new Date() }: { baseUrl: string; days: number; secret: string; now?: Date },
): Promise<SentReport> {
  assertCan(actor, 'session:review');
  const facts = await factsFor(db, actor, sessionId);
  if (facts.session.state !== 'approved') {
    throw new AppError('conflict:report', `The record is ${stateWords[facts.session.state] ?? facts.session.state}; only an approved record is sent to the customer`);
  }
  const contact = reportRecipient(facts.customer.contacts);
  if (!contact) {
    throw new AppError('conflict:contact', `No contact of ${facts.customer.name} has an e-mail address; add one (marked to receive reports) on the customer’s page`);
  }
  const report = await render(facts, actor.unitSystem, now);
  const expiresAt = new Date(now.getTime() + days * 86_400_000);
  const token = signReportLink({ sessionId, expiresAt, units: report.units }, secret);
  const link = `${baseUrl.replace(/\/$/, '')}/api/reports/${token}`;
  const machine = `${facts.machine.model}, serial ${facts.machine.serial}`;
  try {
    await sendMail({
      to: contact.email,
      subject: `Leveling service report: ${machine}`,
      text: [
        `Dear ${contact.name || 'customer'},`,
        '',
        `${facts.organisation.name} leveled your ${machine} at ${facts.site.name}. The service report is attached (${report.fileName}).`,
        '',
        `A read-only copy is also here: ${link}`,
        `The link works until ${expiresAt.toISOString().slice(0, 16).replace('T', ' ')} UTC.`,
        '',
        `Sent by ${actor.name} through Levelwire.`,
      ].join('\n'),
      attachments: [{ filename: report.fileName, content: report.pdf, contentType: 'application/pdf' }],
    });
  } catch (e) {
    console.error('[levelwire] report e-mail failed', e);
    throw new AppError('offline:mail', 'The report e-mail could not be sent. Try again later.');
  }
  return { to: { name: contact.name, email: contact.email }, expiresAt: expiresAt.toISOString(), fileName: report.fileName, units: report.units };
}

/** Who an approved report would go to (reviewers and admins): the contact, or null when none has an e-mail. */
export async function reportRecipientFor(db: Db, actor: Actor, sessionId: string): Promise<{ name: string; email: string } | null> {
  assertCan(actor, 'session:review');
  const facts = await factsFor(db, actor, sessionId);
  const contact = reportRecipient(facts.customer.contacts);
  return contact ? { name: contact.name, email: contact.email } : null;
}

/** The report a valid link names (checked by the caller with verifyReportLink), in the link's units. */
export async function reportForLink(db: Db, claims: ReportLinkClaims, now = new Date()): Promise<RenderedReport> {
  const facts = await loadReportFacts(db, { sessionId: claims.sessionId });
  // Links are only ever made for approved records; anything else is no report to show.
  if (!facts || facts.session.state !== 'approved') throw new AppError('not_found:report', 'No such report');
  return render(facts, claims.units, now);
}
