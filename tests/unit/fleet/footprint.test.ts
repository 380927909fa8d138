import { describe, expect, it } from 'vitest';
import { footprintInput, footprintTemplate, pitchMmOf, type ScrewInput } from '@/lib/fleet/footprint';

const messages = (screws: unknown) => {
  const res = footprintInput.safeParse(screws);
  return res.success ? [] : res.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
};

describe('footprint templates', () => {
  it.each([4, 6, 8] as const)('the %i-screw layout is a valid footprint with that many screws', (n) => {
    const screws = footprintTemplate(n, 2000, 1600);
    expect(screws).toHaveLength(n);
    expect(messages(screws)).toEqual([]);
    expect(screws.filter((s) => s.kind === 'corner')).toHaveLength(4);
  });

  it('puts the corners at ±half the spans (+x right, +y back)', () => {
    const [fl, fr, rl, rr] = footprintTemplate(4, 2000, 1600);
    expect([fl, fr, rl, rr].map((s) => [s!.label, s!.xMm, s!.yMm])).toEqual([
      ['FL', -1000, -800],
      ['FR', 1000, -800],
      ['RL', -1000, 800],
      ['RR', 1000, 800],
    ]);
  });
});

describe('thread pitch', () => {
  it('8 threads per inch is 3.175 mm (1-8 UNC: 0.125 in pitch, ASME B1.1; 1 in = 25.4 mm exactly, NIST)', () => {
    expect(pitchMmOf({ unit: 'tpi', value: 8 })).toBeCloseTo(3.175, 12);
    expect(pitchMmOf({ unit: 'mm', value: 3 })).toBe(3); // M24 coarse, ISO 261
  });
});

describe('impossible layouts are refused with a clear message', () => {
  const base = footprintTemplate(4, 2000, 1600);
  const at = (i: number, patch: Partial<ScrewInput>) => base.map((s, j) => (j === i ? { ...s, ...patch } : s));

  it('fewer than 3 screws', () => {
    expect(messages(base.slice(0, 2))).toEqual([': needs at least 3 leveling screws']);
  });

  it('all screws on one line', () => {
    const line = [0, 500, 1000, 1500].map((x, i) => ({ ...base[i]!, xMm: x, yMm: 0 }));
    expect(messages(line)).toEqual([': the screws lie on one line, so they cannot hold a plane']);
  });

  it('two screws with the same label', () => {
    expect(messages(at(1, { label: 'fl' }))).toContain('1.label: "fl" is used twice (screws 1 and 2)');
  });

  it('two screws on the same spot', () => {
    expect(messages(at(1, { xMm: -990, yMm: -800 }))[0]).toMatch(/^1\.xMm: FR is 10 mm from FL; screws must be at least 50 mm apart$/);
  });

  it('a pitch no leveling screw has, and a zero one', () => {
    expect(messages(at(0, { thread: { unit: 'tpi', value: 1 } }))[0]).toMatch(/^0\.thread\.value: gives a pitch of 25\.400 mm/);
    expect(messages(at(0, { thread: { unit: 'mm', value: 0 } }))).toContain('0.thread.value: must be greater than zero');
  });

  it('a position that is not a number', () => {
    expect(messages(at(2, { xMm: Number.NaN }))).toContain('2.xMm: must be a number');
  });
});
