import { createHash, randomUUID } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import type { SessionEvent } from '@/lib/session/events';
import { eventHash, verifyChain } from '@/lib/session/hash-chain';

function chain(n: number): SessionEvent[] {
  const out: SessionEvent[] = [];
  let prev = '';
  for (let seq = 1; seq <= n; seq++) {
    const e = {
      sessionId: 's',
      seq,
      id: randomUUID(),
      type: 'reading:recorded' as const,
      payload: { kind: 'level' as const, axis: 'x' as const, positionMm: 0, divisions: seq / 2, slopeUrad: seq * 10 },
      actorId: 'u',
      actorRole: 'technician',
      clientTs: null,
      serverTs: new Date(Date.UTC(2026, 0, 1, 0, 0, seq)).toISOString(),
      prevHash: prev,
    };
    const hash = eventHash(prev, e);
    out.push({ ...e, hash });
    prev = hash;
  }
  return out;
}

describe('hash chain', () => {
  it('is sha256 (FIPS 180-4, via node:crypto) over the previous hash and the RFC 8785 canonical JSON', () => {
    const e = chain(1)[0]!;
    // RFC 8785 sorts object keys by UTF-16 code units and writes numbers as ECMAScript does; written out by hand here.
    const p = e.payload as { axis: string; divisions: number; kind: string; positionMm: number; slopeUrad: number };
    const canonical =
      `{"actorId":"u","actorRole":"technician","id":"${e.id}",` +
      `"payload":{"axis":"${p.axis}","divisions":${p.divisions},"kind":"${p.kind}","positionMm":${p.positionMm},"slopeUrad":${p.slopeUrad}},` +
      `"seq":1,"serverTs":"${e.serverTs}","type":"reading:recorded"}`;
    expect(e.hash).toBe(createHash('sha256').update('').update(canonical).digest('hex'));
  });

  it('does not depend on the key order of the payload (jsonb reorders keys)', () => {
    const e = chain(1)[0]!;
    const reordered = { ...e, payload: Object.fromEntries(Object.entries(e.payload).reverse()) as SessionEvent['payload'] };
    expect(eventHash('', reordered)).toBe(e.hash);
  });

  it('verifies an intact chain and returns its head', () => {
    const events = chain(5);
    expect(verifyChain(events)).toEqual({ ok: true, count: 5, head: events[4]!.hash });
  });

  it('names the first broken link for a changed payload, a removed event and a reordered log', () => {
    const events = chain(5);
    const changed = events.map((e) => (e.seq === 3 ? { ...e, actorRole: 'expert' } : e));
    expect(verifyChain(changed)).toMatchObject({ ok: false, brokenAtSeq: 3 });
    const removed = events.filter((e) => e.seq !== 2);
    expect(verifyChain(removed)).toMatchObject({ ok: false, brokenAtSeq: 3 });
    const swapped = [events[0]!, events[2]!, events[1]!, events[3]!, events[4]!];
    expect(verifyChain(swapped)).toMatchObject({ ok: false, brokenAtSeq: 3 });
  });

  it('catches a forged hash that is recomputed for one event only', () => {
    const events = chain(4);
    const forged = { ...events[1]!, payload: { ...events[1]!.payload, divisions: 9 } } as SessionEvent;
    forged.hash = eventHash(forged.prevHash, forged);
    const log = [events[0]!, forged, events[2]!, events[3]!];
    expect(verifyChain(log)).toMatchObject({ ok: false, brokenAtSeq: 3, reason: 'prevHash does not match the previous event' });
  });
});
