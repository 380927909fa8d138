import type { SessionEvent } from './events';

/** Merges incoming events into a seq-ordered log, dropping duplicates; returns the same array when nothing is new. */
export function mergeEvents(log: readonly SessionEvent[], incoming: readonly SessionEvent[]): SessionEvent[] {
  const last = log.length > 0 ? log[log.length - 1]!.seq : 0;
  const fresh = incoming.filter((e) => e.seq > last);
  if (fresh.length === 0) {
    const known = new Set(log.map((e) => e.seq));
    const late = incoming.filter((e) => !known.has(e.seq));
    if (late.length === 0) return log as SessionEvent[];
    return [...log, ...late].sort((a, b) => a.seq - b.seq);
  }
  const bySeq = new Map<number, SessionEvent>();
  for (const e of fresh) bySeq.set(e.seq, e);
  return [...log, ...[...bySeq.values()].sort((a, b) => a.seq - b.seq)];
}

/** The first seq missing from a log that should run 1, 2, 3, …; null when gapless. */
export function firstGap(log: readonly SessionEvent[]): number | null {
  for (let i = 0; i < log.length; i++) if (log[i]!.seq !== i + 1) return i + 1;
  return null;
}
