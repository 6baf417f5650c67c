/**
 * Seeded uniform random numbers in [0, 1): mulberry32 (a public-domain 32-bit generator by Tommy
 * Ettinger; common practice for small reproducible streams). Not for cryptography.
 * @example const u = mulberry32(1); u() // same value for the same seed, every run
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
