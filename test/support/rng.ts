/**
 * Seeded random numbers for tests and benchmarks: mulberry32 (common practice, public-domain
 * generator by Tommy Ettinger) and Box-Muller normals.
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

export function normalStream(seed: number): () => number {
  const u = mulberry32(seed);
  let spare = NaN;
  return () => {
    if (!Number.isNaN(spare)) {
      const v = spare;
      spare = NaN;
      return v;
    }
    let a = u();
    while (a <= 0) a = u();
    const b = u();
    const r = Math.sqrt(-2 * Math.log(a));
    spare = r * Math.sin(2 * Math.PI * b);
    return r * Math.cos(2 * Math.PI * b);
  };
}
