/**
 * Benchmark (run by hand): primitive fits of stretches. `npx tsx bench/primitiveFits.ts`
 * (a) short sparse alpha-helix-like traces (radius 2.3 A, rise 1.5 A, 100 deg per point; 10-60
 *     points; noise 0.05-0.2 A) through the whole pipeline (fitProfile -> segmentWire with the input
 *     points): how often the wire is one helix stretch, and its kappa/tau against the ideal helix;
 * (b) interval coverage of fitHelix / fitCircle on synthetic coils and arcs at 0.2-3% noise.
 * Invented synthetic data; alpha-helix geometry: textbook values (from memory).
 */
import { fitProfile } from "../src/frame/profile.js";
import { samplePoints, segmentWire } from "../src/frame/segment.js";
import { fitCircle, fitHelix } from "../src/frame/primitives.js";
import { toTrace } from "../src/index.js";
import { normalStream } from "../test/support/rng.js";

function helixPoints(n: number, R: number, c: number, dt: number, noise: number, seed: number, t0 = 0): Float64Array {
  const g = normalStream(seed);
  const x = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    const t = t0 + i * dt;
    x[3 * i] = R * Math.cos(t) + noise * g(); x[3 * i + 1] = R * Math.sin(t) + noise * g(); x[3 * i + 2] = c * t + noise * g();
  }
  return x;
}

{
  const R = 2.3, dt = (100 * Math.PI) / 180, c = 1.5 / dt;
  const k0 = R / (R * R + c * c), t0 = c / (R * R + c * c);
  let one = 0, okK = 0, okT = 0, okKls = 0, okTls = 0, total = 0, failed = 0;
  const kinds = new Map<string, number>();
  for (let s = 0; s < 200; ++s) {
    const n = 10 + (s % 51), noise = 0.05 + (0.15 * (s % 7)) / 6;
    const xyz = helixPoints(n, R, c, dt, noise, 1000 + s, s);
    total++;
    try {
      const trace = toTrace({ xyz, unit: "A" });
      const p = fitProfile(trace, { bootstrap: 0 });
      const { segments } = segmentWire(p, { points: samplePoints(trace, p)! });
      const key = segments.map((g) => g.kind).join("+");
      kinds.set(key, (kinds.get(key) ?? 0) + 1);
      const ls = fitHelix(trace.xyz);
      if (segments.length === 1 && segments[0].kind === "helix") one++;
      // the longest stretch
      const g = segments.reduce((a, b) => (b.s1 - b.s0 > a.s1 - a.s0 ? b : a));
      if (Math.abs(g.kappa / (k0 * 1e10) - 1) < 0.03) okK++;
      if (Math.abs(g.tau / (t0 * 1e10) - 1) < 0.1) okT++;
      if (Math.abs(g.kappa / ls.kappa.value - 1) < 0.03) okKls++;
      if (Math.abs(g.tau / ls.tau.value - 1) < 0.1) okTls++;
    } catch (e) {
      failed++;
      if (failed < 4) console.log("refused:", (e as Error).message);
    }
  }
  console.log(`(a) sparse helices: ${total} traces, ${failed} refused; one helix stretch ${one}; longest stretch kappa within 3% of the ideal ${okK}, tau within 10% ${okT}; of the LS helix through all points ${okKls} / ${okTls}`);
  console.log("    stretch kinds:", [...kinds.entries()].map(([k, v]) => `${k}: ${v}`).join(", "));
}

for (const rel of [0.002, 0.01, 0.03]) {
  let cR = 0, cK = 0, cT = 0, cC = 0;
  const reps = 200;
  for (let s = 1; s <= reps; ++s) {
    const R = 60, c = 157 / (2 * Math.PI); // an invented coil: radius 60 nm, pitch 157 nm
    const k0 = R / (R * R + c * c), t0 = c / (R * R + c * c);
    const h = fitHelix(helixPoints(120, R, c, 0.1, rel * R, s, 0.37 * s));
    if (h.radius.lo <= R && R <= h.radius.hi) cR++;
    if (h.kappa.lo <= k0 && k0 <= h.kappa.hi) cK++;
    if (h.tau.lo <= t0 && t0 <= h.tau.hi) cT++;
    const a = fitCircle(helixPoints(80, 150, 0, 0.02, rel * 150, 500 + s, s));
    if (a.radius.lo <= 150 && 150 <= a.radius.hi) cC++;
  }
  console.log(`(b) noise ${(rel * 100).toFixed(1)}% of R: coverage of 95% intervals over ${reps} replicates: helix R ${cR / reps}, kappa ${cK / reps}, tau ${cT / reps}; circle (92 deg arc) R ${cC / reps}`);
}
