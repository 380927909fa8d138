import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { updateUserAccess } from '@/db/queries/users';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { AppError } from '@/lib/errors';
import { jsonBody, parseWith, route } from '@/lib/http';
import { endUserSockets } from '@/lib/realtime/bus';
import { userParams, userPatch } from '../schema';

type Ctx = { params: Promise<{ id: string }> };

/** Changes a user's role or deactivates/reactivates them (admin). Their live sockets end, so they reconnect as who they now are. */
export const PATCH = route<Ctx>('user', async (req, { params }) => {
  const actor = await requireActor();
  const { id } = parseWith(userParams, await params, 'user');
  const patch = parseWith(userPatch, await jsonBody(req, 'user'), 'user');
  assertCan(actor, 'user:manage');
  const changed = await updateUserAccess(db(), { organisationId: actor.organisationId, userId: id, actorId: actor.id, ...patch });
  if (!changed) throw new AppError('not_found:user', 'No such user');
  const { user, before } = changed;
  if (before.active !== user.active || before.role !== user.role) endUserSockets(user.id);
  return NextResponse.json({ user });
});
