import { describe, expect, it } from 'vitest';
import type { SessionEvent } from '@/lib/session/events';
import { buildReplayIndex, offsetOfSeq, seqAtOffset, stageMarkers } from '@/lib/session/replay';
import { advance, duration, elapsed, fractionOf, realOffsetOf, shownCount, stepSeq, timelineOf } from '@/components/replay/player-clock';

const T0 = Date.UTC(2026, 2, 3, 8, 0, 0);
const ev = (seq: number, atMs: number, type: SessionEvent['type'] = 'note:posted', payload: object = { text: `n${seq}` }): SessionEvent =>
  ({ sessionId: 's', seq, id: `e${seq}`, type, payload, actorId: 'u', actorRole: 'technician', clientTs: null, serverTs: new Date(T0 + atMs).toISOString(), prevHash: '', hash: '' }) as SessionEvent;

const screws = [{ id: 'a', label: 'A', kind: 'corner', xMm: 0, yMm: 0, liftPerTurnMm: 3, specifiedHeightMm: null }];
/** Events at 0, 10 s, 20 s, then a lunch break of 45 min, 10 s more, then a 3-day wait for the reviewer. */
const log = [
  ev(1, 0, 'session:opened', { machineId: 'm', levelDivisionUrad: 20, travelMm: 500, screws }),
  ev(2, 10_000, 'stage:entered', { stage: 'rough-level' }),
  ev(3, 20_000),
  ev(4, 20_000 + 45 * 60_000, 'stage:entered', { stage: 'twist' }),
  ev(5, 30_000 + 45 * 60_000),
  ev(6, 30_000 + 45 * 60_000 + 3 * 86_400_000, 'review:commented', { atSeq: 3, text: 'why?' }),
];
const index = buildReplayIndex(log);

describe('the replay timeline', () => {
  it('cuts every pause longer than the limit to the limit, and counts what it cut', () => {
    const { clock, totalMs, shortened } = timelineOf(index, 60_000);
    expect([...clock.offsetsMs]).toEqual([0, 10_000, 20_000, 80_000, 90_000, 150_000]);
    expect(totalMs).toBe(150_000);
    expect(shortened).toEqual({ count: 2, savedMs: 45 * 60_000 - 60_000 + 3 * 86_400_000 - 60_000 });
    // The real offsets stay on the index itself.
    expect(index.offsetsMs[5]).toBe(30_000 + 45 * 60_000 + 3 * 86_400_000);
  });

  it('works with lib/session/replay’s seeking on the shortened axis', () => {
    const { clock } = timelineOf(index, 60_000);
    expect(seqAtOffset(clock, 79_999)).toBe(3);
    expect(seqAtOffset(clock, 80_000)).toBe(4);
    expect(offsetOfSeq(clock, 5)).toBe(90_000);
    expect(stageMarkers(clock).map((m) => [m.stage, m.seq, m.offsetMs])).toEqual([
      ['prepare', 1, 0],
      ['rough-level', 2, 10_000],
      ['twist', 4, 80_000],
    ]);
  });

  it('leaves a log without long pauses as it is', () => {
    const { clock, shortened } = timelineOf(index, 10 * 86_400_000);
    expect([...clock.offsetsMs]).toEqual([...index.offsetsMs]);
    expect(shortened).toEqual({ count: 0, savedMs: 0 });
  });

  it('handles an empty log', () => {
    const empty = timelineOf(buildReplayIndex([]));
    expect(empty.totalMs).toBe(0);
    expect(stepSeq(empty.clock, 0, 1)).toBe(0);
    expect(fractionOf(0, 0)).toBe(0);
  });
});

describe('the player', () => {
  it('advances by wall time × speed and stops at the end', () => {
    expect(advance(1000, 50, 1, 10_000)).toEqual({ offsetMs: 1050, ended: false });
    expect(advance(1000, 50, 16, 10_000)).toEqual({ offsetMs: 1800, ended: false });
    expect(advance(9_900, 50, 4, 10_000)).toEqual({ offsetMs: 10_000, ended: true });
    // A clock that went backwards (a throttled tab) does not move the player back.
    expect(advance(1000, -30, 4, 10_000)).toEqual({ offsetMs: 1000, ended: false });
  });

  it('steps one event at a time, 0 standing before the first, stopping at the last', () => {
    expect(stepSeq(index, 0, 1)).toBe(1);
    expect(stepSeq(index, 1, 1)).toBe(2);
    expect(stepSeq(index, 6, 1)).toBe(6);
    expect(stepSeq(index, 6, -1)).toBe(5);
    expect(stepSeq(index, 1, -1)).toBe(0);
    expect(stepSeq(index, 0, -1)).toBe(0);
  });

  it('reads out the count shown and the real elapsed time', () => {
    expect(shownCount(index, 0)).toBe(0);
    expect(shownCount(index, 4)).toBe(4);
    expect(realOffsetOf(index, 4)).toBe(20_000 + 45 * 60_000);
    expect(elapsed(realOffsetOf(index, 4))).toBe('00:45:20');
    expect(elapsed(realOffsetOf(index, 6))).toBe('72:45:30');
    expect(elapsed(-5)).toBe('00:00:00');
  });

  it('says a length of time in words', () => {
    expect(duration(45_000)).toBe('45 s');
    expect(duration(44 * 60_000)).toBe('44 min');
    expect(duration(72 * 60_000)).toBe('1 h 12 min');
    expect(duration(3 * 86_400_000)).toBe('3 days');
  });

  it('places offsets on the timeline between 0 and 1', () => {
    expect(fractionOf(45_000, 150_000)).toBeCloseTo(0.3, 12);
    expect(fractionOf(-1, 150_000)).toBe(0);
    expect(fractionOf(200_000, 150_000)).toBe(1);
  });
});
