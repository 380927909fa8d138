/**
 * Calendar dates as `YYYY-MM-DD` strings (proleptic Gregorian, no time zone: a date is a date). Levelwire's
 * due dates and calibration dates are counted in UTC days; no clock is read here except by `todayUtc`.
 */
const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** A calendar date `YYYY-MM-DD` as numbers; throws a RangeError naming it when it is no such day. */
export function parseDate(iso: string): { y: number; m: number; d: number } {
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
  const { y, m, d } = parseDate(iso);
  const index = y * 12 + (m - 1) + months;
  const ny = Math.floor(index / 12);
  const nm = index - ny * 12 + 1;
  return format(ny, nm, Math.min(d, daysInMonth(ny, nm)));
}

/** `days` days after `iso` (negative for before). */
export function addDays(iso: string, days: number): string {
  const { y, m, d } = parseDate(iso);
  return new Date(Date.UTC(y, m - 1, d + days)).toISOString().slice(0, 10);
}

/** Whole days from `from` to `to` (negative when `to` is earlier). */
export function daysBetween(from: string, to: string): number {
  const day = (iso: string) => {
    const { y, m, d } = parseDate(iso);
    return Date.UTC(y, m - 1, d) / 86_400_000;
  };
  return day(to) - day(from);
}

/** Today's calendar date in UTC: the day the due list, reminders and calibration checks count from. */
export function todayUtc(now: Date = new Date()): string {
  return now.toISOString().slice(0, 10);
}
