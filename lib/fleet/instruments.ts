import { z } from 'zod';
import type { SlopeUnit } from '@/lib/leveling';

/** Slope units a level's sensitivity may be given in (lib/leveling's SlopeUnit). */
export const SLOPE_UNITS = ['urad', 'mm/m', 'um/m', 'in/in', 'in/10in', 'in/ft', 'arcsec'] as const satisfies readonly SlopeUnit[];

export const SLOPE_UNIT_LABELS: Record<SlopeUnit, string> = {
  urad: 'µrad',
  'mm/m': 'mm/m',
  'um/m': 'µm/m',
  'in/in': 'in/in',
  'in/10in': 'in/10 in',
  'in/ft': 'in/ft',
  arcsec: 'arc-seconds',
};

// PostgreSQL has no year 0000 (1 BC comes before AD 1): such a date would fail at the insert, not here.
const isoDate = z.iso
  .date({ error: (iss) => (iss.input == null || iss.input === '' ? 'enter a date' : 'must be a date (YYYY-MM-DD)') })
  .refine((d) => !d.startsWith('0000'), 'must be a date (YYYY-MM-DD) from year 1');
const positive = (max: number, unit: string) =>
  z.number({ error: 'must be a number' }).finite('must be a number').positive('must be greater than zero').max(max, `must be at most ${max} ${unit}`);

/** The fields of an instrument as the form and the routes take them; level and indicator fields are both optional here. */
const instrumentFields = {
  kind: z.enum(['level', 'indicator'], { error: 'must be "level" or "indicator"' }),
  model: z.string({ error: 'must be text' }).trim().min(1, 'must not be empty').max(120, 'must be at most 120 characters'),
  serial: z.string({ error: 'must be text' }).trim().min(1, 'must not be empty').max(60, 'must be at most 60 characters'),
  /** Level: slope per division in `sensitivityUnit`. */
  sensitivityValue: positive(100_000, 'per division').nullish(),
  sensitivityUnit: z.enum(SLOPE_UNITS, { error: `must be one of ${SLOPE_UNITS.join(', ')}` }).nullish(),
  vialCount: z.number({ error: 'must be a number' }).int('must be a whole number').min(1, 'must be 1 or more').max(4, 'must be at most 4').nullish(),
  /** Indicator: smallest graduation, µm, and range, mm. */
  resolutionUm: positive(1000, 'µm').nullish(),
  rangeMm: positive(1000, 'mm').nullish(),
  calibratedOn: isoDate.nullish(),
  calibrationDue: isoDate,
};

type Fields = { kind: 'level' | 'indicator'; sensitivityValue?: number | null; sensitivityUnit?: string | null; resolutionUm?: number | null; rangeMm?: number | null; calibratedOn?: string | null; calibrationDue: string };

/** A level needs its sensitivity and unit; an indicator its resolution and range; calibration cannot fall due before it was done. */
function checkKind(v: Fields, ctx: z.RefinementCtx) {
  const need = (path: keyof Fields, message: string) => ctx.addIssue({ code: 'custom', path: [path], message });
  if (v.kind === 'level') {
    if (v.sensitivityValue == null) need('sensitivityValue', 'a level needs its sensitivity per division');
    if (v.sensitivityUnit == null) need('sensitivityUnit', 'a level needs the unit of its sensitivity');
  } else {
    if (v.resolutionUm == null) need('resolutionUm', 'an indicator needs its resolution');
    if (v.rangeMm == null) need('rangeMm', 'an indicator needs its range');
  }
  if (v.calibratedOn && v.calibrationDue < v.calibratedOn) need('calibrationDue', 'must not be before the calibration date');
}

/** A new instrument (POST /api/instruments and the new-instrument form). */
export const instrumentInput = z.strictObject(instrumentFields).superRefine(checkKind);
export type InstrumentInput = z.output<typeof instrumentInput>;
export type InstrumentFormValues = z.input<typeof instrumentInput>;

/** A change to an instrument (PATCH); `active: false` retires it. Checked again whole once merged with the stored record. */
export const instrumentPatch = z
  .strictObject({ ...instrumentFields, active: z.boolean({ error: 'must be true or false' }) })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'name at least one field to change');
export type InstrumentPatch = z.output<typeof instrumentPatch>;

/** The stored columns of an instrument of this kind: the other kind's fields are cleared. */
export function instrumentColumns(v: InstrumentInput) {
  const level = v.kind === 'level';
  return {
    kind: v.kind,
    model: v.model,
    serial: v.serial,
    sensitivityValue: level ? (v.sensitivityValue ?? null) : null,
    sensitivityUnit: level ? (v.sensitivityUnit ?? null) : null,
    vialCount: level ? (v.vialCount ?? null) : null,
    resolutionUm: level ? null : (v.resolutionUm ?? null),
    rangeMm: level ? null : (v.rangeMm ?? null),
    calibratedOn: v.calibratedOn ?? null,
    calibrationDue: v.calibrationDue,
  };
}

/** The instrument list's sortable columns and filters (GET /api/instruments). */
export const INSTRUMENT_SORTS = ['model', 'serial', 'kind', 'calibrationDue'] as const;
/** `retired` lists the retired ones; the calibration statuses list active ones. */
export const INSTRUMENT_STATUSES = ['current', 'due-soon', 'expired', 'retired'] as const;
export type InstrumentStatusFilter = (typeof INSTRUMENT_STATUSES)[number];

/** An instrument as the routes answer it. */
export type InstrumentView = {
  id: string;
  kind: 'level' | 'indicator';
  model: string;
  serial: string;
  sensitivityValue: number | null;
  sensitivityUnit: SlopeUnit | null;
  vialCount: number | null;
  resolutionUm: number | null;
  rangeMm: number | null;
  calibratedOn: string | null;
  calibrationDue: string;
  status: 'current' | 'due-soon' | 'expired';
  active: boolean;
  certificate: { name: string; type: string; bytes: number } | null;
};

/** A stored file name made safe for a Content-Disposition header: plain ASCII, the extension of the detected type. */
export function safeFileName(name: string, extension: string): string {
  const base = (name.split(/[\\/]/).pop() ?? '')
    .replace(/\.[^.]*$/, '')
    .normalize('NFKD')
    .replace(/[^A-Za-z0-9 ._-]+/g, '')
    .replace(/\s+/g, ' ')
    .replace(/^[ .]+|[ .]+$/g, '')
    .slice(0, 80);
  return `${base || 'certificate'}.${extension}`;
}
