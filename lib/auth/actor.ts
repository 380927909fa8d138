import type { Role } from '@/db/schema';
import { getUserById } from '@/db/queries/users';
import type { Db } from '@/db/client';
import { isDatabaseUnavailable } from '@/lib/errors';

/** Who is asking, as every check sees it. */
export type Actor = { id: string; name: string; role: Role; organisationId: string; unitSystem: 'inch' | 'metric' };

/**
 * Resolves a signed-in user id (from a next-auth token) to an Actor, reading the user row so that a
 * deactivated user or a changed role takes effect on the next request, not when the token expires.
 */
export async function actorFromUserId(db: Db, userId: string | undefined | null): Promise<Actor | null> {
  if (!userId) return null;
  // A malformed id is no user; a database that cannot be reached is an outage, not a signed-out caller.
  const user = await getUserById(db, { id: userId }).catch((e: unknown) => {
    if (isDatabaseUnavailable(e)) throw e;
    return null;
  });
  if (!user || !user.active) return null;
  return { id: user.id, name: user.name, role: user.role, organisationId: user.organisationId, unitSystem: user.unitSystem };
}
