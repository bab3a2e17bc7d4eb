/*
 * mulberry32: a tiny seeded 32-bit generator, so the demo scenario is the same on every machine and
 * every run (Math.random cannot be seeded). Not for anything secret.
 */

export type Prng = () => number;

export function mulberry32(seed: number): Prng {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Whole number in [min, max], both inclusive. */
export function randomInt(rand: Prng, min: number, max: number): number {
  return min + Math.floor(rand() * (max - min + 1));
}

export function pick<T>(rand: Prng, items: readonly T[]): T {
  if (items.length === 0) throw new Error('pick from an empty list');
  return items[Math.floor(rand() * items.length)]!;
}
