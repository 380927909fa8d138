import { z } from 'zod';

/** `?machineId=`: the organisation's machine the imported session belongs to, when not the log's own. */
export const importQuery = z.object({
  machineId: z.uuid({ error: 'must be a UUID' }).optional(),
});
