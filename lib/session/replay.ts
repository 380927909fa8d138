import type { SessionEvent } from './events';
import { applyAllInPlace, initialState, snapshotOf, type SessionState } from './fold';
import type { SessionStage } from './stages';

/**
 * Seeking in a replay: the log is folded once, keeping a snapshot every `every` events, so the state at any moment is
 * the nearest snapshot before it plus at most `every - 1` events, not a fold from the start. Snapshots share the
 * unchanged entries of their arrays (events only append or replace entries), so they cost pointers, not copies.
 */
export type ReplayIndex = {
  events: readonly SessionEvent[];
  every: number;
  /** snapshots[k]: the state after the first k × every events. */
  snapshots: SessionState[];
  /** Milliseconds from the first event, per event (the player's clock). */
  offsetsMs: Float64Array;
  startedAt: string | null;
  final: SessionState;
};

export const SNAPSHOT_EVERY = 250;

/** Folds the log once and keeps the snapshots; events must be the whole log in seq order from 1. */
export function buildReplayIndex(events: readonly SessionEvent[], every = SNAPSHOT_EVERY): ReplayIndex {
  if (!Number.isInteger(every) || every < 1) throw new RangeError('every must be a whole number of events, 1 or more');
  const snapshots: SessionState[] = [initialState];
  const d = snapshotOf(initialState);
  const offsetsMs = new Float64Array(events.length);
  const t0 = events.length ? Date.parse(events[0]!.serverTs) : 0;
  for (let i = 0; i < events.length; i += every) {
    const to = Math.min(events.length, i + every);
    applyAllInPlace(d, events, i, to);
    if (to % every === 0 && to < events.length) snapshots.push(snapshotOf(d));
  }
  for (let i = 0; i < events.length; i++) offsetsMs[i] = Date.parse(events[i]!.serverTs) - t0;
  return { events, every, snapshots, offsetsMs, startedAt: events[0]?.serverTs ?? null, final: d };
}

/** How many events have seq ≤ `seq` (binary search; seqs ascend). */
export function countThrough(index: ReplayIndex, seq: number): number {
  const { events } = index;
  let lo = 0;
  let hi = events.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (events[mid]!.seq <= seq) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** The session as it stood once the event `seq` had been applied (0: before the first event). */
export function stateAt(index: ReplayIndex, seq: number): SessionState {
  const n = countThrough(index, seq);
  if (n === index.events.length) return index.final;
  const k = Math.min(Math.floor(n / index.every), index.snapshots.length - 1);
  const d = snapshotOf(index.snapshots[k]!);
  applyAllInPlace(d, index.events, k * index.every, n);
  return d;
}

/** The seq of the last event at or before `ms` from the start (0 before the first). */
export function seqAtOffset(index: ReplayIndex, ms: number): number {
  const { offsetsMs, events } = index;
  let lo = 0;
  let hi = offsetsMs.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (offsetsMs[mid]! <= ms) lo = mid + 1;
    else hi = mid;
  }
  return lo === 0 ? 0 : events[lo - 1]!.seq;
}

/** Milliseconds from the start to the event `seq` (0 for seq 0). */
export function offsetOfSeq(index: ReplayIndex, seq: number): number {
  const n = countThrough(index, seq);
  return n === 0 ? 0 : index.offsetsMs[n - 1]!;
}

export type StageMarker = { stage: SessionStage; seq: number; offsetMs: number };

/** Where each stage was entered, for the timeline's markers. */
export function stageMarkers(index: ReplayIndex): StageMarker[] {
  return index.final.stageLog.map((m) => ({ stage: m.stage, seq: m.seq, offsetMs: offsetOfSeq(index, m.seq) }));
}
