import { describe, expect, it } from 'vitest';
import type { SessionEvent } from '@/lib/session/events';
import { applyEvent, foldEvents, initialState } from '@/lib/session/fold';
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

describe('session fold: the live session', () => {
  const opened = ev(1, 'session:opened', { machineId: 'm', levelDivisionUrad: 20, travelMm: 500, screws: [{ id: 'a', label: 'A', kind: 'corner', xMm: 0, yMm: 0, liftPerTurnMm: 3, specifiedHeightMm: null }] });

  it('follows the stage, files each reading under the stage it was taken in, and keeps the stage log', () => {
    const s = foldEvents([opened, ev(2, 'stage:entered', { stage: 'twist' }), level(3, 'x', 1), ev(4, 'stage:entered', { stage: 'bow' })]);
    expect(s.stage).toBe('bow');
    expect(s.stageLog.map((x) => x.stage)).toEqual(['prepare', 'twist', 'bow']);
    expect(s.readings[0]!.stage).toBe('twist');
  });

  it('tracks a move from sent to done with what was actually turned, and another to cannot with the reason', () => {
    const move = (seq: number, moveId: string) => ev(seq, 'move:sent', { moveId, screwId: 'a', stage: 'twist', raiseUm: 300, turns: 0.1, degrees: 36, recommended: true });
    const s = foldEvents([
      opened,
      move(2, 'm1'),
      move(3, 'm2'),
      ev(4, 'move:answered', { moveId: 'm1', outcome: 'done', turns: 0.08, raiseUm: 240 }),
      ev(5, 'move:answered', { moveId: 'm2', outcome: 'cannot', reason: 'jam nut seized' }),
    ]);
    expect(s.moves.map((m) => [m.moveId, m.status, m.doneTurns, m.reason])).toEqual([
      ['m1', 'done', 0.08, null],
      ['m2', 'cannot', null, 'jam nut seized'],
    ]);
  });

  it('keeps participants once each, notes, photos and the end', () => {
    const s = foldEvents([
      opened,
      ev(2, 'participant:added', { userId: 'u1', name: 'One', part: 'observer' }),
      ev(3, 'participant:added', { userId: 'u1', name: 'One', part: 'expert' }),
      ev(4, 'note:posted', { text: 'back left first' }),
      ev(5, 'photo:attached', { photoId: 'p', stage: 'prepare', caption: 'pads', contentType: 'image/png', bytes: 10, key: 'k', thumbKey: null }),
      ev(6, 'session:ended', {}),
    ]);
    expect(s.participants).toEqual([{ userId: 'u1', name: 'One', part: 'expert', seq: 3 }]);
    expect(s.notes.map((n) => n.text)).toEqual(['back left first']);
    expect(s.photos.map((p) => p.photoId)).toEqual(['p']);
    expect(s.ended).toMatchObject({ seq: 6, reason: null });
  });

  it('leaves the state it started from untouched (applyEvent copies before it changes anything)', () => {
    const a = foldEvents([opened]);
    const b = applyEvent(a, level(2, 'x', 1));
    expect(a.readings).toHaveLength(0);
    expect(b.readings).toHaveLength(1);
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
