import { z } from 'zod';
import { newPassword } from '@/lib/auth/password';

export const INVITE_ROLES = ['technician', 'expert', 'reviewer', 'admin'] as const;

/** Days an invitation link stays valid. */
export const INVITATION_DAYS = 7;

/** An admin's invitation (POST /api/invitations and the invite form). */
export const invitationInput = z.strictObject({
  email: z.string({ error: 'must be text' }).trim().toLowerCase().max(200, 'must be at most 200 characters').pipe(z.email({ error: 'must be an e-mail address' })),
  role: z.enum(INVITE_ROLES, { error: `must be one of ${INVITE_ROLES.join(', ')}` }),
});
export type InvitationInput = z.output<typeof invitationInput>;
export type InvitationFormValues = z.input<typeof invitationInput>;

/** 32 random bytes in base64url: 43 characters. */
export const invitationToken = z.string({ error: 'must be text' }).regex(/^[A-Za-z0-9_-]{43}$/, 'is not a Levelwire invitation link');

/** What the invited person sends (POST /api/invitations/accept and the invite page's form); the password rules live in lib/auth/password.ts. */
export const acceptInvitationInput = z.strictObject({
  token: invitationToken,
  name: z.string({ error: 'must be text' }).trim().min(2, 'must be at least 2 characters').max(100, 'must be at most 100 characters'),
  password: newPassword,
});
export type AcceptInvitationInput = z.output<typeof acceptInvitationInput>;
