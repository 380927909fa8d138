import { z } from 'zod';
import { footprintInput } from './footprint';

const mm = (max: number) => z.number({ error: 'must be a number' }).finite().positive('must be greater than zero').max(max, `must be at most ${max} mm`);
// PostgreSQL has no year 0000 (1 BC comes before AD 1): such a date would fail at the insert, not here.
const isoDate = z.iso.date({ error: 'must be a date (YYYY-MM-DD)' }).refine((d) => !d.startsWith('0000'), 'must be a date (YYYY-MM-DD) from year 1');

/** A machine as the form, the route and the CSV import give it; lengths in mm, slopes in µrad, sweep in µm. */
export const machineInput = z.strictObject({
  siteId: z.uuid({ error: 'must be chosen' }),
  model: z.string().trim().min(1, 'must not be empty').max(120, 'must be at most 120 characters'),
  serial: z.string().trim().min(1, 'must not be empty').max(60, 'must be at most 60 characters'),
  tableLengthMm: mm(20_000),
  tableWidthMm: mm(10_000),
  travelXMm: mm(20_000),
  travelYMm: mm(10_000),
  travelZMm: mm(5_000),
  checkIntervalMonths: z.number({ error: 'must be a number' }).int('must be a whole number of months').min(1, 'must be at least 1 month').max(36, 'must be at most 36 months'),
  priorLeveledOn: isoDate.nullish(),
  twistTolUrad: z.number({ error: 'must be a number' }).finite().positive('must be greater than zero').max(1000).nullish(),
  bowTolUrad: z.number({ error: 'must be a number' }).finite().positive('must be greater than zero').max(1000).nullish(),
  sweepTolUm: z.number({ error: 'must be a number' }).finite().positive('must be greater than zero').max(1000).nullish(),
  screws: footprintInput,
});
export type MachineInput = z.infer<typeof machineInput>;

export const machinePatch = machineInput.partial();
export type MachinePatch = z.infer<typeof machinePatch>;

export const MACHINE_SORTS = ['model', 'serial', 'customer', 'site', 'screws'] as const;
