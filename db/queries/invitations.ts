import { and, asc, eq, gt, isNull, sql } from 'drizzle-orm';
import type { Db } from '../client';
import { invitations, organisations, users, type Role } from '../schema';
import { AppError } from '@/lib/errors';

const emailTaken = (email: string) => new AppError('conflict:invitation', `email: ${email} already belongs to a Levelwire user`, 'email');

async function userWithEmail(db: Pick<Db, 'select'>, email: string) {
  const [row] = await db.select({ id: users.id }).from(users).where(sql`lower(${users.email}) = lower(${email})`);
  return row ?? null;
}

/**
 * Stores an invitation (only the token's hash). Refused with 409 when the e-mail already belongs to a user;
 * an earlier pending invitation for the same e-mail in the organisation is ended, so only the newest link works.
 */
export async function insertInvitation(
  db: Db,
  input: { organisationId: string; email: string; role: Role; invitedById: string; tokenHash: string; expiresAt: Date; now: Date },
) {
  return db.transaction(async (tx) => {
    if (await userWithEmail(tx, input.email)) throw emailTaken(input.email);
    await tx
      .update(invitations)
      .set({ expiresAt: input.now })
      .where(
        and(
          eq(invitations.organisationId, input.organisationId),
          sql`lower(${invitations.email}) = lower(${input.email})`,
          isNull(invitations.acceptedAt),
          gt(invitations.expiresAt, input.now),
        ),
      );
    const [row] = await tx
      .insert(invitations)
      .values({ organisationId: input.organisationId, email: input.email, role: input.role, invitedById: input.invitedById, tokenHash: input.tokenHash, expiresAt: input.expiresAt })
      .returning();
    return row!;
  });
}

/** Removes an invitation whose e-mail could not be sent. */
export async function deleteInvitation(db: Db, { invitationId, organisationId }: { invitationId: string; organisationId: string }) {
  await db.delete(invitations).where(and(eq(invitations.id, invitationId), eq(invitations.organisationId, organisationId)));
}

/** The organisation's invitations not yet accepted nor expired, soonest to expire first. */
export async function listPendingInvitations(db: Db, { organisationId, now }: { organisationId: string; now: Date }) {
  return db
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, expiresAt: invitations.expiresAt, createdAt: invitations.createdAt, invitedBy: users.name })
    .from(invitations)
    .innerJoin(users, eq(users.id, invitations.invitedById))
    .where(and(eq(invitations.organisationId, organisationId), isNull(invitations.acceptedAt), gt(invitations.expiresAt, now)))
    .orderBy(asc(invitations.expiresAt));
}

/** An invitation by its token's hash, with its organisation's name; null when unknown. */
export async function getInvitationByTokenHash(db: Db, { tokenHash }: { tokenHash: string }) {
  const [row] = await db
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, expiresAt: invitations.expiresAt, acceptedAt: invitations.acceptedAt, organisationName: organisations.name })
    .from(invitations)
    .innerJoin(organisations, eq(organisations.id, invitations.organisationId))
    .where(eq(invitations.tokenHash, tokenHash));
  return row ?? null;
}

/** Why an invitation cannot be used now, or null when it can. */
export function invitationProblem(inv: { expiresAt: Date; acceptedAt: Date | null } | null, now: Date): AppError | null {
  if (!inv) return new AppError('bad_request:invitation', 'token: this invitation link is not valid; ask your admin for a new one', 'token');
  if (inv.acceptedAt) return new AppError('conflict:invitation', 'token: this invitation has already been used; sign in instead', 'token');
  if (inv.expiresAt <= now) {
    return new AppError('bad_request:invitation', `token: this invitation expired on ${inv.expiresAt.toISOString().slice(0, 10)}; ask your admin for a new one`, 'token');
  }
  return null;
}

/**
 * Turns an invitation into a user of the inviter's organisation with the invited role, once: the
 * invitation row is locked and marked accepted in the same transaction.
 */
export async function acceptInvitation(db: Db, { tokenHash, name, passwordHash, now }: { tokenHash: string; name: string; passwordHash: string; now: Date }) {
  return db.transaction(async (tx) => {
    const [inv] = await tx.select().from(invitations).where(eq(invitations.tokenHash, tokenHash)).for('update');
    const problem = invitationProblem(inv ?? null, now);
    if (problem) throw problem;
    if (await userWithEmail(tx, inv!.email)) throw emailTaken(inv!.email);
    const [user] = await tx
      .insert(users)
      .values({ organisationId: inv!.organisationId, email: inv!.email, name, role: inv!.role, passwordHash })
      .returning({ id: users.id, email: users.email, name: users.name, role: users.role });
    await tx.update(invitations).set({ acceptedAt: now }).where(eq(invitations.id, inv!.id));
    return user!;
  });
}
