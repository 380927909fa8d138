/**
 * When a machine is next due for leveling: its check interval in months after its last leveling.
 * Plain calendar dates (YYYY-MM-DD, proleptic Gregorian); no clocks read here, `today` is passed in.
 */

export type DueStatus = 'overdue' | 'due-soon' | 'ok';

/** One machine in the due list, as GET /api/due answers it. */
export type DueRow = {
  machineId: string;
  model: string;
  serial: string;
  customerName: string;
  siteName: string;
  checkIntervalMonths: number;
  /** The later of the last approved session's UTC day and the leveling on record from before Levelwire; null: never leveled. */
  lastLeveledOn: string | null;
  nextDueOn: string | null;
  status: DueStatus;
  /** The earliest open (scheduled or in progress) visit, ISO time, if one is booked. */
  nextVisitAt: string | null;
};

import { addDays, addMonths, parseDate } from '@/lib/dates';

/** The next check's date: `months` after the last leveling on `lastOn`. */
export function nextDueOn(lastOn: string, months: number): string {
  return addMonths(lastOn, months);
}

/** The last leveling: the later of the last approved session's day and the leveling on record from before Levelwire. */
export function lastLeveledOn(lastApprovedOn: string | null, priorLeveledOn: string | null): string | null {
  if (!lastApprovedOn) return priorLeveledOn;
  if (!priorLeveledOn) return lastApprovedOn;
  return lastApprovedOn > priorLeveledOn ? lastApprovedOn : priorLeveledOn;
}

/**
 * Overdue once the due day has passed; due soon from `soonDays` before it up to and including the day itself.
 * A machine never leveled (`null`) is due now and counts as overdue.
 */
export function dueStatus(nextDue: string | null, today: string, soonDays: number): DueStatus {
  if (nextDue === null) return 'overdue';
  parseDate(nextDue);
  if (nextDue < today) return 'overdue';
  if (nextDue <= addDays(today, soonDays)) return 'due-soon';
  return 'ok';
}
