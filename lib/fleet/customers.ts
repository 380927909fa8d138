import { z } from 'zod';

const text = (max: number) => z.string().trim().max(max, `must be at most ${max} characters`);

export const customerInput = z.strictObject({
  name: text(120).min(1, 'must not be empty'),
  notes: text(4000).default(''),
});

export const contactInput = z.strictObject({
  name: text(120).min(1, 'must not be empty'),
  email: z.union([z.literal(''), z.email({ error: 'must be an e-mail address' })]).default(''),
  phone: text(40).default(''),
  position: text(120).default(''),
  /** The report goes to this person. */
  receivesReports: z.boolean().default(false),
});

export const siteInput = z.strictObject({
  customerId: z.uuid({ error: 'must be chosen' }),
  name: text(120).min(1, 'must not be empty'),
  address: text(400).default(''),
  /** Slab, isolation pads, anchoring, grout. */
  floorNotes: text(4000).default(''),
  accessNotes: text(4000).default(''),
});
