import { z } from 'zod';

export { scheduleVisitInput, updateVisitInput, visitInstrumentInput, visitListQuery } from '@/lib/fleet/visits';

export const visitParams = z.object({ id: z.uuid({ error: 'must be a UUID' }) });
export const visitInstrumentParams = z.object({
  id: z.uuid({ error: 'must be a UUID' }),
  instrumentId: z.uuid({ error: 'must be a UUID' }),
});
