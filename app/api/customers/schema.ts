import { z } from 'zod';

export { contactInput, customerInput } from '@/lib/fleet/customers';
export const idParams = z.object({ id: z.uuid({ error: 'must be a UUID' }) });
export const nameQuery = z.object({ q: z.string().trim().max(200, 'must be at most 200 characters').default('') });
