// The virtual technician's decisions, played out in memory against a coach who sends the engine's moves.
import { describe, expect, it } from 'vitest';
import { DEFAULT_TOLERANCES } from '@/lib/leveling';
import type { SessionScrew } from '@/lib/session/events';
import { SESSION_STAGES } from '@/lib/session/stages';
import { commandIdOf, nameUuid, nextVirtualAction, pickDemoSeed, simulateDemo } from '@/lib/session/virtual-technician';
import { foldEvents, initialState } from '@/lib/session/fold';

// M24 coarse pitch 3 mm (ISO 261), the demo footprints' thread.
const screw = (id: string, kind: SessionScrew['kind'], xMm: number, yMm: number): SessionScrew => ({ id, label: id, kind, xMm, yMm, liftPerTurnMm: 3, specifiedHeightMm: 80 });
const corners = [screw('FL', 'corner', -900, -750), screw('FR', 'corner', 900, -750), screw('RL', 'corner', -900, 750), screw('RR', 'corner', 900, 750)];
const sixScrews = [...corners, screw('ML', 'middle', -900, 0), screw('MR', 'middle', 900, 0)];
const machine = (screws: SessionScrew[]) => ({ screws, travelMm: 500, tolerances: DEFAULT_TOLERANCES, levelDivisionUrad: 20 });

describe('nameUuid', () => {
  it('is a version 5, RFC 4122 variant UUID (RFC 9562 §5.5) and the same for the same name', () => {
    const id = nameUuid('a');
    expect(id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-5[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    expect(nameUuid('a')).toBe(id);
    expect(nameUuid('b')).not.toBe(id);
  });
  it('gives one id per decision point: the same action at the same seq, a new one at the next seq', () => {
    const a = { kind: 'stage', stage: 'twist' } as const;
    expect(commandIdOf('s', 7, a)).toBe(commandIdOf('s', 7, a));
    expect(commandIdOf('s', 8, a)).not.toBe(commandIdOf('s', 7, a));
  });
});

describe('nextVirtualAction', () => {
  const opened = (virtualSeed: number | null) =>
    foldEvents([
      { sessionId: 's', seq: 1, id: nameUuid('o'), type: 'session:opened', payload: { machineId: 'm', levelDivisionUrad: 20, travelMm: 500, screws: corners, virtualSeed }, actorId: null, actorRole: 'technician', clientTs: null, serverTs: new Date(0).toISOString(), prevHash: '', hash: '' },
    ]);
  it('does nothing in an ordinary session', () => {
    expect(nextVirtualAction(opened(null))).toBeNull();
    expect(nextVirtualAction(initialState)).toBeNull();
  });
  it('starts a demo by ticking the prepare list', () => {
    expect(nextVirtualAction(opened(3))).toEqual({ kind: 'check', stage: 'prepare', item: 'fixtures-off' });
  });
});

describe('a demo played out with the engine’s moves', () => {
  it.each([
    ['four corner screws', corners],
    ['four corners and two middle screws', sixScrews],
  ])('on %s, the picked seed walks every stage in order to a passing as-left within 12 rounds', (_name, screws) => {
    const m = machine(screws);
    const seed = pickDemoSeed(m);
    const run = simulateDemo(m, seed);
    expect(run).toMatchObject({ reachedAsLeft: true, stage: 'lock-as-left', detail: [] });
    expect(run.stages).toEqual([...SESSION_STAGES]);
    expect(run.rounds).toBeLessThanOrEqual(12);
    // The same seed plays out the same way (the simulator is seeded).
    expect(simulateDemo(m, seed)).toEqual(run);
  });

  it('waits for the coach when no moves come: a failing stage never moves on by itself', () => {
    const m = machine(corners);
    const run = simulateDemo(m, pickDemoSeed(m), { maxRounds: 0 });
    expect(run.reachedAsLeft).toBe(false);
    expect(run.rounds).toBe(0);
    expect(['rough-level', 'twist', 'twist-recheck']).toContain(run.stage);
    expect(run.detail.length).toBeGreaterThan(0);
  });
});
