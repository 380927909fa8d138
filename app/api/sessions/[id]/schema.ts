import { z } from 'zod';

export const sessionParams = z.object({ id: z.uuid({ error: 'id must be a UUID' }) });
export const eventsQuery = z.object({
  after: z.coerce.number({ error: 'after must be a number' }).int('after must be a whole number').min(0, 'after must be 0 or more').default(0),
});
