import { and, asc, eq, sql } from 'drizzle-orm';
import type { Db } from '../client';
import { users, type Role } from '../schema';
import { AppError } from '@/lib/errors';

export async function getUserByEmail(db: Db, { email }: { email: string }) {
  const [user] = await db.select().from(users).where(sql`lower(${users.email}) = lower(${email})`);
  return user ?? null;
}

export async function getUserById(db: Db, { id }: { id: string }) {
  const [user] = await db.select().from(users).where(eq(users.id, id));
  return user ?? null;
}

/** The organisation's people for the admin's list, by name. */
export async function listUsersByOrganisation(db: Db, { organisationId }: { organisationId: string }) {
  return db
    .select({ id: users.id, name: users.name, email: users.email, role: users.role, active: users.active, createdAt: users.createdAt })
    .from(users)
    .where(eq(users.organisationId, organisationId))
    .orderBy(asc(users.name), asc(users.id));
}

/** Active people of the organisation, optionally of one role, by name: for pickers (experts to coach, observers). */
export async function listActivePeople(db: Db, { organisationId, role }: { organisationId: string; role?: Role | undefined }) {
  return db
    .select({ id: users.id, name: users.name, role: users.role })
    .from(users)
    .where(and(eq(users.organisationId, organisationId), eq(users.active, true), role ? eq(users.role, role) : undefined))
    .orderBy(asc(users.name), asc(users.id));
}

/**
 * Changes a user's role or active flag. The organisation's active admins are locked first, so two admins
 * demoting each other at once cannot leave it without one. Refused with 409: removing the last active
 * admin, and an admin deactivating or demoting themself. Null when there is no such user in the organisation.
 */
export async function updateUserAccess(
  db: Db,
  { organisationId, userId, actorId, role, active }: { organisationId: string; userId: string; actorId: string; role?: Role; active?: boolean },
) {
  return db.transaction(async (tx) => {
    const admins = await tx
      .select({ id: users.id })
      .from(users)
      .where(and(eq(users.organisationId, organisationId), eq(users.role, 'admin'), eq(users.active, true)))
      .for('update');
    const [target] = await tx
      .select()
      .from(users)
      .where(and(eq(users.id, userId), eq(users.organisationId, organisationId)))
      .for('update');
    if (!target) return null;
    const removesAdmin = target.role === 'admin' && target.active && ((role !== undefined && role !== 'admin') || active === false);
    if (removesAdmin && admins.length <= 1) {
      throw new AppError('conflict:user', `${target.name} is the last active admin; make someone else an admin first`);
    }
    if (target.id === actorId && active === false) throw new AppError('conflict:user', 'You cannot deactivate yourself; ask another admin', 'active');
    if (target.id === actorId && role !== undefined && role !== 'admin') {
      throw new AppError('conflict:user', 'You cannot take away your own admin role; ask another admin', 'role');
    }
    const [row] = await tx
      .update(users)
      .set({ ...(role === undefined ? {} : { role }), ...(active === undefined ? {} : { active }) })
      .where(eq(users.id, target.id))
      .returning({ id: users.id, name: users.name, email: users.email, role: users.role, active: users.active, createdAt: users.createdAt });
    return { user: row!, before: { role: target.role, active: target.active } };
  });
}
