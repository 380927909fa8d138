import { z } from 'zod';

export const sessionParams = z.object({ id: z.uuid({ error: 'must be a UUID' }) });
export const eventsQuery = z.object({
  after: z.coerce.number({ error: 'must be a number' }).int('must be a whole number').min(0, 'must be 0 or more').default(0),
});
