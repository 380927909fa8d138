import { evaluate, unit } from 'mathjs';
import { describe, expect, it } from 'vitest';
import type { SessionEvent, SessionTolerances } from '@/lib/session/events';
import { foldEvents } from '@/lib/session/fold';
import { completedRounds, sessionSeries, withinTolerance } from '@/lib/session/series';
import type { SessionStage } from '@/lib/session/stages';

/** A small log builder: each call appends one event with the next seq. */
function log(tolerances: SessionTolerances = { levelUrad: 20, twistUrad: 20, bowUrad: 20, sweepTirUm: 12.7 }) {
  const events: SessionEvent[] = [];
  const add = (type: SessionEvent['type'], payload: object) => {
    const seq = events.length + 1;
    events.push({ sessionId: 's', seq, id: `e${seq}`, type, payload, actorId: 'u', actorRole: 'technician', clientTs: null, serverTs: new Date(Date.UTC(2026, 0, 1, 8, 0, seq)).toISOString(), prevHash: '', hash: '' } as SessionEvent);
    return seq;
  };
  const screws = [
    { id: 'fl', label: 'FL', kind: 'corner', xMm: -800, yMm: -400, liftPerTurnMm: 3, specifiedHeightMm: null },
    { id: 'fr', label: 'FR', kind: 'corner', xMm: 800, yMm: -400, liftPerTurnMm: 3, specifiedHeightMm: null },
    { id: 'rl', label: 'RL', kind: 'corner', xMm: -800, yMm: 400, liftPerTurnMm: 3, specifiedHeightMm: null },
    { id: 'rr', label: 'RR', kind: 'corner', xMm: 800, yMm: 400, liftPerTurnMm: 3, specifiedHeightMm: null },
  ];
  add('session:opened', { machineId: 'm', levelDivisionUrad: 20, travelMm: 500, tolerances, screws });
  return {
    events,
    stage: (stage: SessionStage) => add('stage:entered', { stage }),
    level: (stage: SessionStage, axis: 'x' | 'y', positionMm: number, slopeUrad: number) => add('reading:recorded', { kind: 'level', stage, axis, positionMm, divisions: 0, slopeUrad }),
    sweep: (stage: SessionStage, um: { frontUm: number; backUm: number; leftUm: number; rightUm: number }, diameterMm = 254) =>
      add('reading:recorded', { kind: 'sweep', stage, diameterMm, ...um }),
    moveDone: (stage: SessionStage, moveId: string) => {
      add('move:sent', { moveId, screwId: 'rl', stage, raiseUm: 30, turns: 0.01, degrees: 3.6, recommended: true });
      return add('move:answered', { moveId, outcome: 'done', turns: 0.01, raiseUm: 30 });
    },
  };
}

/** A slope as µrad from a ratio mathjs evaluates (rise over run is radians for small angles; TRADE.md §2). */
const urad = (ratio: string) => unit(evaluate(ratio) as number, 'rad').toNumber('urad');
/** A length in inches as µm (1 in = 25.4 mm exactly, NIST). */
const umOfIn = (inches: number) => unit(inches, 'inch').toNumber('um');

describe('sessionSeries', () => {
  it('takes tilt X and Y at the centre from a rough-level round (TRADE.md §4 metric example: 0.02 mm/m level, X +3 div, Y −2 div)', () => {
    const div = urad('0.02 mm / 1 m'); // 20 µrad per division (JIS B 7510 0.02 mm/m type)
    const l = log();
    l.stage('rough-level');
    l.level('rough-level', 'x', 0, 3 * div);
    const seqY = l.level('rough-level', 'y', 0, -2 * div);
    const series = sessionSeries(foldEvents(l.events));
    expect(series.tiltX.points).toEqual([{ seq: seqY, at: l.events[seqY - 1]!.serverTs, value: expect.closeTo(60, 9), stage: 'rough-level' }]);
    expect(series.tiltY.points.map((p) => p.value)).toEqual([expect.closeTo(-40, 9)]);
    // 60 µrad and −40 µrad both lie outside a one-division (20 µrad) level tolerance.
    expect(withinTolerance(series.tiltX, series.tiltX.points[0]!.value)).toBe(false);
    expect(withinTolerance(series.tiltY, -15)).toBe(true);
    expect(series.twist.points).toEqual([]);
  });

  it('gives the twist as the change of cross-slope along the travel (TRADE.md §5: +0.5 div and −0.5 div with a 0.0005 in/10 in level is 1 div, failing 0.0002 in/10 in)', () => {
    const div = urad('0.0005 inch / (10 inch)'); // 50 µrad
    const limit = urad('0.0002 inch / (10 inch)'); // 20 µrad, common trade practice
    const l = log({ levelUrad: 20, twistUrad: limit, bowUrad: limit, sweepTirUm: 12.7 });
    l.stage('twist');
    l.level('twist', 'x', -250, 0.5 * div);
    l.level('twist', 'x', 0, 0);
    l.level('twist', 'x', 250, -0.5 * div);
    l.level('twist', 'y', 0, 0);
    const { twist } = sessionSeries(foldEvents(l.events));
    expect(twist.points).toHaveLength(1);
    expect(twist.points[0]!.value).toBeCloseTo(div, 9);
    expect(twist.tolerance).toBeCloseTo(20, 9);
    expect(withinTolerance(twist, twist.points[0]!.value)).toBe(false);
  });

  it('gives the bow as the change of along-slope over the travel (TRADE.md §5: a slope change of 4e-5 is 40 µrad)', () => {
    const l = log();
    l.stage('bow');
    // Five stations, along-slope rising evenly from front to back by 4e-5 in all: a sag.
    [-250, -125, 0, 125, 250].forEach((pos, i) => l.level('bow', 'y', pos, -20 + i * 10));
    const { bow, tiltY } = sessionSeries(foldEvents(l.events));
    expect(bow.points.map((p) => p.value)).toEqual([expect.closeTo(urad('4e-5'), 9)]);
    expect(tiltY.points.map((p) => p.value)).toEqual([0]);
  });

  it('gives the four-point sweep TIR (TRADE.md §6 example on a 10 in circle: 0.0004 in, within 0.0005 in)', () => {
    const l = log({ levelUrad: 20, twistUrad: 20, bowUrad: 20, sweepTirUm: umOfIn(0.0005) });
    l.stage('spindle-sweep');
    l.sweep('spindle-sweep', { leftUm: 0, rightUm: umOfIn(0.0004), frontUm: umOfIn(0.00005), backUm: umOfIn(0.00035) }, unit(10, 'inch').toNumber('mm'));
    [-250, 0, 250].forEach((pos) => l.level('spindle-sweep', 'y', pos, 0));
    const { sweepTir } = sessionSeries(foldEvents(l.events));
    expect(sweepTir.points).toHaveLength(1);
    expect(sweepTir.points[0]!.value).toBeCloseTo(umOfIn(0.0004), 9); // 10.16 µm
    expect(withinTolerance(sweepTir, sweepTir.points[0]!.value)).toBe(true);
    expect(sweepTir.tolerance).toBeCloseTo(12.7, 9);
  });

  it('adds a point only for a completed round, one per round, split by moves answered done (common trade practice, no source: a round is moves then the readings that check them)', () => {
    const l = log();
    l.stage('rough-level');
    l.level('rough-level', 'x', 0, 60);
    expect(completedRounds(foldEvents(l.events))).toEqual([]); // Y at the centre not yet taken
    l.level('rough-level', 'y', 0, -40);
    l.level('rough-level', 'x', 0, 55); // retaken within the same round: replaces the first X
    const first = sessionSeries(foldEvents(l.events));
    expect(first.tiltX.points.map((p) => p.value)).toEqual([55]);
    l.moveDone('rough-level', 'm1');
    l.level('rough-level', 'x', 0, 10);
    const lastSeq = l.level('rough-level', 'y', 0, 5);
    const second = sessionSeries(foldEvents(l.events));
    expect(second.tiltX.points.map((p) => p.value)).toEqual([55, 10]);
    expect(second.tiltY.points.map((p) => [p.seq, p.value])).toEqual([[first.tiltY.points[0]!.seq, -40], [lastSeq, 5]]);
    expect(withinTolerance(second.tiltX, 10)).toBe(true);
  });

  it('orders points across stages by seq and keeps each stage to its own readings', () => {
    const l = log();
    l.stage('rough-level');
    l.level('rough-level', 'x', 0, 30);
    l.level('rough-level', 'y', 0, 0);
    l.stage('twist');
    l.level('twist', 'x', -250, 4);
    l.level('twist', 'x', 0, 2);
    l.level('twist', 'x', 250, -6);
    l.level('twist', 'y', 0, 1);
    const s = sessionSeries(foldEvents(l.events));
    expect(s.tiltX.points.map((p) => [p.stage, p.value])).toEqual([['rough-level', 30], ['twist', 2]]);
    expect(s.twist.points.map((p) => p.value)).toEqual([10]);
    expect(s.tiltX.points[0]!.seq).toBeLessThan(s.tiltX.points[1]!.seq);
  });
});
