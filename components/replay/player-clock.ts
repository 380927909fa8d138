// The replay's clock, as plain functions (no React): the timeline's own time axis with long pauses shortened, the
// player's advance, stepping event by event, and the readout's figures. Tested in tests/unit/replay/.
import { countThrough, type ReplayIndex } from '@/lib/session/replay';

/** Pauses between two events longer than this are drawn and played as this long (the screen says so). */
export const MAX_GAP_MS = 60_000;

export const SPEEDS = [1, 4, 16] as const;
export type Speed = (typeof SPEEDS)[number];

export type Shortened = { count: number; savedMs: number };

/**
 * The timeline's clock: each event's offset from the first with every pause longer than `maxGapMs` cut to `maxGapMs`.
 * The result is an index whose `offsetsMs` are the shortened ones, so seqAtOffset, offsetOfSeq and stageMarkers
 * of lib/session/replay work on the shortened axis unchanged; the real offsets stay in `realOffsetsMs`.
 */
export function timelineOf(index: ReplayIndex, maxGapMs = MAX_GAP_MS): { clock: ReplayIndex; totalMs: number; shortened: Shortened } {
  const real = index.offsetsMs;
  const offsets = new Float64Array(real.length);
  let count = 0;
  let savedMs = 0;
  for (let i = 1; i < real.length; i++) {
    const gap = real[i]! - real[i - 1]!;
    const kept = gap > maxGapMs ? maxGapMs : Math.max(0, gap);
    if (gap > maxGapMs) {
      count++;
      savedMs += gap - maxGapMs;
    }
    offsets[i] = offsets[i - 1]! + kept;
  }
  return { clock: { ...index, offsetsMs: offsets }, totalMs: offsets.length ? offsets[offsets.length - 1]! : 0, shortened: { count, savedMs } };
}

/** The player's clock after `dtMs` of wall time at `speed`; it stops at `endMs`. */
export function advance(offsetMs: number, dtMs: number, speed: number, endMs: number): { offsetMs: number; ended: boolean } {
  const next = offsetMs + Math.max(0, dtMs) * speed;
  return next >= endMs ? { offsetMs: endMs, ended: true } : { offsetMs: next, ended: false };
}

/** The seq one event after (`dir` 1) or before (`dir` -1) `seq`; 0 stands before the first event. */
export function stepSeq(index: ReplayIndex, seq: number, dir: 1 | -1): number {
  const { events } = index;
  const n = countThrough(index, seq);
  if (dir === 1) return n < events.length ? events[n]!.seq : (events.at(-1)?.seq ?? 0);
  // The event shown at `seq` is events[n - 1]; the one before it is events[n - 2] (none: before the first event).
  return n >= 2 ? events[n - 2]!.seq : 0;
}

/** The seq of the last event (0 for an empty log). */
export const lastSeqOf = (index: ReplayIndex) => index.events.at(-1)?.seq ?? 0;

/** How many events the replay shows at `seq` (its "seq N of M" counts events, which are numbered from 1). */
export const shownCount = (index: ReplayIndex, seq: number) => countThrough(index, seq);

/** Real milliseconds from the first event to the one shown at `seq` (0 before the first). */
export function realOffsetOf(index: ReplayIndex, seq: number): number {
  const n = countThrough(index, seq);
  return n === 0 ? 0 : index.offsetsMs[n - 1]!;
}

/** Elapsed time as h:mm:ss (hours unbounded), from milliseconds. */
export function elapsed(ms: number): string {
  const s = Math.max(0, Math.floor(ms / 1000));
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  return `${String(h).padStart(2, '0')}:${String(m).padStart(2, '0')}:${String(s % 60).padStart(2, '0')}`;
}

/** A length of time in words for the screen ("1 h 12 min", "3 min", "45 s"). */
export function duration(ms: number): string {
  const s = Math.round(ms / 1000);
  if (s < 60) return `${s} s`;
  const min = Math.round(s / 60);
  if (min < 60) return `${min} min`;
  const h = Math.floor(min / 60);
  const rest = min % 60;
  if (h < 48) return rest ? `${h} h ${rest} min` : `${h} h`;
  return `${Math.round(h / 24)} days`;
}

/** Where on the timeline (0…1) an offset of the shortened clock falls. */
export const fractionOf = (offsetMs: number, totalMs: number) => (totalMs > 0 ? Math.min(1, Math.max(0, offsetMs / totalMs)) : 0);
