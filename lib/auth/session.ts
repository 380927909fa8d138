import { cookies, headers } from 'next/headers';
import { redirect } from 'next/navigation';
import { db } from '@/db/client';
import { env } from '@/lib/env';
import { AppError } from '@/lib/errors';
import { actorFromToken, type Actor } from './actor';
import { readSessionToken } from './token';

/**
 * The signed-in actor for a server component or route handler, or null. Reads the token itself rather than
 * through getServerSession, so that the password stamp and sign-in time (kept out of the browser's session
 * object) are checked here as in the socket handshake.
 */
export async function getActor(): Promise<Actor | null> {
  const cookieJar = Object.fromEntries((await cookies()).getAll().map((c) => [c.name, c.value]));
  const token = await readSessionToken(cookieJar, Object.fromEntries(await headers()), env().NEXTAUTH_SECRET);
  return actorFromToken(db(), token);
}

/** For route handlers: the actor, or a 401. */
export async function requireActor(): Promise<Actor> {
  const actor = await getActor();
  if (!actor) throw new AppError('unauthorized:auth', 'Sign in first');
  return actor;
}

/** For pages: the actor, or a redirect to sign-in that comes back here. */
export async function requirePageActor(returnTo: string): Promise<Actor> {
  const actor = await getActor();
  if (!actor) redirect(`/sign-in?callbackUrl=${encodeURIComponent(returnTo)}`);
  return actor;
}
