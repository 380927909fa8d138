import { z } from 'zod';

export const exportQuery = z.object({
  format: z.enum(['json', 'csv'], { error: 'must be "json" or "csv"' }).default('json'),
});
