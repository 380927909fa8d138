import { createHash, randomBytes } from 'node:crypto';
import bcrypt from 'bcryptjs';
import type { Db } from '@/db/client';
import type { Role } from '@/db/schema';
import { acceptInvitation, deleteInvitation, insertInvitation } from '@/db/queries/invitations';
import { AppError } from '@/lib/errors';
import { sendMail } from '@/lib/mail';
import { INVITATION_DAYS, type AcceptInvitationInput, type InvitationInput } from './invitations';

/** bcrypt cost for passwords set through an invitation. */
const BCRYPT_COST = 10;

/** The stored form of an invitation token: its SHA-256, hex. The token itself is only ever in the e-mail. */
export function hashInvitationToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}

/** Creates an invitation with a fresh 32-byte token, valid 7 days, and e-mails its link; nothing is kept when the e-mail cannot be sent. */
export async function inviteUser(
  db: Db,
  { organisationId, invitedBy, input, baseUrl, now = new Date() }: { organisationId: string; invitedBy: { id: string; name: string }; input: InvitationInput; baseUrl: string; now?: Date },
) {
  const token = randomBytes(32).toString('base64url');
  const expiresAt = new Date(now.getTime() + INVITATION_DAYS * 86_400_000);
  const invitation = await insertInvitation(db, { organisationId, email: input.email, role: input.role as Role, invitedById: invitedBy.id, tokenHash: hashInvitationToken(token), expiresAt, now });
  const link = `${baseUrl.replace(/\/$/, '')}/invite/${token}`;
  try {
    await sendMail({
      to: input.email,
      subject: 'You are invited to Levelwire',
      text: [
        `${invitedBy.name} invites you to join their organisation on Levelwire as ${input.role === 'admin' ? 'an' : 'a'} ${input.role}.`,
        '',
        `Set your name and password here: ${link}`,
        '',
        `The link works once and until ${expiresAt.toISOString().slice(0, 16).replace('T', ' ')} UTC.`,
        'If you did not expect this, ignore this e-mail.',
      ].join('\n'),
    });
  } catch (e) {
    console.error('[levelwire] invitation e-mail failed', e);
    await deleteInvitation(db, { invitationId: invitation.id, organisationId });
    throw new AppError('offline:mail', 'The invitation e-mail could not be sent; nothing was stored. Try again later.');
  }
  return { id: invitation.id, email: invitation.email, role: invitation.role, expiresAt: invitation.expiresAt };
}

/** Creates the invited user (password hashed with bcrypt, cost 10); the invitation works once. */
export async function acceptInvitationWithPassword(db: Db, input: AcceptInvitationInput, now = new Date()) {
  const passwordHash = await bcrypt.hash(input.password, BCRYPT_COST);
  return acceptInvitation(db, { tokenHash: hashInvitationToken(input.token), name: input.name, passwordHash, now });
}
