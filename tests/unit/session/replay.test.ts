import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { SessionEvent } from '@/lib/session/events';
import { foldEvents } from '@/lib/session/fold';
import { buildReplayIndex, countThrough, offsetOfSeq, seqAtOffset, stageMarkers, stateAt } from '@/lib/session/replay';

const at = (seq: number) => new Date(Date.UTC(2026, 0, 1) + seq * 1500).toISOString();
const ev = (seq: number, type: SessionEvent['type'], payload: object): SessionEvent =>
  ({ sessionId: 's', seq, id: `e${seq}`, type, payload, actorId: 'u', actorRole: 'technician', clientTs: null, serverTs: at(seq), prevHash: '', hash: '' }) as SessionEvent;

const screws = [{ id: 'a', label: 'A', kind: 'corner', xMm: 0, yMm: 0, liftPerTurnMm: 3, specifiedHeightMm: null }];
const STAGES = ['rough-level', 'twist', 'bow'] as const;

/** A log of `n` events of every kind the fold knows, deterministic from `n`. */
function logOf(n: number): SessionEvent[] {
  const out: SessionEvent[] = [ev(1, 'session:opened', { machineId: 'm', levelDivisionUrad: 20, travelMm: 500, screws })];
  for (let seq = 2; seq <= n; seq++) {
    const k = seq % 7;
    if (k === 0) out.push(ev(seq, 'stage:entered', { stage: STAGES[seq % 3] }));
    else if (k === 1) out.push(ev(seq, 'move:sent', { moveId: `m${seq}`, screwId: 'a', stage: 'twist', raiseUm: 10, turns: 0.01, degrees: 4, recommended: true }));
    else if (k === 2 && seq > 3) out.push(ev(seq, 'move:answered', { moveId: `m${seq - 1}`, outcome: 'done', turns: 0.01, raiseUm: 10 }));
    else if (k === 3) out.push(ev(seq, 'check:marked', { stage: 'prepare', item: `i${seq % 5}`, done: seq % 2 === 0 }));
    else if (k === 4) out.push(ev(seq, 'note:posted', { text: `n${seq}` }));
    else out.push(ev(seq, 'reading:recorded', { kind: 'level', axis: seq % 2 ? 'x' : 'y', positionMm: 0, divisions: seq % 9, slopeUrad: (seq % 9) * 20 }));
  }
  return out;
}

describe('replay index', () => {
  it('gives at every seq the same state as a fold of the log up to it (property, small snapshot spacing)', () => {
    const log = logOf(400);
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 60 }), fc.integer({ min: 0, max: 400 }), (every, seq) => {
        const index = buildReplayIndex(log, every);
        expect(stateAt(index, seq)).toEqual(foldEvents(log.slice(0, seq)));
      }),
      { numRuns: 150 },
    );
  });

  it('does not change a snapshot or an earlier answer when seeking back and forth', () => {
    const log = logOf(1000);
    const index = buildReplayIndex(log, 100);
    const early = stateAt(index, 150);
    const frozen = structuredClone(early);
    stateAt(index, 990);
    stateAt(index, 151);
    expect(early).toEqual(frozen);
    expect(stateAt(index, 150)).toEqual(frozen);
    expect(index.snapshots).toHaveLength(10);
  });

  it('maps the player clock to seqs and back, and marks where each stage began', () => {
    const log = logOf(50);
    const index = buildReplayIndex(log);
    expect(seqAtOffset(index, -1)).toBe(0);
    expect(seqAtOffset(index, 0)).toBe(1);
    expect(seqAtOffset(index, 1499)).toBe(1);
    expect(seqAtOffset(index, 1500 * 10)).toBe(11);
    expect(offsetOfSeq(index, 11)).toBe(15_000);
    expect(countThrough(index, 1e9)).toBe(50);
    const markers = stageMarkers(index);
    expect(markers[0]).toMatchObject({ stage: 'prepare', seq: 1, offsetMs: 0 });
    expect(markers.slice(1).map((m) => m.seq)).toEqual(log.filter((e) => e.type === 'stage:entered').map((e) => e.seq));
  });

  it('refuses a spacing that is not a whole number of events', () => {
    expect(() => buildReplayIndex([], 0)).toThrow(/whole number/);
  });
});

describe('session fold: review', () => {
  const opened = ev(1, 'session:opened', { machineId: 'm', levelDivisionUrad: 20 });
  const sig = { width: 300, height: 100, strokes: [[10, 10, 50, 60]] };

  it('follows the record from live to ended, in review, returned, live again for rework, ended and approved', () => {
    const steps: [SessionEvent, string][] = [
      [opened, 'live'],
      [ev(2, 'session:ended', {}), 'ended'],
      [ev(3, 'review:commented', { atSeq: 1, text: 'why no reversal?' }), 'in_review'],
      [ev(4, 'review:returned', { reasons: ['reversal test missing'] }), 'returned'],
      [ev(5, 'session:resumed', {}), 'live'],
      [ev(6, 'session:ended', {}), 'ended'],
      [ev(7, 'review:approved', { name: 'R. Reviewer', signature: sig }), 'approved'],
    ];
    let s = foldEvents([]);
    for (const [e, status] of steps) {
      s = foldEvents([e], s);
      expect(s.status).toBe(status);
      if (status === 'live' && e.type === 'session:resumed') expect(s.ended).toBeNull();
    }
    expect(s.review.comments).toEqual([{ seq: 3, at: at(3), actorId: 'u', atSeq: 1, text: 'why no reversal?' }]);
    expect(s.review.returns.map((r) => r.reasons)).toEqual([['reversal test missing']]);
    expect(s.review.resumes.map((r) => r.seq)).toEqual([5]);
    expect(s.review.approval).toMatchObject({ seq: 7, name: 'R. Reviewer', signature: sig });
  });
});
