/** A seeded source of numbers in [0, 1): mulberry32, so a seed always gives the same sequence. */
export type Random = () => number;

/** mulberry32 generator from a 32-bit seed. */
export function seededRandom(seed: number): Random {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A number drawn evenly from [low, high). */
export function uniform(random: Random, low: number, high: number): number {
  return low + (high - low) * random();
}

/** A normally distributed number with mean 0 and the given standard deviation (Box–Muller). */
export function gaussian(random: Random, sigma: number): number {
  const u = 1 - random();
  return sigma * Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
}

/** One element of a non-empty list, chosen evenly. */
export function pick<T>(random: Random, items: readonly T[]): T {
  return items[Math.floor(random() * items.length)]!;
}
