import { z } from 'zod';
import { DUE_SORTS } from '@/db/queries/due';
import { listQuery } from '@/lib/list-query';

export const DUE_STATUS_FILTERS = ['overdue', 'due-soon', 'ok', 'all'] as const;

/** GET /api/due: the list query, a status filter and the warning period (default: the organisation's reminder_days_before). */
export const dueListQuery = listQuery(DUE_SORTS, 'nextDue').extend({
  status: z.enum(DUE_STATUS_FILTERS, { error: `must be one of ${DUE_STATUS_FILTERS.join(', ')}` }).default('all'),
  soonDays: z.coerce.number({ error: 'must be a number' }).int('must be a whole number of days').min(0, 'must be 0 or more').max(365, 'must be at most 365').optional(),
});
