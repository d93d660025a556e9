/** Seeded pseudo-random numbers for the demo generator and the tests (mulberry32, 32-bit state). */

export type Random = () => number;

/** Uniform numbers in [0, 1) from a 32-bit seed; the same seed gives the same sequence everywhere. */
export function mulberry32(seed: number): Random {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A standard normal deviate (Box–Muller). */
export function gaussian(rand: Random): number {
  let u = rand();
  while (u <= 1e-300) u = rand();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rand());
}
