/**
 * The base model as a surface, for the tilt view and its legend. Plain functions (no three.js), so the DOM
 * legend and the canvas agree and a test can import them.
 */

/** The part of the engine's base state the surface draws, µrad (see lib/leveling/base-state.ts for signs). */
export type BaseShape = { tiltXUrad: number; tiltYUrad: number; twistUrad: number; bowUrad: number };

/**
 * Height of the base at (x, y) mm from the table centre, µm, relative to the centre:
 * z = tiltX·x + tiltY·y + twist·x·y/travel + bow·y²/(2·travel). Its X slope changes by `twist` and its Y slope by
 * `bow` over the Y travel, as the engine states them (µrad × mm = nm, hence the /1000).
 */
export function surfaceHeightUm(shape: BaseShape, travelMm: number, xMm: number, yMm: number): number {
  const t = Math.max(travelMm, 1);
  return (shape.tiltXUrad * xMm + shape.tiltYUrad * yMm + (shape.twistUrad * xMm * yMm) / t + (shape.bowUrad * yMm * yMm) / (2 * t)) / 1000;
}

/** Lowest and highest height over a rectangle ±halfX × ±halfY mm, µm (sampled on a grid fine enough for a quadric). */
export function heightRangeUm(shape: BaseShape | null, travelMm: number, halfXMm: number, halfYMm: number): { minUm: number; maxUm: number } {
  if (!shape) return { minUm: 0, maxUm: 0 };
  let minUm = Infinity;
  let maxUm = -Infinity;
  const n = 16;
  for (let i = 0; i <= n; i++) {
    for (let j = 0; j <= n; j++) {
      const h = surfaceHeightUm(shape, travelMm, -halfXMm + (2 * halfXMm * i) / n, -halfYMm + (2 * halfYMm * j) / n);
      minUm = Math.min(minUm, h);
      maxUm = Math.max(maxUm, h);
    }
  }
  return { minUm, maxUm };
}

/** The half-sizes of the drawn base, mm: the footprint and the table with a margin. */
export function baseExtentMm(screws: { xMm: number; yMm: number }[], table: { lengthMm: number; widthMm: number }): { halfX: number; halfY: number } {
  const halfX = Math.max(table.lengthMm / 2 + 60, ...screws.map((s) => Math.abs(s.xMm) + 120), 400);
  const halfY = Math.max(table.widthMm / 2 + 60, ...screws.map((s) => Math.abs(s.yMm) + 120), 300);
  return { halfX, halfY };
}

/** Colour stops from low to high: cool blue, pale neutral at the centre height, warm orange-red. */
export const HEIGHT_STOPS = ['#1f5fae', '#7fb0dc', '#ece8dc', '#f0a35a', '#c0392b'] as const;

function hexToRgb(hex: string): [number, number, number] {
  const n = parseInt(hex.slice(1), 16);
  return [((n >> 16) & 255) / 255, ((n >> 8) & 255) / 255, (n & 255) / 255];
}

/** RGB (0…1) for a height: t = height / the largest |height| drawn, in −1…1 (0 is the centre's height). */
export function heightRgb(t: number): [number, number, number] {
  const u = (Math.max(-1, Math.min(1, Number.isFinite(t) ? t : 0)) + 1) / 2; // 0…1
  const pos = u * (HEIGHT_STOPS.length - 1);
  const i = Math.min(HEIGHT_STOPS.length - 2, Math.floor(pos));
  const f = pos - i;
  const a = hexToRgb(HEIGHT_STOPS[i]!);
  const b = hexToRgb(HEIGHT_STOPS[i + 1]!);
  return [a[0] + (b[0] - a[0]) * f, a[1] + (b[1] - a[1]) * f, a[2] + (b[2] - a[2]) * f];
}

/** The exaggeration steps the slider offers. */
export const EXAGGERATIONS = [500, 700, 1000, 1500, 2000, 3000, 5000, 7000, 10000, 15000, 20000] as const;

/** The largest step that draws the highest departure at no more than `share` of the base's larger half-size. */
export function fittingExaggeration(rangeUm: { minUm: number; maxUm: number }, halfMm: number, share = 0.25): number {
  const peakUm = Math.max(Math.abs(rangeUm.minUm), Math.abs(rangeUm.maxUm));
  if (peakUm <= 0) return 5000;
  const wanted = (share * halfMm * 1000) / peakUm;
  return [...EXAGGERATIONS].reverse().find((e) => e <= wanted) ?? EXAGGERATIONS[0];
}
