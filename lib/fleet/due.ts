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

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

function parse(iso: string): { y: number; m: number; d: number } {
  const match = ISO_DATE.exec(iso);
  if (!match) throw new RangeError(`not a calendar date (YYYY-MM-DD): ${iso}`);
  const [y, m, d] = [Number(match[1]), Number(match[2]), Number(match[3])];
  if (m < 1 || m > 12 || d < 1 || d > daysInMonth(y, m)) throw new RangeError(`no such day: ${iso}`);
  return { y, m, d };
}

const pad = (n: number, w = 2) => String(n).padStart(w, '0');
const format = (y: number, m: number, d: number) => `${pad(y, 4)}-${pad(m)}-${pad(d)}`;

/** Gregorian leap year: every 4th year, except centuries not divisible by 400. */
export function isLeapYear(y: number): boolean {
  return (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
}

export function daysInMonth(y: number, m: number): number {
  return [31, isLeapYear(y) ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][m - 1]!;
}

/** `months` calendar months after `iso`, clamped to the month's last day (31 Jan + 1 month = 28/29 Feb), as PostgreSQL's `date + interval`. */
export function addMonths(iso: string, months: number): string {
  if (!Number.isInteger(months)) throw new RangeError(`months must be a whole number: ${months}`);
  const { y, m, d } = parse(iso);
  const index = y * 12 + (m - 1) + months;
  const ny = Math.floor(index / 12);
  const nm = index - ny * 12 + 1;
  return format(ny, nm, Math.min(d, daysInMonth(ny, nm)));
}

/** `days` days after `iso` (negative for before). */
export function addDays(iso: string, days: number): string {
  const { y, m, d } = parse(iso);
  return new Date(Date.UTC(y, m - 1, d + days)).toISOString().slice(0, 10);
}

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
  parse(nextDue);
  if (nextDue < today) return 'overdue';
  if (nextDue <= addDays(today, soonDays)) return 'due-soon';
  return 'ok';
}

/** Today's calendar date in UTC: the day Levelwire's due list and reminders count from. */
export function todayUtc(now: Date): string {
  return now.toISOString().slice(0, 10);
}
