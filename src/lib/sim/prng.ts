// Seeded pseudo-random numbers for particle jitter only (mulberry32, a 32-bit state generator).

/** Returns a generator of floats in [0, 1) from a 32-bit seed; same seed → same sequence in every runtime. */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
