import { randomUUID } from 'node:crypto';
import { and, desc, eq } from 'drizzle-orm';
import type { Db } from '../client';
import { customers, levelingSessions, machines, sites, users } from '../schema';
import { AppError } from '@/lib/errors';
import { appendEventInTx } from './events';

/** A session with what the views draw: its machine and footprint. Null when absent or in another organisation. */
export async function getSessionForOrganisation(db: Db, { sessionId, organisationId }: { sessionId: string; organisationId: string }) {
  const session = await db.query.levelingSessions.findFirst({
    where: and(eq(levelingSessions.id, sessionId), eq(levelingSessions.organisationId, organisationId)),
    with: { machine: { with: { screws: true, site: { with: { customer: true } } } }, technician: { columns: { id: true, name: true } } },
  });
  return session ?? null;
}

/** Just what recording a reading needs to check (the hot path): no machine, footprint or site. */
export async function getSessionHeader(db: Db, { sessionId, organisationId }: { sessionId: string; organisationId: string }) {
  const [row] = await db
    .select({ id: levelingSessions.id, technicianId: levelingSessions.technicianId, state: levelingSessions.state, levelDivisionUrad: levelingSessions.levelDivisionUrad })
    .from(levelingSessions)
    .where(and(eq(levelingSessions.id, sessionId), eq(levelingSessions.organisationId, organisationId)));
  return row ?? null;
}

export async function listSessionsByOrganisation(db: Db, { organisationId, limit = 50 }: { organisationId: string; limit?: number }) {
  return db
    .select({
      id: levelingSessions.id,
      state: levelingSessions.state,
      createdAt: levelingSessions.createdAt,
      lastSeq: levelingSessions.lastSeq,
      machineId: machines.id,
      machineModel: machines.model,
      machineSerial: machines.serial,
      siteName: sites.name,
      customerName: customers.name,
      technicianName: users.name,
    })
    .from(levelingSessions)
    .innerJoin(machines, eq(machines.id, levelingSessions.machineId))
    .innerJoin(sites, eq(sites.id, machines.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .innerJoin(users, eq(users.id, levelingSessions.technicianId))
    .where(eq(levelingSessions.organisationId, organisationId))
    .orderBy(desc(levelingSessions.createdAt))
    .limit(limit);
}

/**
 * Opens a live session for a machine of the caller's organisation and writes its first event
 * (`session:opened`, seq 1) in the same transaction.
 */
export async function openSession(
  db: Db,
  input: { organisationId: string; machineId: string; technicianId: string; levelDivisionUrad: number },
) {
  return db.transaction(async (tx) => {
    const [machine] = await tx
      .select({ id: machines.id })
      .from(machines)
      .where(and(eq(machines.id, input.machineId), eq(machines.organisationId, input.organisationId)));
    if (!machine) throw new AppError('not_found:machine', 'No such machine');
    const [session] = await tx
      .insert(levelingSessions)
      .values({
        organisationId: input.organisationId,
        machineId: input.machineId,
        technicianId: input.technicianId,
        levelDivisionUrad: input.levelDivisionUrad,
        state: 'live',
      })
      .returning();
    const { event } = await appendEventInTx(tx, {
      sessionId: session!.id,
      id: randomUUID(),
      type: 'session:opened',
      payload: { machineId: input.machineId, levelDivisionUrad: input.levelDivisionUrad },
      actorId: input.technicianId,
      actorRole: 'technician',
    });
    return { session: { ...session!, lastSeq: event.seq, lastHash: event.hash }, event };
  });
}
export type SessionWithMachine = NonNullable<Awaited<ReturnType<typeof getSessionForOrganisation>>>;
