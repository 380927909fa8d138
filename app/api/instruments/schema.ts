import { z } from 'zod';
import { listQuery } from '@/lib/list-query';
import { INSTRUMENT_SORTS, INSTRUMENT_STATUSES } from '@/lib/fleet/instruments';

export { instrumentInput, instrumentPatch } from '@/lib/fleet/instruments';

export const instrumentListQuery = listQuery(INSTRUMENT_SORTS, 'calibrationDue').extend({
  kind: z.enum(['level', 'indicator'], { error: 'must be "level" or "indicator"' }).optional(),
  status: z.enum(INSTRUMENT_STATUSES, { error: `must be one of ${INSTRUMENT_STATUSES.join(', ')}` }).optional(),
});

export const instrumentParams = z.object({ id: z.uuid({ error: 'must be a UUID' }) });
