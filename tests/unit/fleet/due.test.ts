import { describe, expect, it } from 'vitest';
import { MONTH_CASES } from './due-cases';
import { dueStatus, lastLeveledOn, nextDueOn } from '@/lib/fleet/due';
import { addDays, addMonths, daysInMonth, isLeapYear, todayUtc } from '@/lib/dates';

// Calendar facts: the proleptic Gregorian calendar as ISO 8601 (clause 3.2.1) uses it — 30 days hath September,
// April, June and November; February has 28 days, 29 in a leap year; a year divisible by 4 is a leap year except
// centuries, which are leap years only when divisible by 400 (Gregorian reform, papal bull Inter gravissimas, 1582).
// Month arithmetic clamps to the last day of a shorter month as PostgreSQL documents for `date + interval`
// ("Date/Time Functions and Operators": date '2001-09-28' + interval '1 month'; month-end clamping in
// the notes on interval arithmetic); tests/integration/due.test.ts checks the same table against PostgreSQL itself.

describe('isLeapYear and daysInMonth (Gregorian rules)', () => {
  it.each([
    [2024, true, 'divisible by 4'],
    [2023, false, 'not divisible by 4'],
    [1900, false, 'century not divisible by 400'],
    [2000, true, 'century divisible by 400'],
    [2100, false, 'century not divisible by 400'],
  ])('%i is a leap year: %s (%s)', (y, leap) => {
    expect(isLeapYear(y)).toBe(leap);
    expect(daysInMonth(y, 2)).toBe(leap ? 29 : 28);
  });

  it('gives 30 days to April, June, September and November and 31 to the rest but February', () => {
    expect([1, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12].map((m) => daysInMonth(2025, m))).toEqual([31, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31]);
  });
});


describe('nextDueOn (month arithmetic clamped to the month end)', () => {
  it.each(MONTH_CASES)('%s + %i months = %s (%s)', (last, months, expected) => {
    expect(nextDueOn(last, months)).toBe(expected);
    expect(addMonths(last, months)).toBe(expected);
  });

  it('is not additive across month ends: (31 Jan + 1) + 1 differs from 31 Jan + 2', () => {
    expect(addMonths(addMonths('2025-01-31', 1), 1)).toBe('2025-03-28');
    expect(addMonths('2025-01-31', 2)).toBe('2025-03-31');
  });

  it.each(['2025-02-29', '2025-13-01', '2025-1-5', 'yesterday', '2025-04-31'])('refuses %s, which is no calendar date', (bad) => {
    expect(() => nextDueOn(bad, 9)).toThrow(RangeError);
  });

  it('refuses a fractional interval', () => {
    expect(() => nextDueOn('2025-01-01', 1.5)).toThrow(RangeError);
  });
});

describe('addDays', () => {
  it.each([
    ['2024-02-28', 1, '2024-02-29'],
    ['2025-02-28', 1, '2025-03-01'],
    ['2025-12-31', 1, '2026-01-01'],
    ['2025-03-01', -1, '2025-02-28'],
    ['2025-01-01', 365, '2026-01-01'],
    ['2024-01-01', 366, '2025-01-01'],
  ])('%s + %i days = %s', (from, days, expected) => expect(addDays(from, days)).toBe(expected));
});

describe('lastLeveledOn', () => {
  it('takes the later of the approved session and the prior record, either may be missing', () => {
    expect(lastLeveledOn('2025-06-01', '2025-03-01')).toBe('2025-06-01');
    expect(lastLeveledOn('2025-03-01', '2025-06-01')).toBe('2025-06-01');
    expect(lastLeveledOn(null, '2025-06-01')).toBe('2025-06-01');
    expect(lastLeveledOn('2025-06-01', null)).toBe('2025-06-01');
    expect(lastLeveledOn(null, null)).toBeNull();
  });
});

describe('dueStatus', () => {
  const today = '2026-03-10';
  it.each([
    ['2026-03-09', 14, 'overdue', 'the day after the due day'],
    ['2025-03-10', 14, 'overdue', 'a year past'],
    ['2026-03-10', 14, 'due-soon', 'due today is not yet overdue'],
    ['2026-03-24', 14, 'due-soon', 'exactly soonDays ahead'],
    ['2026-03-25', 14, 'ok', 'one day beyond soonDays'],
    ['2026-03-10', 0, 'due-soon', 'soonDays 0: only the day itself is due soon'],
    ['2026-03-11', 0, 'ok', 'soonDays 0: tomorrow is fine'],
    ['2026-04-09', 30, 'due-soon', 'thirty days across a 31-day March'],
  ] as [string, number, 'overdue' | 'due-soon' | 'ok', string][])('%s with %i days warning is %s (%s)', (due, soon, expected) => {
    expect(dueStatus(due, today, soon)).toBe(expected);
  });

  it('counts a machine never leveled as overdue (due now)', () => {
    expect(dueStatus(null, today, 14)).toBe('overdue');
  });

  it('crosses a leap day correctly', () => {
    expect(dueStatus('2024-03-14', '2024-02-28', 15)).toBe('due-soon');
    expect(dueStatus('2024-03-15', '2024-02-28', 15)).toBe('ok');
  });

  it('chains with nextDueOn: leveled 31 May 2025 with a 9-month interval is due 28 Feb 2026', () => {
    const due = nextDueOn('2025-05-31', 9);
    expect(dueStatus(due, '2026-02-28', 14)).toBe('due-soon');
    expect(dueStatus(due, '2026-03-01', 14)).toBe('overdue');
  });
});

describe('todayUtc', () => {
  it('is the UTC calendar day of an instant', () => {
    expect(todayUtc(new Date('2026-03-10T23:59:59Z'))).toBe('2026-03-10');
    expect(todayUtc(new Date('2026-03-10T23:30:00-02:00'))).toBe('2026-03-11');
  });
});
