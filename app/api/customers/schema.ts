import { z } from 'zod';
import { contactInput, customerInput, siteInput } from '@/lib/fleet/customers';
import { patchOf } from '@/lib/http';

export { contactInput, customerInput } from '@/lib/fleet/customers';
export const idParams = z.object({ id: z.uuid({ error: 'must be a UUID' }) });
export const nameQuery = z.object({ q: z.string().trim().max(200, 'must be at most 200 characters').default('') });

/** PATCH bodies: only the keys named change (PATCH /api/customers/:id, /api/contacts/:id, /api/sites/:id). */
export const customerPatch = patchOf(customerInput);
export const contactPatch = patchOf(contactInput);
export const sitePatch = patchOf(siteInput.omit({ customerId: true }));
