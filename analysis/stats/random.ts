// A small seeded PRNG: resampling must give the same interval for the same data and seed, run after run.

/** Returns a generator of uniform numbers in [0, 1) from a 32-bit seed (mulberry32, T. Ettinger, public domain). */
export function mulberry32(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Uniform integer in [0, n) from a [0, 1) generator. */
export function randomIndex(next: () => number, n: number): number {
  return Math.floor(next() * n);
}

/** Picks `m` of `values` without replacement (partial Fisher–Yates on a copy); the input is not touched. */
export function sampleWithoutReplacement(values: ArrayLike<number>, m: number, next: () => number): Float64Array {
  const copy = Float64Array.from(values as ArrayLike<number>);
  const n = copy.length;
  const take = Math.min(m, n);
  for (let i = 0; i < take; i++) {
    const j = i + randomIndex(next, n - i);
    const t = copy[i]!;
    copy[i] = copy[j]!;
    copy[j] = t;
  }
  return copy.slice(0, take);
}
