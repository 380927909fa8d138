/**
 * What the report needs from the database besides the session's log: the organisation, the customer and its
 * contacts, the site, the machine, the visit and its instruments with their calibration dates. Read-only.
 * (These queries belong with db/queries when the report grows; they live here while only the report reads them.)
 */
import { and, asc, eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { listEventsBySession } from '@/db/queries/events';
import { listVisitInstruments } from '@/db/queries/visits';
import { contacts, customers, levelingSessions, machines, organisations, sites, users, visits } from '@/db/schema';
import type { SessionEvent } from '@/lib/session/events';
import type { InstrumentFact } from '@/lib/session/summary';

export type ReportContact = { name: string; email: string; position: string; receivesReports: boolean };

export type ReportFacts = {
  session: { id: string; organisationId: string; state: string; approvedAt: Date | null; createdAt: Date };
  organisation: { name: string };
  customer: { name: string; contacts: ReportContact[] };
  site: { name: string; address: string };
  machine: { model: string; serial: string };
  technician: { name: string };
  visit: { scheduledFor: Date } | null;
  instruments: InstrumentFact[];
  events: SessionEvent[];
};

/** An instrument chosen for the visit, as the summary judges it. */
export function instrumentFact(i: Awaited<ReturnType<typeof listVisitInstruments>>[number]): InstrumentFact {
  return { kind: i.kind, model: i.model, serial: i.serial, calibratedOn: i.calibratedOn, calibrationDue: i.calibrationDue, overrideReason: i.overrideReason };
}

/** The report's facts for one session, or null when there is no such session (in `organisationId`, when given). */
export async function loadReportFacts(db: Db, { sessionId, organisationId }: { sessionId: string; organisationId?: string }): Promise<ReportFacts | null> {
  const [row] = await db
    .select({
      session: {
        id: levelingSessions.id,
        organisationId: levelingSessions.organisationId,
        state: levelingSessions.state,
        approvedAt: levelingSessions.approvedAt,
        createdAt: levelingSessions.createdAt,
        visitId: levelingSessions.visitId,
      },
      organisation: { name: organisations.name },
      customer: { id: customers.id, name: customers.name },
      site: { name: sites.name, address: sites.address },
      machine: { model: machines.model, serial: machines.serial },
      technician: { name: users.name },
    })
    .from(levelingSessions)
    .innerJoin(organisations, eq(organisations.id, levelingSessions.organisationId))
    .innerJoin(machines, eq(machines.id, levelingSessions.machineId))
    .innerJoin(sites, eq(sites.id, machines.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .innerJoin(users, eq(users.id, levelingSessions.technicianId))
    .where(and(eq(levelingSessions.id, sessionId), organisationId ? eq(levelingSessions.organisationId, organisationId) : undefined));
  if (!row) return null;

  const { visitId, ...session } = row.session;
  const [contactRows, visitRows, instrumentRows, events] = await Promise.all([
    db
      .select({ name: contacts.name, email: contacts.email, position: contacts.position, receivesReports: contacts.receivesReports })
      .from(contacts)
      .where(and(eq(contacts.customerId, row.customer.id), eq(contacts.organisationId, session.organisationId)))
      .orderBy(asc(contacts.name)),
    visitId ? db.select({ scheduledFor: visits.scheduledFor }).from(visits).where(eq(visits.id, visitId)) : Promise.resolve([]),
    visitId ? listVisitInstruments(db, { visitId }) : Promise.resolve([]),
    listEventsBySession(db, { sessionId }),
  ]);
  return {
    session,
    organisation: row.organisation,
    customer: { name: row.customer.name, contacts: contactRows },
    site: row.site,
    machine: row.machine,
    technician: row.technician,
    visit: visitRows[0] ?? null,
    instruments: instrumentRows.map(instrumentFact),
    events,
  };
}

/** Who receives the report: the contact marked to receive reports that has an e-mail, else the first with an e-mail. */
export function reportRecipient(list: readonly ReportContact[]): ReportContact | null {
  const withEmail = list.filter((c) => c.email.trim() !== '');
  return withEmail.find((c) => c.receivesReports) ?? withEmail[0] ?? null;
}
