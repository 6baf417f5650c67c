/**
 * Seeded random numbers for tests and benchmarks: mulberry32 (common practice, public-domain
 * generator by Tommy Ettinger) and Box-Muller normals.
 */
export { mulberry32 } from "../../src/frame/mulberry32.js";
import { mulberry32 } from "../../src/frame/mulberry32.js";

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
