import { and, asc, count, desc, eq, gte, ilike, inArray, lt, or, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import type { Db } from '../client';
import { customers, instruments, levelingSessions, machines, sites, users, visitInstruments, visits, type Role } from '../schema';
import { AppError } from '@/lib/errors';
import { likePattern, type ListQuery, type Page } from '@/lib/list-query';
import { addDays } from '@/lib/dates';
import { assertVisitTransition, type VisitRow, type VisitSort, type VisitState } from '@/lib/fleet/visits';

type Org = { organisationId: string };
type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

const technician = alias(users, 'technician');
const expert = alias(users, 'expert');


const sortColumns: Record<VisitSort, SQL[]> = {
  scheduledFor: [sql`${visits.scheduledFor}`],
  state: [sql`${visits.state}`, sql`${visits.scheduledFor}`],
  machine: [sql`${machines.model}`, sql`${machines.serial}`, sql`${visits.scheduledFor}`],
};

/** One page of an organisation's visits; filtered (text, state, UTC day range), sorted and paged in PostgreSQL. */
export async function listVisits(
  db: Db,
  { organisationId, q, sort, dir, page, pageSize, state, from, to }: Org & ListQuery<VisitSort> & { state: VisitState | 'open' | 'all'; from?: string; to?: string },
): Promise<Page<VisitRow>> {
  const where: (SQL | undefined)[] = [eq(visits.organisationId, organisationId)];
  if (q) {
    const p = likePattern(q);
    where.push(or(ilike(machines.model, p), ilike(machines.serial, p), ilike(customers.name, p), ilike(sites.name, p), ilike(technician.name, p)));
  }
  if (state === 'open') where.push(inArray(visits.state, ['scheduled', 'in_progress']));
  else if (state !== 'all') where.push(eq(visits.state, state));
  if (from) where.push(gte(visits.scheduledFor, new Date(`${from}T00:00:00Z`)));
  if (to) where.push(lt(visits.scheduledFor, new Date(`${addDays(to, 1)}T00:00:00Z`)));
  const filter = and(...where);
  const order = dir === 'desc' ? desc : asc;
  const [rows, [total]] = await Promise.all([
    db
      .select({
        id: visits.id,
        scheduledFor: visits.scheduledFor,
        state: visits.state,
        notes: visits.notes,
        machineId: machines.id,
        machineModel: machines.model,
        machineSerial: machines.serial,
        customerName: customers.name,
        siteName: sites.name,
        technicianName: technician.name,
        expertName: expert.name,
      })
      .from(visits)
      .innerJoin(machines, eq(machines.id, visits.machineId))
      .innerJoin(sites, eq(sites.id, machines.siteId))
      .innerJoin(customers, eq(customers.id, sites.customerId))
      .innerJoin(technician, eq(technician.id, visits.technicianId))
      .leftJoin(expert, eq(expert.id, visits.expertId))
      .where(filter)
      .orderBy(...sortColumns[sort].map((c) => order(c)), asc(visits.id))
      .limit(pageSize)
      .offset((page - 1) * pageSize),
    db
      .select({ n: count() })
      .from(visits)
      .innerJoin(machines, eq(machines.id, visits.machineId))
      .innerJoin(sites, eq(sites.id, machines.siteId))
      .innerJoin(customers, eq(customers.id, sites.customerId))
      .innerJoin(technician, eq(technician.id, visits.technicianId))
      .where(filter),
  ]);
  return { rows: rows.map((r) => ({ ...r, scheduledFor: r.scheduledFor.toISOString() })), total: total?.n ?? 0, page, pageSize };
}

/** A visit with what its page and its mails show; null when absent or in another organisation. */
export async function getVisit(db: Db | Tx, { organisationId, id }: Org & { id: string }) {
  const [row] = await db
    .select({
      visit: visits,
      machine: { id: machines.id, model: machines.model, serial: machines.serial, checkIntervalMonths: machines.checkIntervalMonths },
      site: { id: sites.id, name: sites.name, address: sites.address, accessNotes: sites.accessNotes },
      customerName: customers.name,
      technician: { id: technician.id, name: technician.name, email: technician.email },
      expert: { id: expert.id, name: expert.name, email: expert.email },
    })
    .from(visits)
    .innerJoin(machines, eq(machines.id, visits.machineId))
    .innerJoin(sites, eq(sites.id, machines.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .innerJoin(technician, eq(technician.id, visits.technicianId))
    .leftJoin(expert, eq(expert.id, visits.expertId))
    .where(and(eq(visits.id, id), eq(visits.organisationId, organisationId)));
  if (!row) return null;
  return { ...row, expert: row.expert?.id ? row.expert : null };
}
export type VisitDetail = NonNullable<Awaited<ReturnType<typeof getVisit>>>;

/** Active users of one role in an organisation, for the visit form's pickers. */
export async function listUsersByRole(db: Db, { organisationId, role }: Org & { role: Role }) {
  return db
    .select({ id: users.id, name: users.name, email: users.email })
    .from(users)
    .where(and(eq(users.organisationId, organisationId), eq(users.role, role), eq(users.active, true)))
    .orderBy(asc(users.name));
}

/** A machine of the organisation as the visit form shows it; null when absent or elsewhere. */
export async function getMachineForVisit(db: Db, { organisationId, id }: Org & { id: string }) {
  const [row] = await db
    .select({ id: machines.id, model: machines.model, serial: machines.serial, customerName: customers.name, siteName: sites.name })
    .from(machines)
    .innerJoin(sites, eq(sites.id, machines.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .where(and(eq(machines.id, id), eq(machines.organisationId, organisationId)));
  return row ?? null;
}

async function assertActiveUser(db: Db | Tx, { organisationId, id, role, field }: Org & { id: string; role: Role; field: string }) {
  const [user] = await db
    .select({ id: users.id })
    .from(users)
    .where(and(eq(users.id, id), eq(users.organisationId, organisationId), eq(users.role, role), eq(users.active, true)));
  if (!user) throw new AppError('bad_request:visit', `${field}: must be an active ${role} of your organisation`, field);
}

/** Stores a new visit after checking its machine (404 when not the organisation's) and people (400 naming the field). */
export async function insertVisit(
  db: Db,
  input: Org & { machineId: string; technicianId: string; expertId?: string | null; scheduledFor: Date; notes: string; createdById: string },
) {
  return db.transaction(async (tx) => {
    const [machine] = await tx.select({ id: machines.id }).from(machines).where(and(eq(machines.id, input.machineId), eq(machines.organisationId, input.organisationId)));
    if (!machine) throw new AppError('not_found:machine', 'No such machine');
    await assertActiveUser(tx, { organisationId: input.organisationId, id: input.technicianId, role: 'technician', field: 'technicianId' });
    if (input.expertId) await assertActiveUser(tx, { organisationId: input.organisationId, id: input.expertId, role: 'expert', field: 'expertId' });
    const [visit] = await tx
      .insert(visits)
      .values({
        organisationId: input.organisationId,
        machineId: input.machineId,
        technicianId: input.technicianId,
        expertId: input.expertId ?? null,
        scheduledFor: input.scheduledFor,
        notes: input.notes,
        createdById: input.createdById,
      })
      .returning();
    return visit!;
  });
}

/**
 * Changes a visit under a row lock: a new time (only while scheduled; clears the sent reminder so a new one goes out),
 * notes, or a state move (409 naming both states when not allowed). Null when the visit is not the organisation's.
 */
export async function updateVisit(db: Db, { organisationId, id, patch }: Org & { id: string; patch: { scheduledFor?: Date; notes?: string; state?: VisitState } }) {
  return db.transaction(async (tx) => {
    const [current] = await tx
      .select()
      .from(visits)
      .where(and(eq(visits.id, id), eq(visits.organisationId, organisationId)))
      .for('update');
    if (!current) return null;
    if (patch.state !== undefined) assertVisitTransition(current.state, patch.state);
    const rescheduled = patch.scheduledFor !== undefined && patch.scheduledFor.getTime() !== current.scheduledFor.getTime();
    if (rescheduled && current.state !== 'scheduled') {
      throw new AppError('conflict:visit', `A visit that is ${current.state.replace('_', ' ')} cannot be rescheduled`, 'scheduledFor');
    }
    const changes = {
      ...(patch.notes !== undefined ? { notes: patch.notes } : {}),
      ...(patch.state !== undefined ? { state: patch.state } : {}),
      ...(rescheduled ? { scheduledFor: patch.scheduledFor, reminderSentAt: null } : {}),
    };
    // The same time again changes nothing, and an UPDATE with nothing to set is an error.
    if (Object.keys(changes).length === 0) return { visit: current, previous: current, rescheduled };
    const [updated] = await tx.update(visits).set(changes).where(eq(visits.id, id)).returning();
    return { visit: updated!, previous: current, rescheduled };
  });
}

/** An instrument of the organisation, for choosing it for a visit; null when absent or elsewhere. */
export async function getInstrumentForVisit(db: Db, { organisationId, id }: Org & { id: string }) {
  const [row] = await db.select().from(instruments).where(and(eq(instruments.id, id), eq(instruments.organisationId, organisationId)));
  return row ?? null;
}

/** The instruments chosen for a visit, with any calibration override and who gave it. */
export async function listVisitInstruments(db: Db, { visitId }: { visitId: string }) {
  const overrideBy = alias(users, 'override_by');
  return db
    .select({
      instrumentId: instruments.id,
      kind: instruments.kind,
      model: instruments.model,
      serial: instruments.serial,
      sensitivityValue: instruments.sensitivityValue,
      sensitivityUnit: instruments.sensitivityUnit,
      calibratedOn: instruments.calibratedOn,
      calibrationDue: instruments.calibrationDue,
      overrideReason: visitInstruments.overrideReason,
      overrideAt: visitInstruments.overrideAt,
      overrideByName: overrideBy.name,
    })
    .from(visitInstruments)
    .innerJoin(instruments, eq(instruments.id, visitInstruments.instrumentId))
    .leftJoin(overrideBy, eq(overrideBy.id, visitInstruments.overrideById))
    .where(eq(visitInstruments.visitId, visitId))
    .orderBy(asc(instruments.kind), asc(instruments.serial));
}

/** Records an instrument for a visit (409 when already chosen); an override's reason, who and when go with it. */
export async function addVisitInstrument(
  db: Db,
  input: { visitId: string; instrumentId: string; serial: string; override?: { reason: string; byId: string; at: Date } },
) {
  const [row] = await db
    .insert(visitInstruments)
    .values({
      visitId: input.visitId,
      instrumentId: input.instrumentId,
      overrideReason: input.override?.reason ?? null,
      overrideById: input.override?.byId ?? null,
      overrideAt: input.override?.at ?? null,
    })
    .onConflictDoNothing()
    .returning();
  if (!row) throw new AppError('conflict:visit', `Instrument ${input.serial} is already chosen for this visit`, 'instrumentId');
  return row;
}

/** Takes an instrument off a visit; false when it was not chosen. */
export async function removeVisitInstrument(db: Db, { visitId, instrumentId }: { visitId: string; instrumentId: string }): Promise<boolean> {
  const rows = await db
    .delete(visitInstruments)
    .where(and(eq(visitInstruments.visitId, visitId), eq(visitInstruments.instrumentId, instrumentId)))
    .returning({ id: visitInstruments.instrumentId });
  return rows.length > 0;
}

/**
 * Marks every scheduled visit starting within `withinMs` of `now` whose reminder has not gone out, in one
 * UPDATE … WHERE reminder_sent_at IS NULL RETURNING, so each is claimed by exactly one run.
 */
export async function claimVisitReminders(db: Db, { now, withinMs, organisationId }: { now: Date; withinMs: number; organisationId?: string }) {
  const until = new Date(now.getTime() + withinMs);
  const claimed = await db
    .update(visits)
    .set({ reminderSentAt: now })
    .where(
      and(
        eq(visits.state, 'scheduled'),
        sql`${visits.reminderSentAt} is null`,
        gte(visits.scheduledFor, now),
        lt(visits.scheduledFor, until),
        organisationId ? eq(visits.organisationId, organisationId) : undefined,
      ),
    )
    .returning({ id: visits.id, organisationId: visits.organisationId });
  return claimed;
}

/** Gives back a claimed visit reminder whose mail failed, so the next run tries again. */
export async function releaseVisitReminder(db: Db, { id }: { id: string }) {
  await db.update(visits).set({ reminderSentAt: null }).where(eq(visits.id, id));
}

/** E-mail addresses of an organisation's active admins. */
export async function listAdminEmails(db: Db, { organisationId }: Org): Promise<string[]> {
  const rows = await db
    .select({ email: users.email })
    .from(users)
    .where(and(eq(users.organisationId, organisationId), eq(users.role, 'admin'), eq(users.active, true)));
  return rows.map((r) => r.email);
}

/** The organisation's instruments in use, for choosing them for a visit. */
export async function listActiveInstruments(db: Db, { organisationId }: Org) {
  return db
    .select({ id: instruments.id, kind: instruments.kind, model: instruments.model, serial: instruments.serial, calibrationDue: instruments.calibrationDue })
    .from(instruments)
    .where(and(eq(instruments.organisationId, organisationId), eq(instruments.active, true)))
    .orderBy(asc(instruments.kind), asc(instruments.serial));
}

/** The leveling sessions opened for a visit, newest first. */
export async function listVisitSessions(db: Db, { visitId }: { visitId: string }) {
  return db
    .select({ id: levelingSessions.id, state: levelingSessions.state, createdAt: levelingSessions.createdAt, lastSeq: levelingSessions.lastSeq })
    .from(levelingSessions)
    .where(eq(levelingSessions.visitId, visitId))
    .orderBy(desc(levelingSessions.createdAt));
}
