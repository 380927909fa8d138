import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { getInvitationByTokenHash } from '@/db/queries/invitations';
import { assertPasswordAllowed } from '@/lib/auth/password';
import { acceptInvitationWithPassword, hashInvitationToken } from '@/lib/fleet/invitations-service';
import { jsonBody, parseWith, route } from '@/lib/http';
import { acceptInvitationInput } from '../schema';

/** Public: the invited person sets their name and password; the account is made in the inviter's organisation. */
export const POST = route('invitation', async (req) => {
  const input = parseWith(acceptInvitationInput, await jsonBody(req, 'invitation'), 'invitation');
  // The schema checked the rules that need no owner; the e-mail is known only from the invitation. An unknown,
  // used or expired token is left to acceptInvitation, which says which.
  const invitation = await getInvitationByTokenHash(db(), { tokenHash: hashInvitationToken(input.token) });
  if (invitation) assertPasswordAllowed(input.password, { email: invitation.email, name: input.name }, 'invitation');
  const user = await acceptInvitationWithPassword(db(), input);
  return NextResponse.json({ user: { email: user.email, name: user.name, role: user.role } }, { status: 201 });
});
