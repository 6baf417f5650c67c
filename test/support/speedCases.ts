/**
 * Small seeded, invented curves whose profiles pin the geometry core's results across speed work
 * (test/frame/speedInvariance.test.ts; the fixture is written by
 * `npx tsx bench/speedInvariance.ts fixture test/frame/fixtures/speedInvariance.json`).
 */
import { fitProfile, type ProfileOptions } from "../../src/frame/profile.js";
import type { Profile, Trace } from "../../src/types.js";
import { ellipseCurve, helixCurve, sampleCurve, vivianiCurve, type TestCurve } from "./curves.js";
import { normalStream } from "./rng.js";

/** The scaling benchmark's wire (bench/scaling.ts, bench/speedInvariance.ts): an invented noisy helix,
 * radius 50 nm, rise 10 nm per radian, 1% noise, one turn per 1000 points (2 to 40 turns), seeded. */
export function scalingHelix(n: number): Float64Array {
  const R = 50e-9, c = 10e-9, turns = Math.min(40, Math.max(2, n / 1000)), noise = 0.01;
  const g = normalStream(7);
  const xyz = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    const t = (2 * Math.PI * turns * i) / (n - 1);
    xyz[3 * i] = R * Math.cos(t) + noise * R * g();
    xyz[3 * i + 1] = R * Math.sin(t) + noise * R * g();
    xyz[3 * i + 2] = c * t + noise * R * g();
  }
  return xyz;
}

function trace(curve: TestCurve, n: number, rel: number, seed: number, dims: 2 | 3, closed?: boolean): Trace {
  const xyz = sampleCurve(curve, n, rel * curve.radius, seed).xyz;
  if (dims === 2) for (let i = 2; i < xyz.length; i += 3) xyz[i] = 0;
  return { xyz, dims, source: { file: "speed", unit: "nm" }, diagnostics: [], ...(closed !== undefined ? { closed } : {}) };
}

export const SPEED_CASES: readonly { name: string; trace: () => Trace; options: ProfileOptions }[] = [
  { name: "helix open 1500", trace: () => trace(helixCurve(50e-9, 10e-9, 3), 1500, 0.01, 31, 3), options: { bootstrap: 100, seed: 5 } },
  { name: "viviani closed 1200", trace: () => trace(vivianiCurve(80e-9), 1200, 0.01, 32, 3, true), options: { bootstrap: 100 } },
  { name: "ellipse planar 800", trace: () => trace(ellipseCurve(100e-9, 60e-9), 800, 0.01, 33, 2, true), options: { bootstrap: 60 } },
];

/** Every 10th sample's kappa, tau and bands (NaN as null), and the levels: what the fixture holds. */
export function profileDigest(p: Profile): Record<string, (number | null)[] | number> {
  const pick = (a: Float64Array) => Array.from({ length: Math.ceil(p.n / 10) }, (_, k) => (Number.isFinite(a[10 * k]) ? a[10 * k] : null));
  return {
    kappa: pick(p.kappa), kappaLo: pick(p.kappaLo), kappaHi: pick(p.kappaHi),
    tau: pick(p.tau), tauLo: pick(p.tauLo), tauHi: pick(p.tauHi),
    lambda: p.lambda, lambdaTorsion: p.lambdaTorsion, sigma: p.sigma,
  };
}

export function speedCaseDigests(): Record<string, Record<string, (number | null)[] | number>> {
  return Object.fromEntries(SPEED_CASES.map((c) => [c.name, profileDigest(fitProfile(c.trace(), c.options))]));
}
