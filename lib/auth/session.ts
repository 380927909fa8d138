import { getServerSession } from 'next-auth';
import { redirect } from 'next/navigation';
import { db } from '@/db/client';
import { AppError } from '@/lib/errors';
import { actorFromUserId, type Actor } from './actor';
import { authOptions } from './options';

/** The signed-in actor for a server component or route handler, or null. */
export async function getActor(): Promise<Actor | null> {
  const session = await getServerSession(authOptions);
  return actorFromUserId(db(), session?.user?.id);
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
