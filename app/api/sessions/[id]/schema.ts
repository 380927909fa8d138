import { z } from 'zod';
import { SESSION_STAGES } from '@/lib/session/stages';

export { addParticipantInput } from '@/lib/session/commands';

export const sessionParams = z.object({ id: z.uuid({ error: 'must be a UUID' }) });
export const eventsQuery = z.object({
  after: z.coerce.number({ error: 'must be a number' }).int('must be a whole number').min(0, 'must be 0 or more').default(0),
});

/** The text fields of a photo upload (multipart); the file itself is checked by its content. */
export const photoFields = z.strictObject({
  /** Made by the client: a resend with the same id stores the photo once. */
  id: z.uuid({ error: 'must be a UUID made by the client' }),
  stage: z.enum(SESSION_STAGES, { error: `must be one of ${SESSION_STAGES.join(', ')}` }),
  caption: z.string().trim().max(200, 'must be at most 200 characters').default(''),
});
export type PhotoFields = z.output<typeof photoFields>;

export const photoParams = z.object({ id: z.uuid({ error: 'must be a UUID' }), photoId: z.uuid({ error: 'must be a UUID' }) });
export const photoQuery = z.object({ size: z.enum(['thumb', 'full'], { error: 'must be "thumb" or "full"' }).default('full') });
