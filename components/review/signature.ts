// A drawn signature between the pad (signature_pad's point groups) and the log (review:approved's `signature`), and
// back to SVG. Plain functions: tested in tests/unit/replay/signature.test.ts.
import type { Signature } from '@/lib/session/events';

/** What the server takes (lib/session/commands signatureInput): keep in step with it. */
export const SIGNATURE_LIMITS = { maxStrokes: 100, maxPointsPerStroke: 2000, minWidth: 50, minHeight: 20, maxSide: 4000 } as const;

/** The part of signature_pad's PointGroup read here: points in CSS pixels of the pad, origin top left. */
export type DrawnGroup = { points: readonly { x: number; y: number }[] };

export type SignatureResult = { ok: true; signature: Signature } | { ok: false; reason: string };

const clamp = (v: number, max: number) => Math.min(max, Math.max(0, Math.round(v)));

/** Every `k`-th point so a stroke keeps at most `max` points, its first and last always kept. */
function thin(xy: number[], max: number): number[] {
  const n = xy.length / 2;
  if (n <= max) return xy;
  const out: number[] = [];
  for (let i = 0; i < max; i++) {
    const j = Math.round((i * (n - 1)) / (max - 1));
    out.push(xy[2 * j]!, xy[2 * j + 1]!);
  }
  return out;
}

/**
 * The log's signature from the pad's strokes on a pad `width` × `height` CSS pixels: whole pixels, clamped into
 * the pad (a stroke may run past its edge), repeated points dropped, a single tap kept as a dot (its point twice),
 * long strokes thinned. Refuses an empty pad and more strokes than the server keeps.
 */
export function signatureOf(groups: readonly DrawnGroup[], width: number, height: number): SignatureResult {
  const w = Math.round(width);
  const h = Math.round(height);
  const L = SIGNATURE_LIMITS;
  if (w < L.minWidth || h < L.minHeight || w > L.maxSide || h > L.maxSide) return { ok: false, reason: `the pad must be from ${L.minWidth} × ${L.minHeight} to ${L.maxSide} × ${L.maxSide} pixels` };
  const strokes: number[][] = [];
  for (const g of groups) {
    const xy: number[] = [];
    for (const p of g.points) {
      if (!Number.isFinite(p.x) || !Number.isFinite(p.y)) continue;
      const x = clamp(p.x, w);
      const y = clamp(p.y, h);
      if (xy.length >= 2 && xy[xy.length - 2] === x && xy[xy.length - 1] === y) continue;
      xy.push(x, y);
    }
    if (xy.length === 0) continue;
    if (xy.length === 2) xy.push(xy[0]!, xy[1]!);
    strokes.push(thin(xy, L.maxPointsPerStroke));
  }
  if (strokes.length === 0) return { ok: false, reason: 'sign on the pad first' };
  if (strokes.length > L.maxStrokes) return { ok: false, reason: `at most ${L.maxStrokes} strokes: clear the pad and sign again` };
  return { ok: true, signature: { width: w, height: h, strokes } };
}

/** One SVG path per stroke ("M x y L x y …"), in the signature's own box (0 0 width height). */
export function strokePaths(signature: Signature): string[] {
  return signature.strokes.map((s) => {
    const parts: string[] = [];
    for (let i = 0; i + 1 < s.length; i += 2) parts.push(`${i === 0 ? 'M' : 'L'}${s[i]} ${s[i + 1]}`);
    return parts.join(' ');
  });
}
