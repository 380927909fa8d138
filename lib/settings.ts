import { z } from 'zod';

/** A user's own settings: the unit system every value is shown and entered in. */
export const unitPreference = z.strictObject({ unitSystem: z.enum(['inch', 'metric'], { error: 'must be "inch" or "metric"' }) });
export type UnitPreference = z.infer<typeof unitPreference>;
