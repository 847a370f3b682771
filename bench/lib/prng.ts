/**
 * A small seeded PRNG for the bench's generated inputs, so every run measures the same surveys
 * and networks. mulberry32 (a 32-bit multiply–xorshift generator, public domain; from memory):
 * not for statistics, only for repeatable test data.
 */
export type Rng = () => number;

export function mulberry32(seed: number): Rng {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** An integer in [0, n). */
export const intBelow = (rng: Rng, n: number): number => Math.floor(rng() * n);

/** One element of a list. */
export const pick = <T>(rng: Rng, list: readonly T[]): T => list[intBelow(rng, list.length)];
