import { createHash } from 'node:crypto';
import canonicalize from 'canonicalize';
import type { SessionEvent } from './events';

type Hashable = Pick<SessionEvent, 'seq' | 'id' | 'type' | 'payload' | 'actorId' | 'actorRole' | 'serverTs'>;

/** sha256 hex of the previous hash followed by the RFC 8785 canonical JSON of the event's content. */
export function eventHash(prevHash: string, e: Hashable): string {
  const body = canonicalize({
    seq: e.seq,
    id: e.id,
    type: e.type,
    payload: e.payload,
    actorId: e.actorId,
    actorRole: e.actorRole,
    serverTs: e.serverTs,
  });
  return createHash('sha256').update(prevHash).update(body ?? '').digest('hex');
}

export type ChainVerdict = { ok: true; count: number; head: string } | { ok: false; brokenAtSeq: number; reason: string };

/** Recomputes the chain in seq order and names the first broken link. */
export function verifyChain(events: readonly SessionEvent[]): ChainVerdict {
  let prev = '';
  let expectedSeq = 1;
  for (const e of events) {
    if (e.seq !== expectedSeq) return { ok: false, brokenAtSeq: e.seq, reason: `expected seq ${expectedSeq}, found ${e.seq}` };
    if (e.prevHash !== prev) return { ok: false, brokenAtSeq: e.seq, reason: 'prevHash does not match the previous event' };
    if (eventHash(prev, e) !== e.hash) return { ok: false, brokenAtSeq: e.seq, reason: 'content does not match its hash' };
    prev = e.hash;
    expectedSeq += 1;
  }
  return { ok: true, count: events.length, head: prev };
}
