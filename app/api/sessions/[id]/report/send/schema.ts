import { z } from 'zod';

/** How long the read-only link works, in days (default: REPORT_LINK_DAYS, else 14). */
export const sendReportInput = z.strictObject({
  days: z.number({ error: 'must be a number of days' }).int('must be a whole number of days').min(1, 'must be at least 1 day').max(90, 'must be at most 90 days').optional(),
});
export type SendReportInput = z.input<typeof sendReportInput>;
