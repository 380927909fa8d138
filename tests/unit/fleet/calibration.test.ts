import { describe, expect, it } from 'vitest';
import { AppError } from '@/lib/errors';
import { assertUsable, calibrationStatus } from '@/lib/fleet/calibration';
import { addDays, todayUtc } from '@/lib/dates';

// The rule under test is Levelwire's own (no outside source): a calibration certificate's due date is the
// last day it covers, so an instrument is usable through its due date and expired from the next day;
// "due soon" is 0 to 30 days left inclusive. Calendar facts: 2024 is a leap year (Gregorian rule: divisible
// by 4, not by 100 unless by 400), so 2024-02-28 + 1 day is 2024-02-29; 2026 is not.
describe('calibrationStatus', () => {
  it.each([
    ['2026-03-10', '2026-03-10', 'due-soon', 'due today: still usable'],
    ['2026-03-10', '2026-03-11', 'expired', 'the day after the due date'],
    ['2026-03-10', '2027-03-10', 'expired', 'a year past'],
    ['2026-04-09', '2026-03-10', 'due-soon', 'exactly 30 days left'],
    ['2026-04-10', '2026-03-10', 'current', '31 days left'],
    ['2026-03-01', '2026-02-28', 'due-soon', 'across the end of February 2026'],
    ['2024-03-01', '2024-02-29', 'due-soon', 'from a leap day'],
    ['2027-01-01', '2026-12-31', 'due-soon', 'across a year end'],
  ] as const)('due %s seen on %s is %s (%s)', (due, today, expected, _why) => {
    expect(calibrationStatus(due, today)).toBe(expected);
  });

  it('takes the due-soon window as a parameter', () => {
    expect(calibrationStatus('2026-03-24', '2026-03-10', 14)).toBe('due-soon');
    expect(calibrationStatus('2026-03-25', '2026-03-10', 14)).toBe('current');
    expect(calibrationStatus('2026-03-10', '2026-03-10', 0)).toBe('due-soon');
    expect(calibrationStatus('2026-03-11', '2026-03-10', 0)).toBe('current');
  });

  it.each(['2026-02-30', '2026-3-1', '10/03/2026', ''])('refuses %j as a date', (bad) => {
    expect(() => calibrationStatus(bad, '2026-03-10')).toThrow(RangeError);
    expect(() => calibrationStatus('2026-03-10', bad)).toThrow(RangeError);
  });
});

describe('addDays and todayUtc', () => {
  it.each([
    ['2024-02-28', 1, '2024-02-29'],
    ['2026-02-28', 1, '2026-03-01'],
    ['2026-12-31', 1, '2027-01-01'],
    ['2026-03-01', -1, '2026-02-28'],
    ['2026-01-01', 365, '2027-01-01'],
  ] as const)('%s + %i days is %s', (from, days, expected) => {
    expect(addDays(from, days)).toBe(expected);
  });

  it('reads the calendar date in UTC', () => {
    expect(todayUtc(new Date('2026-03-10T23:59:59.999Z'))).toBe('2026-03-10');
    expect(todayUtc(new Date('2026-03-11T00:00:00Z'))).toBe('2026-03-11');
  });
});

describe('assertUsable', () => {
  const level = { serial: 'LV-2207', calibrationDue: '2026-03-10' };
  const codeOf = (fn: () => unknown) => {
    try {
      fn();
    } catch (e) {
      return e instanceof AppError ? { code: e.code, status: e.status, message: e.message } : e;
    }
    return null;
  };

  it('lets a current or due-soon instrument through without an override', () => {
    expect(assertUsable(level, '2026-01-01')).toEqual({ status: 'current', overridden: false });
    expect(assertUsable(level, '2026-03-10')).toEqual({ status: 'due-soon', overridden: false });
  });

  it('refuses an expired instrument with a 409 naming its serial and due date', () => {
    expect(codeOf(() => assertUsable(level, '2026-03-11'))).toMatchObject({
      code: 'conflict:calibration',
      status: 409,
      message: expect.stringMatching(/LV-2207.*2026-03-10/),
    });
  });

  it('accepts an admin override with a written reason of at least 10 characters', () => {
    expect(assertUsable(level, '2026-03-11', { byRole: 'admin', reason: 'Spare lost' })).toEqual({ status: 'expired', overridden: true });
  });

  it.each([
    ['a reason of 9 characters', { byRole: 'admin', reason: 'Spare los' }, /at least 10 characters/],
    ['a reason of spaces', { byRole: 'admin', reason: '            ' }, /at least 10 characters/],
    ['a technician’s override', { byRole: 'technician', reason: 'The only level on site' }, /only an admin/],
    ['an expert’s override', { byRole: 'expert', reason: 'The only level on site' }, /only an admin/],
  ] as const)('refuses %s', (_what, override, message) => {
    expect(codeOf(() => assertUsable(level, '2026-03-11', override))).toMatchObject({ code: 'conflict:calibration', status: 409, message: expect.stringMatching(message) });
  });

  it('refuses a retired instrument even when current', () => {
    expect(codeOf(() => assertUsable({ ...level, active: false }, '2026-01-01'))).toMatchObject({ code: 'conflict:instrument', status: 409 });
  });
});
