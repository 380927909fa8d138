import { describe, expect, it } from 'vitest';
import type { SessionEvent } from '@/lib/session/events';
import { foldEvents, initialState } from '@/lib/session/fold';
import { firstGap, mergeEvents } from '@/lib/session/merge';

const ev = (seq: number, type: SessionEvent['type'], payload: object): SessionEvent =>
  ({ sessionId: 's', seq, id: `e${seq}`, type, payload, actorId: 'u', actorRole: 'technician', clientTs: null, serverTs: `2026-01-01T00:00:0${seq % 10}.000Z`, prevHash: '', hash: '' }) as SessionEvent;

const level = (seq: number, axis: 'x' | 'y', divisions: number) => ev(seq, 'reading:recorded', { kind: 'level', axis, positionMm: 0, divisions, slopeUrad: divisions * 20 });

describe('session fold', () => {
  it('starts empty and takes the level sensitivity from session:opened', () => {
    expect(foldEvents([])).toEqual(initialState);
    expect(foldEvents([ev(1, 'session:opened', { machineId: 'm', levelDivisionUrad: 50 })]).levelDivisionUrad).toBe(50);
  });

  it('keeps every reading in order and the latest slope per axis', () => {
    const s = foldEvents([ev(1, 'session:opened', { machineId: 'm', levelDivisionUrad: 20 }), level(2, 'x', 1), level(3, 'y', -2), level(4, 'x', 0.5)]);
    expect(s.readings.map((r) => r.seq)).toEqual([2, 3, 4]);
    expect(s).toMatchObject({ seq: 4, slopeXUrad: 10, slopeYUrad: -40 });
  });

  it('ignores an event it has already applied, so a replayed broadcast changes nothing', () => {
    const once = foldEvents([level(1, 'x', 1), level(2, 'x', 2)]);
    expect(foldEvents([level(2, 'x', 2)], once)).toBe(once);
  });
});

describe('merging a live log', () => {
  it('appends new events in seq order and drops duplicates', () => {
    const log = [level(1, 'x', 1), level(2, 'x', 1)];
    const merged = mergeEvents(log, [level(4, 'x', 1), level(3, 'x', 1), level(2, 'x', 1), level(4, 'x', 1)]);
    expect(merged.map((e) => e.seq)).toEqual([1, 2, 3, 4]);
  });

  it('returns the same array when nothing is new (no re-render)', () => {
    const log = [level(1, 'x', 1)];
    expect(mergeEvents(log, [level(1, 'x', 1)])).toBe(log);
  });

  it('fills a late event into a gap and reports gaps', () => {
    const log = [level(1, 'x', 1), level(3, 'x', 1)];
    expect(firstGap(log)).toBe(2);
    const filled = mergeEvents(log, [level(2, 'x', 1)]);
    expect(filled.map((e) => e.seq)).toEqual([1, 2, 3]);
    expect(firstGap(filled)).toBeNull();
  });
});
