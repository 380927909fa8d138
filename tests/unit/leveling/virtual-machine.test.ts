import { describe, expect, it } from 'vitest';
import { analyzeSweep, createVirtualMachine, randomFootprint, seededRandom } from '@/lib/leveling';

describe('seeded random numbers', () => {
  it('the same seed gives the same sequence; another seed another', () => {
    const a = seededRandom(42);
    const b = seededRandom(42);
    const c = seededRandom(43);
    const first = [a(), a(), a()];
    expect([b(), b(), b()]).toEqual(first);
    expect([c(), c(), c()]).not.toEqual(first);
    first.forEach((v) => expect(v >= 0 && v < 1).toBe(true));
  });
});

describe('virtual machine', () => {
  it('is deterministic for a seed: same footprint, readings and answers to moves', () => {
    const run = () => {
      const machine = createVirtualMachine({ seed: 7 });
      const readings = [machine.readLevel('x', 0, 0), machine.readLevel('y', 0, 300)];
      machine.applyMove(machine.screws[0]!.id, 200);
      return { screws: machine.screws, readings, after: machine.readLevel('x', 0, 0), truth: machine.trueState() };
    };
    expect(run()).toEqual(run());
  });

  it('draws footprints of four corners and two or four middle screws', () => {
    const random = seededRandom(3);
    for (let i = 0; i < 20; i++) {
      const { screws } = randomFootprint(random);
      expect(screws.filter((s) => s.kind === 'corner')).toHaveLength(4);
      expect([2, 4]).toContain(screws.filter((s) => s.kind === 'middle').length);
    }
  });

  it('reads the vial in half divisions, near the hidden slope', () => {
    const machine = createVirtualMachine({ seed: 11, asFound: { tiltXUrad: 93, twistUrad: 0 } });
    for (let i = 0; i < 50; i++) {
      const div = machine.readLevel('x', 0, 0);
      expect(Number.isInteger(div * 2)).toBe(true);
      expect(Math.abs(div * machine.divisionUrad - 93)).toBeLessThanOrEqual(machine.divisionUrad);
    }
  });

  it('loses the backlash when a screw reverses: down then up does not come back', () => {
    const machine = createVirtualMachine({ seed: 5, asFound: { tiltXUrad: 0, tiltYUrad: 0, twistUrad: 0, bowUrad: 0 } });
    const id = machine.screws.find((s) => s.kind === 'corner')!.id;
    machine.applyMove(id, 100);
    const up = machine.trueState().tiltXUrad;
    machine.applyMove(id, -100);
    const back = machine.trueState().tiltXUrad;
    expect(Math.abs(back)).toBeGreaterThan(0.01 * Math.abs(up));
    expect(Math.sign(back)).toBe(Math.sign(up));
  });

  it('a sweep read from the machine shows its hidden tram within the indicator noise', () => {
    const machine = createVirtualMachine({ seed: 9 });
    const truth = machine.trueState();
    const sweep = analyzeSweep(machine.readSweep(254));
    expect(Math.abs(sweep.xUrad - truth.sweepXUrad)).toBeLessThan(10);
    expect(Math.abs(sweep.yUrad - truth.sweepYUrad)).toBeLessThan(10);
  });
});
