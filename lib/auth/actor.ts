import type { JWT } from 'next-auth/jwt';
import type { Role, User } from '@/db/schema';
import { getUserById } from '@/db/queries/users';
import type { Db } from '@/db/client';
import { isDatabaseUnavailable } from '@/lib/errors';
import { passwordStamp, SESSION_MAX_AGE_SECONDS } from './token';

/** Who is asking, as every check sees it. */
export type Actor = { id: string; name: string; role: Role; organisationId: string; unitSystem: 'inch' | 'metric' };

const toActor = (user: User): Actor => ({ id: user.id, name: user.name, role: user.role, organisationId: user.organisationId, unitSystem: user.unitSystem });

/** The active user's row, or null. A malformed id is no user; a database that cannot be reached is an outage, not a signed-out caller. */
async function activeUser(db: Db, id: string): Promise<User | null> {
  const user = await getUserById(db, { id }).catch((e: unknown) => {
    if (isDatabaseUnavailable(e)) throw e;
    return null;
  });
  return user && user.active ? user : null;
}

/**
 * Resolves a signed-in user id (from a next-auth token) to an Actor, reading the user row so that a
 * deactivated user or a changed role takes effect on the next request, not when the token expires.
 */
export async function actorFromUserId(db: Db, userId: string | undefined | null): Promise<Actor | null> {
  if (!userId) return null;
  const user = await activeUser(db, userId);
  return user && toActor(user);
}

/**
 * The Actor behind a session token (pages, route handlers, socket handshakes), with the user row read once:
 * refused when the user is deactivated, when the password changed since the token was made (its stamp no longer
 * matches), and a working day after the password was typed, however often the token was renewed since. A token
 * without a stamp or sign-in time predates them and still expires on its own within a working day.
 */
export async function actorFromToken(db: Db, token: Pick<JWT, 'sub' | 'pwd' | 'signedInAt'> | null | undefined, nowMs = Date.now()): Promise<Actor | null> {
  if (!token?.sub) return null;
  if (typeof token.signedInAt === 'number' && nowMs / 1000 - token.signedInAt > SESSION_MAX_AGE_SECONDS) return null;
  const user = await activeUser(db, token.sub);
  if (!user) return null;
  if (typeof token.pwd === 'string' && token.pwd !== passwordStamp(user.passwordHash)) return null;
  return toActor(user);
}
