import { z } from 'zod';

/** `?units=inch|metric` overrides the reader's own unit preference for the figures. */
export const reportQuery = z.object({
  units: z.enum(['inch', 'metric'], { error: 'must be "inch" or "metric"' }).optional(),
});
