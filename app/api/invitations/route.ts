import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { listPendingInvitations } from '@/db/queries/invitations';
import { assertCan } from '@/lib/auth/policy';
import { requireActor } from '@/lib/auth/session';
import { env } from '@/lib/env';
import { inviteUser } from '@/lib/fleet/invitations-service';
import { jsonBody, parseWith, route } from '@/lib/http';
import { invitationInput } from './schema';

export const GET = route('invitation', async () => {
  const actor = await requireActor();
  assertCan(actor, 'user:manage');
  const invitations = await listPendingInvitations(db(), { organisationId: actor.organisationId, now: new Date() });
  return NextResponse.json({ invitations });
});

/** Invites someone by e-mail (admin); the link goes only into the e-mail, never into the answer. */
export const POST = route('invitation', async (req) => {
  const actor = await requireActor();
  const input = parseWith(invitationInput, await jsonBody(req, 'invitation'), 'invitation');
  assertCan(actor, 'user:manage');
  const baseUrl = env().NEXTAUTH_URL ?? new URL(req.url).origin;
  const invitation = await inviteUser(db(), { organisationId: actor.organisationId, invitedBy: actor, input, baseUrl });
  return NextResponse.json({ invitation }, { status: 201 });
});
