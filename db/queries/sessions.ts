import { randomUUID } from 'node:crypto';
import { and, asc, desc, eq, inArray, isNotNull, sql } from 'drizzle-orm';
import type { Db } from '../client';
import { customers, levelingSessions, machines, sessionEvents, sessionParticipants, sites, users, visits, type LevelingSession, type Role } from '../schema';
import { AppError } from '@/lib/errors';
import { DEFAULT_TOLERANCES } from '@/lib/leveling/stages';
import type { SessionScrew } from '@/lib/session/events';
import { appendEventInTx, toSessionEvent, type Tx } from './events';

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

/**
 * The sessions a user may see, newest first, with the user's standing in each: their part, or `reader` for the
 * organisation's reviewers and admins (`readsAll`), who see every session; everyone else sees only their own.
 */
export async function listSessionsForUser(
  db: Db,
  { organisationId, userId, readsAll, limit = 50 }: { organisationId: string; userId: string; readsAll: boolean; limit?: number },
) {
  const rows = await db
    .select({
      id: levelingSessions.id,
      state: levelingSessions.state,
      createdAt: levelingSessions.createdAt,
      lastSeq: levelingSessions.lastSeq,
      demo: sql<boolean>`${levelingSessions.virtualSeed} is not null`,
      machineId: machines.id,
      machineModel: machines.model,
      machineSerial: machines.serial,
      siteName: sites.name,
      customerName: customers.name,
      technicianId: users.id,
      technicianName: users.name,
      part: sessionParticipants.part,
    })
    .from(levelingSessions)
    .innerJoin(machines, eq(machines.id, levelingSessions.machineId))
    .innerJoin(sites, eq(sites.id, machines.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .innerJoin(users, eq(users.id, levelingSessions.technicianId))
    .leftJoin(sessionParticipants, and(eq(sessionParticipants.sessionId, levelingSessions.id), eq(sessionParticipants.userId, userId)))
    .where(and(eq(levelingSessions.organisationId, organisationId), readsAll ? undefined : isNotNull(sessionParticipants.part)))
    .orderBy(desc(levelingSessions.createdAt), desc(levelingSessions.id))
    .limit(limit);
  return rows.map(({ part, ...r }) => ({ ...r, standing: part ?? ('reader' as const) }));
}
export type SessionListRow = Awaited<ReturnType<typeof listSessionsForUser>>[number];

/**
 * Sessions of an organisation waiting for review (ended, or in review: commented, not yet approved or returned),
 * the longest waiting first, for the reviewers' and admins' start page.
 */
export async function listSessionsAwaitingReview(db: Db, { organisationId, limit = 50 }: { organisationId: string; limit?: number }) {
  return db
    .select({
      id: levelingSessions.id,
      state: levelingSessions.state,
      createdAt: levelingSessions.createdAt,
      lastSeq: levelingSessions.lastSeq,
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
    .where(and(eq(levelingSessions.organisationId, organisationId), inArray(levelingSessions.state, ['ended', 'in_review'])))
    .orderBy(asc(levelingSessions.createdAt), asc(levelingSessions.id))
    .limit(limit);
}
export type AwaitingReviewRow = Awaited<ReturnType<typeof listSessionsAwaitingReview>>[number];

/** What the virtual technician needs to know of a session before acting: null when absent. */
export async function getSessionRunner(db: Db, sessionId: string) {
  const [row] = await db
    .select({ id: levelingSessions.id, technicianId: levelingSessions.technicianId, state: levelingSessions.state, virtualSeed: levelingSessions.virtualSeed })
    .from(levelingSessions)
    .where(eq(levelingSessions.id, sessionId));
  return row ?? null;
}

/** Live demo sessions (a virtual seed set), for the virtual technician to pick up after a restart. */
export async function listLiveDemoSessionIds(db: Db): Promise<string[]> {
  const rows = await db
    .select({ id: levelingSessions.id })
    .from(levelingSessions)
    .where(and(eq(levelingSessions.state, 'live'), isNotNull(levelingSessions.virtualSeed)));
  return rows.map((r) => r.id);
}

/** Live demo sessions of one machine (the seed keeps one at a time). */
export async function listLiveDemoSessionsOfMachine(db: Db, { organisationId, machineId }: { organisationId: string; machineId: string }) {
  return db
    .select({ id: levelingSessions.id, technicianId: levelingSessions.technicianId })
    .from(levelingSessions)
    .where(
      and(
        eq(levelingSessions.organisationId, organisationId),
        eq(levelingSessions.machineId, machineId),
        eq(levelingSessions.state, 'live'),
        isNotNull(levelingSessions.virtualSeed),
      ),
    );
}

/** Ordinary (not demo) sessions of one machine run by one technician, in any state. */
export async function listOrdinarySessionsOfTechnician(db: Db, { machineId, technicianId }: { machineId: string; technicianId: string }) {
  return db
    .select({ id: levelingSessions.id })
    .from(levelingSessions)
    .where(
      and(
        eq(levelingSessions.machineId, machineId),
        eq(levelingSessions.technicianId, technicianId),
        sql`${levelingSessions.virtualSeed} is null`,
      ),
    );
}

/** One stored event of a session by its id, or null (checks a resend before any work is repeated). */
export async function getSessionEventById(db: Db, { sessionId, id }: { sessionId: string; id: string }) {
  const [row] = await db
    .select()
    .from(sessionEvents)
    .where(and(eq(sessionEvents.sessionId, sessionId), eq(sessionEvents.id, id)));
  return row ? toSessionEvent(row) : null;
}

/** A session's header and the caller's part in it (null: not a participant). Null when absent or another organisation's. */
export async function getSessionAccess(db: Db, { sessionId, userId, organisationId }: { sessionId: string; userId: string; organisationId: string }) {
  const [row] = await db
    .select({
      id: levelingSessions.id,
      technicianId: levelingSessions.technicianId,
      state: levelingSessions.state,
      levelDivisionUrad: levelingSessions.levelDivisionUrad,
      virtualSeed: levelingSessions.virtualSeed,
      part: sessionParticipants.part,
    })
    .from(levelingSessions)
    .leftJoin(sessionParticipants, and(eq(sessionParticipants.sessionId, levelingSessions.id), eq(sessionParticipants.userId, userId)))
    .where(and(eq(levelingSessions.id, sessionId), eq(levelingSessions.organisationId, organisationId)));
  return row ?? null;
}
export type SessionAccessRow = NonNullable<Awaited<ReturnType<typeof getSessionAccess>>>;

/** A session's participants with their names, in the order they were added. */
export async function listParticipants(db: Db, sessionId: string) {
  return db
    .select({ userId: users.id, name: users.name, role: users.role, part: sessionParticipants.part, addedAt: sessionParticipants.addedAt })
    .from(sessionParticipants)
    .innerJoin(users, eq(users.id, sessionParticipants.userId))
    .where(eq(sessionParticipants.sessionId, sessionId))
    .orderBy(asc(sessionParticipants.addedAt));
}

/** The machine as a session records it at opening: label, travel, tolerances and footprint. */
async function machineSnapshot(tx: Tx, organisationId: string, machineId: string) {
  const machine = await tx.query.machines.findFirst({
    where: and(eq(machines.id, machineId), eq(machines.organisationId, organisationId)),
    with: { screws: true },
  });
  if (!machine) throw new AppError('not_found:machine', 'No such machine', 'machineId');
  const screws: SessionScrew[] = [...machine.screws]
    .sort((a, b) => a.label.localeCompare(b.label, 'en', { numeric: true }))
    .map((sc) => ({
      id: sc.id,
      label: sc.label,
      kind: sc.kind,
      xMm: sc.xMm,
      yMm: sc.yMm,
      liftPerTurnMm: sc.liftPerTurnMm ?? sc.pitchMm,
      specifiedHeightMm: sc.specHeightMm,
    }));
  return {
    machineLabel: `${machine.model} · ${machine.serial}`,
    travelMm: machine.travelYMm,
    tolerances: {
      levelUrad: DEFAULT_TOLERANCES.levelUrad,
      twistUrad: machine.twistTolUrad ?? DEFAULT_TOLERANCES.twistUrad,
      bowUrad: machine.bowTolUrad ?? DEFAULT_TOLERANCES.bowUrad,
      sweepTirUm: machine.sweepTolUm ?? DEFAULT_TOLERANCES.sweepTirUm,
    },
    screws,
  };
}

/** The machine as a session would record it now (see openSession); throws 404 naming machineId when absent. */
export async function getMachineSnapshot(db: Db, { organisationId, machineId }: { organisationId: string; machineId: string }) {
  return db.transaction((tx) => machineSnapshot(tx, organisationId, machineId));
}

/** Active users of the organisation by id; throws 400 naming the field when one is missing or has the wrong role. */
async function checkPeople(tx: Tx, organisationId: string, ids: string[], field: string, roles: readonly Role[] | null) {
  if (ids.length === 0) return [];
  const found = await tx
    .select({ id: users.id, name: users.name, role: users.role })
    .from(users)
    .where(and(inArray(users.id, ids), eq(users.organisationId, organisationId), eq(users.active, true)));
  for (const id of ids) {
    const u = found.find((f) => f.id === id);
    if (!u) throw new AppError(`bad_request:${field}`, `${field}: no active user ${id} in your organisation`, field);
    if (roles && !roles.includes(u.role)) throw new AppError(`bad_request:${field}`, `${field}: ${u.name} is a ${u.role}, not an ${roles.join(' or ')}`, field);
  }
  return found;
}

/**
 * Opens a live session for a machine of the caller's organisation: the session row, its participants, and the
 * first events (`session:opened` with the machine as it is now, then one `participant:added` each) in one transaction.
 */
export async function openSession(
  db: Db,
  input: {
    organisationId: string;
    machineId: string;
    technician: { id: string; name: string };
    levelDivisionUrad: number;
    visitId?: string;
    experts?: string[];
    observers?: string[];
    virtualSeed?: number | null;
  },
) {
  return db.transaction(async (tx) => {
    const snapshot = await machineSnapshot(tx, input.organisationId, input.machineId);
    if (input.visitId) {
      const [visit] = await tx
        .select({ id: visits.id, machineId: visits.machineId })
        .from(visits)
        .where(and(eq(visits.id, input.visitId), eq(visits.organisationId, input.organisationId)));
      if (!visit) throw new AppError('not_found:visit', 'No such visit', 'visitId');
      if (visit.machineId !== input.machineId) throw new AppError('bad_request:visitId', 'visitId: the visit is for another machine', 'visitId');
    }
    const experts = await checkPeople(tx, input.organisationId, [...new Set(input.experts ?? [])], 'experts', ['expert']);
    const observers = await checkPeople(
      tx,
      input.organisationId,
      [...new Set(input.observers ?? [])].filter((id) => id !== input.technician.id && !experts.some((e) => e.id === id)),
      'observers',
      null,
    );
    const [session] = await tx
      .insert(levelingSessions)
      .values({
        organisationId: input.organisationId,
        machineId: input.machineId,
        technicianId: input.technician.id,
        visitId: input.visitId ?? null,
        levelDivisionUrad: input.levelDivisionUrad,
        virtualSeed: input.virtualSeed ?? null,
        state: 'live',
      })
      .returning();
    const sessionId = session!.id;
    const people = [
      { id: input.technician.id, name: input.technician.name, part: 'technician' as const },
      ...experts.map((u) => ({ id: u.id, name: u.name, part: 'expert' as const })),
      ...observers.map((u) => ({ id: u.id, name: u.name, part: 'observer' as const })),
    ];
    await tx.insert(sessionParticipants).values(people.map((p) => ({ sessionId, userId: p.id, part: p.part })));
    const events = [];
    const opened = await appendEventInTx(tx, {
      sessionId,
      id: randomUUID(),
      type: 'session:opened',
      payload: { machineId: input.machineId, levelDivisionUrad: input.levelDivisionUrad, virtualSeed: input.virtualSeed ?? null, ...snapshot },
      actorId: input.technician.id,
      actorRole: 'technician',
    });
    events.push(opened.event);
    for (const p of people) {
      const added = await appendEventInTx(tx, {
        sessionId,
        id: randomUUID(),
        type: 'participant:added',
        payload: { userId: p.id, name: p.name, part: p.part },
        actorId: input.technician.id,
        actorRole: 'technician',
      });
      events.push(added.event);
    }
    const last = events.at(-1)!;
    return { session: { ...session!, lastSeq: last.seq, lastHash: last.hash }, event: opened.event, events };
  });
}

/** Adds an expert or observer to a session (and the `participant:added` event) in one transaction; 409 if already in. */
export async function addParticipant(
  db: Db,
  input: { organisationId: string; sessionId: string; userId: string; part: 'expert' | 'observer'; actor: { id: string; role: Role } },
) {
  return db.transaction(async (tx) => {
    const [person] = await checkPeople(tx, input.organisationId, [input.userId], 'userId', input.part === 'expert' ? ['expert'] : null);
    const inserted = await tx
      .insert(sessionParticipants)
      .values({ sessionId: input.sessionId, userId: input.userId, part: input.part })
      .onConflictDoNothing()
      .returning();
    if (inserted.length === 0) throw new AppError('conflict:participant', `${person!.name} already takes part in this session`, 'userId');
    return appendEventInTx(tx, {
      sessionId: input.sessionId,
      id: randomUUID(),
      type: 'participant:added',
      payload: { userId: person!.id, name: person!.name, part: input.part },
      actorId: input.actor.id,
      actorRole: input.actor.role,
    });
  });
}

/** Moves a session to another state (ended, …) in the same transaction as the event that says so. */
export async function setSessionState(tx: Tx, sessionId: string, state: LevelingSession['state'], approvedAt?: Date) {
  await tx
    .update(levelingSessions)
    .set(approvedAt ? { state, approvedAt } : { state })
    .where(eq(levelingSessions.id, sessionId));
}

export type SessionWithMachine = NonNullable<Awaited<ReturnType<typeof getSessionForOrganisation>>>;
