import { NextResponse } from 'next/server';
import { db } from '@/db/client';
import { acceptInvitationWithPassword } from '@/lib/fleet/invitations-service';
import { jsonBody, parseWith, route } from '@/lib/http';
import { acceptInvitationInput } from '../schema';

/** Public: the invited person sets their name and password; the account is made in the inviter's organisation. */
export const POST = route('invitation', async (req) => {
  const input = parseWith(acceptInvitationInput, await jsonBody(req, 'invitation'), 'invitation');
  const user = await acceptInvitationWithPassword(db(), input);
  return NextResponse.json({ user: { email: user.email, name: user.name, role: user.role } }, { status: 201 });
});
