import { describe, expect, it } from 'vitest';
import { signatureInput } from '@/lib/session/commands';
import { signatureOf, strokePaths, SIGNATURE_LIMITS } from '@/components/review/signature';
import * as z from 'zod/mini';

const pts = (...xy: number[]) => ({ points: Array.from({ length: xy.length / 2 }, (_, i) => ({ x: xy[2 * i]!, y: xy[2 * i + 1]! })) });
const accepted = (v: unknown) => z.safeParse(signatureInput, v).success;

describe('signature from the pad', () => {
  it('rounds to whole pixels, keeps strokes apart and fits what the server takes', () => {
    const r = signatureOf([pts(10.4, 20.6, 30.5, 40.49), pts(100, 50, 120.2, 55.8, 140, 60)], 400.4, 150);
    expect(r).toEqual({ ok: true, signature: { width: 400, height: 150, strokes: [[10, 21, 31, 40], [100, 50, 120, 56, 140, 60]] } });
    expect(r.ok && accepted(r.signature)).toBe(true);
  });

  it('clamps points drawn past the edge into the pad (the server refuses points outside it)', () => {
    const r = signatureOf([pts(-12, 5, 200, 80, 430, 170)], 400, 150);
    expect(r.ok && r.signature.strokes).toEqual([[0, 5, 200, 80, 400, 150]]);
    expect(r.ok && accepted(r.signature)).toBe(true);
  });

  it('drops repeated points, keeps a tap as a dot, skips empty groups', () => {
    const r = signatureOf([pts(5, 5, 5.2, 4.9, 5, 5, 9, 9), pts(50, 60), { points: [] }], 400, 150);
    expect(r.ok && r.signature.strokes).toEqual([[5, 5, 9, 9], [50, 60, 50, 60]]);
    expect(r.ok && accepted(r.signature)).toBe(true);
  });

  it('refuses an empty pad, and one with more strokes than the server keeps', () => {
    expect(signatureOf([], 400, 150)).toEqual({ ok: false, reason: 'sign on the pad first' });
    expect(signatureOf([{ points: [] }], 400, 150).ok).toBe(false);
    const many = Array.from({ length: SIGNATURE_LIMITS.maxStrokes + 1 }, (_, i) => pts(i, 1, i, 2));
    expect(signatureOf(many, 400, 150)).toMatchObject({ ok: false, reason: expect.stringContaining('at most 100 strokes') });
  });

  it('refuses a pad smaller than the server takes', () => {
    expect(signatureOf([pts(1, 1, 2, 2)], 40, 150)).toMatchObject({ ok: false });
    expect(signatureOf([pts(1, 1, 2, 2)], 400, 10)).toMatchObject({ ok: false });
  });

  it('thins a very long stroke to the server’s limit, keeping its ends', () => {
    const xy = Array.from({ length: 5000 }, (_, i) => [i % 400, Math.floor(i / 400)]).flat();
    const r = signatureOf([pts(...xy)], 400, 150);
    if (!r.ok) throw new Error(r.reason);
    const [s] = r.signature.strokes;
    expect(s!.length).toBe(2 * SIGNATURE_LIMITS.maxPointsPerStroke);
    expect(s!.slice(0, 2)).toEqual([0, 0]);
    expect(s!.slice(-2)).toEqual([4999 % 400, Math.floor(4999 / 400)]);
    expect(accepted(r.signature)).toBe(true);
  });

  it('draws each stroke back as one SVG path', () => {
    expect(strokePaths({ width: 400, height: 150, strokes: [[0, 5, 200, 80, 400, 150], [50, 60, 50, 60]] })).toEqual(['M0 5 L200 80 L400 150', 'M50 60 L50 60']);
  });
});
