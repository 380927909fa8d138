// Worked examples; each expected date is counted by hand on the Gregorian calendar and matches PostgreSQL's `date + interval 'N months'`.
/** Shared by the unit test and the PostgreSQL cross-check in tests/integration/due.test.ts. */
export const MONTH_CASES: [string, number, string, string][] = [
  ['2025-01-31', 1, '2025-02-28', 'clamped to the end of February in a common year'],
  ['2024-01-31', 1, '2024-02-29', 'clamped to 29 February in a leap year'],
  ['2024-02-29', 12, '2025-02-28', 'a leap day plus a year lands on 28 February'],
  ['2024-02-29', 48, '2028-02-29', 'a leap day plus four years is a leap day again'],
  ['2099-02-28', 12, '2100-02-28', '2100 is no leap year: 28 February stays'],
  ['1999-08-31', 6, '2000-02-29', '2000 is a leap year (divisible by 400)'],
  ['2025-03-31', 6, '2025-09-30', 'September has 30 days'],
  ['2025-05-31', 9, '2026-02-28', 'nine months from a 31st into February'],
  ['2025-06-15', 9, '2026-03-15', 'an ordinary day keeps its number'],
  ['2025-11-30', 3, '2026-02-28', 'crossing the year into February'],
  ['2025-12-31', 12, '2026-12-31', 'twelve months is the same day next year'],
  ['2025-08-31', 1, '2025-09-30', 'August 31 to September 30'],
  ['2025-01-15', 0, '2025-01-15', 'zero months changes nothing'],
  ['2025-03-31', -1, '2025-02-28', 'backwards clamps the same way'],
];
