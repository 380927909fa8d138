import { unit } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { displayToMm, formatPosition, mmToDisplay } from '@/lib/display-units';

describe('values in the user’s units', () => {
  it('shows a station position signed, to 0.1 in or 1 mm (1 in = 25.4 mm exactly, NIST)', () => {
    expect(formatPosition(-250, 'inch')).toBe('-9.8 in');
    expect(formatPosition(250, 'inch')).toBe('+9.8 in');
    expect(formatPosition(250, 'metric')).toBe('+250 mm');
    expect(formatPosition(0, 'metric')).toBe('0 mm');
  });

  it('turns typed inches into mm as mathjs does, and back to 0.001 in', () => {
    for (const inches of [0.5, 12, 39.37, -82.677]) {
      expect(displayToMm(inches, 'inch')).toBeCloseTo(unit(inches, 'inch').toNumber('mm'), 9);
      expect(mmToDisplay(displayToMm(inches, 'inch'), 'inch')).toBeCloseTo(inches, 3);
    }
    expect(displayToMm(812.5, 'metric')).toBe(812.5);
    expect(mmToDisplay(812.54, 'metric')).toBe(812.5);
  });
});
