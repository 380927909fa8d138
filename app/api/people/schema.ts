import { z } from 'zod';
import { ROLES } from '@/app/api/users/schema';

/** `?role=expert`: only people of that role. */
export const peopleQuery = z.object({ role: z.enum(ROLES, { error: `must be one of ${ROLES.join(', ')}` }).optional() });
