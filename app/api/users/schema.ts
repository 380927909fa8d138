import { z } from 'zod';

export const ROLES = ['technician', 'expert', 'reviewer', 'admin'] as const;

export const userParams = z.object({ id: z.uuid({ error: 'must be a UUID' }) });

/** An admin's change to a user: a new role, or `active: false|true` to deactivate or reactivate. */
export const userPatch = z
  .strictObject({
    role: z.enum(ROLES, { error: `must be one of ${ROLES.join(', ')}` }).optional(),
    active: z.boolean({ error: 'must be true or false' }).optional(),
  })
  .refine((v) => v.role !== undefined || v.active !== undefined, 'name a role or active to change');
export type UserPatch = z.input<typeof userPatch>;
