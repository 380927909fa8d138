import type { Role } from '@/db/schema';
import { daysBetween } from '@/lib/dates';
import { AppError } from '@/lib/errors';

export type CalibrationStatus = 'current' | 'due-soon' | 'expired';

/** Days before the due date from which an instrument shows as due soon. */
export const DUE_SOON_DAYS = 30;

/**
 * The calibration status of an instrument on `today`. The due date is the last day the certificate
 * covers: on the due date itself the instrument is still usable ('due-soon' when within `soonDays`),
 * and it is 'expired' from the day after. 'due-soon' means 0 to `soonDays` days left, both ends
 * included; more than `soonDays` days left is 'current'. Dates are `YYYY-MM-DD` calendar dates.
 */
export function calibrationStatus(dueOn: string, today: string, soonDays = DUE_SOON_DAYS): CalibrationStatus {
  const left = daysBetween(today, dueOn);
  if (left < 0) return 'expired';
  return left <= soonDays ? 'due-soon' : 'current';
}

/** An admin's written permission to use an instrument past its due date. */
export type CalibrationOverride = { byRole: Role; reason: string };

/** Shortest written reason an override needs. */
export const MIN_OVERRIDE_REASON = 10;

/**
 * Checks that an instrument may be chosen for a visit on `today`. An expired one (see calibrationStatus)
 * is refused with a 409 `conflict:calibration` naming its serial and due date, unless an admin overrides
 * it with a written reason of at least 10 characters; a retired instrument is always refused.
 * Returns the status and whether the override was needed (the caller records the reason when it was).
 */
export function assertUsable(
  instrument: { serial: string; calibrationDue: string; active?: boolean },
  today: string,
  override?: CalibrationOverride | null,
): { status: CalibrationStatus; overridden: boolean } {
  if (instrument.active === false) {
    throw new AppError('conflict:instrument', `Instrument ${instrument.serial} is retired and cannot be used`);
  }
  const status = calibrationStatus(instrument.calibrationDue, today);
  if (status !== 'expired') return { status, overridden: false };
  const refused = `Instrument ${instrument.serial} was due for calibration on ${instrument.calibrationDue}`;
  if (!override) {
    throw new AppError('conflict:calibration', `${refused}; an admin may allow it with a written reason`);
  }
  if (override.byRole !== 'admin') {
    throw new AppError('conflict:calibration', `${refused}; only an admin may allow it (not a ${override.byRole})`);
  }
  if (override.reason.trim().length < MIN_OVERRIDE_REASON) {
    throw new AppError(
      'conflict:calibration',
      `${refused}; the override needs a written reason of at least ${MIN_OVERRIDE_REASON} characters`,
      'overrideReason',
    );
  }
  return { status, overridden: true };
}
