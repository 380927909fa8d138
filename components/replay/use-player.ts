'use client';

import { useCallback, useEffect, useRef, useState } from 'react';
import { offsetOfSeq, seqAtOffset, type ReplayIndex } from '@/lib/session/replay';
import { advance, lastSeqOf, stepSeq, type Speed } from './player-clock';

/** While playing, the shown moment changes at most this often (the figures are recomputed for each one shown). */
const FRAME_MS = 60;

/**
 * The playhead over a replay's clock (the timeline's shortened axis): the seq shown, play and pause at a speed,
 * seeking by seq or by clock offset, stepping one event. Playing runs on requestAnimationFrame and keeps the clock in
 * a ref; React state changes only when the shown seq does, and no more than every FRAME_MS.
 */
export function usePlayer(clock: ReplayIndex | null, totalMs: number) {
  const [seq, setSeq] = useState<number | null>(null);
  const [playing, setPlaying] = useState(false);
  const [speed, setSpeed] = useState<Speed>(4);
  const offsetRef = useRef(0);
  const seqRef = useRef(0);
  const clockRef = useRef(clock);
  clockRef.current = clock;

  const show = useCallback((s: number) => {
    seqRef.current = s;
    setSeq(s);
  }, []);

  // The first load shows the record as it stands (its last event); a log that grows while the playhead stands at its
  // old end follows it to the new end.
  const lastRef = useRef<number | null>(null);
  useEffect(() => {
    if (!clock) return;
    const last = lastSeqOf(clock);
    const before = lastRef.current;
    lastRef.current = last;
    if (before === null || (!playing && seqRef.current === before && last !== before)) {
      offsetRef.current = offsetOfSeq(clock, last);
      show(last);
    }
  }, [clock, playing, show]);

  const seek = useCallback(
    (s: number) => {
      const c = clockRef.current;
      if (!c) return;
      const clamped = Math.max(0, Math.min(lastSeqOf(c), s));
      offsetRef.current = offsetOfSeq(c, clamped);
      show(clamped);
    },
    [show],
  );

  const seekOffset = useCallback(
    (ms: number) => {
      const c = clockRef.current;
      if (!c) return;
      offsetRef.current = Math.max(0, Math.min(totalMs, ms));
      show(seqAtOffset(c, offsetRef.current));
    },
    [show, totalMs],
  );

  const step = useCallback(
    (dir: 1 | -1) => {
      const c = clockRef.current;
      if (!c) return;
      setPlaying(false);
      seek(stepSeq(c, seqRef.current, dir));
    },
    [seek],
  );

  const playingRef = useRef(playing);
  playingRef.current = playing;
  const toggle = useCallback(() => {
    const c = clockRef.current;
    if (!c) return;
    if (playingRef.current) return setPlaying(false);
    // Play from the start when standing at the end.
    if (seqRef.current >= lastSeqOf(c)) {
      offsetRef.current = 0;
      show(0);
    }
    setPlaying(true);
  }, [show]);

  useEffect(() => {
    if (!playing || !clock) return;
    let frame = 0;
    let last = performance.now();
    let shownAt = 0;
    const tick = (now: number) => {
      const { offsetMs, ended } = advance(offsetRef.current, now - last, speed, totalMs);
      last = now;
      offsetRef.current = offsetMs;
      const at = seqAtOffset(clock, offsetMs);
      if (ended) {
        show(lastSeqOf(clock));
        setPlaying(false);
        return;
      }
      if (at !== seqRef.current && now - shownAt >= FRAME_MS) {
        shownAt = now;
        show(at);
      }
      frame = requestAnimationFrame(tick);
    };
    frame = requestAnimationFrame(tick);
    return () => cancelAnimationFrame(frame);
  }, [clock, playing, show, speed, totalMs]);

  return { seq: seq ?? 0, ready: seq !== null, playing, speed, setSpeed, toggle, pause: () => setPlaying(false), seek, seekOffset, step, offsetRef };
}
