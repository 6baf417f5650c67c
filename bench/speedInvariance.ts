/**
 * Geometry-core equivalence check (run by hand): `npx tsx bench/speedInvariance.ts save FILE` writes
 * the profiles of a few seeded, invented curves (open and closed, 3D and planar, sparse, with
 * outliers, resampled, with kept replicates, and the 1e5-point helix of bench/scaling.ts) as JSON;
 * `... compare FILE` recomputes them and prints, per case and field, the largest relative difference
 * (each element against max(|a|, |b|), floored at 1e-12 of the field's largest magnitude), and fails
 * (exit code 1) above 1e-9 or on any differing flag, count or NaN pattern. Used to show a speed
 * change leaves kappa, tau and their bands alone. `--small` skips the 1e5-point case.
 * `... fixture FILE` writes the digest of the small cases of test/support/speedCases.ts that
 * test/frame/speedInvariance.test.ts compares against (regenerate it only for a deliberate change
 * of results, never for a speed change).
 */
import { readFileSync, writeFileSync } from "node:fs";
import { fitProfile, type ProfileOptions } from "../src/frame/profile.js";
import type { Profile, Trace } from "../src/types.js";
import { helixCurve, sampleCurve, sampleCurveUneven, trefoilCurve, vivianiCurve, ellipseCurve, bendCurve, type TestCurve } from "../test/support/curves.js";
import { scalingHelix, speedCaseDigests } from "../test/support/speedCases.js";

const [mode, file] = process.argv.slice(2);
const small = process.argv.includes("--small");
if (mode === "fixture" && file !== undefined) {
  writeFileSync(file, JSON.stringify(speedCaseDigests()) + "\n");
  console.log(`wrote ${file}`);
  process.exit(0);
}
if ((mode !== "save" && mode !== "compare") || file === undefined) throw new Error("usage: speedInvariance.ts save|compare FILE [--small]");

function trace(xyz: Float64Array, dims: 2 | 3, closed?: boolean): Trace {
  return { xyz, dims, source: { file: "invariance", unit: "nm" }, diagnostics: [], ...(closed !== undefined ? { closed } : {}) };
}
function noisy(curve: TestCurve, n: number, rel: number, seed: number, uneven = false): Float64Array {
  return (uneven ? sampleCurveUneven : sampleCurve)(curve, n, rel * curve.radius, seed).xyz;
}
function withOutliers(xyz: Float64Array, every: number, size: number): Float64Array {
  const out = xyz.slice();
  for (let i = 17; i < out.length / 3; i += every) out[3 * i + 1] += size;
  return out;
}
function planar(xyz: Float64Array): Float64Array {
  const out = xyz.slice();
  for (let i = 2; i < out.length; i += 3) out[i] = 0;
  return out;
}

const cases: [string, () => { t: Trace; o: ProfileOptions }][] = [
  ["helix open 3000", () => ({ t: trace(noisy(helixCurve(50e-9, 10e-9, 4), 3000, 0.01, 11), 3), o: { seed: 3 } })],
  ["viviani closed 2500 uneven", () => ({ t: trace(noisy(vivianiCurve(80e-9), 2500, 0.01, 12, true), 3, true), o: {} })],
  ["trefoil closed detect 4000 keepSamples", () => ({ t: trace(noisy(trefoilCurve(40e-9), 4000, 0.005, 13), 3), o: { keepSamples: true, bootstrap: 60 } })],
  ["ellipse planar 1500", () => ({ t: trace(planar(noisy(ellipseCurve(100e-9, 60e-9), 1500, 0.01, 14)), 2, true), o: {} })],
  ["bend open 2000 outliers", () => ({ t: trace(withOutliers(noisy(bendCurve(200e-9, 60e-9), 2000, 0.01, 15), 97, 80e-9), 3), o: {} })],
  ["helix sparse 40", () => ({ t: trace(noisy(helixCurve(50e-9, 10e-9, 5), 40, 0.002, 16), 3), o: {} })],
  ["helix sparse 60 coordinateError", () => ({ t: trace(noisy(helixCurve(50e-9, 10e-9, 6), 60, 0.002, 19), 3), o: { coordinateError: 0.1e-9 } })],
  ["viviani adaptive 3000", () => ({ t: trace(noisy(vivianiCurve(80e-9), 3000, 0.01, 20), 3, true), o: { adaptive: true } })],
  ["helix step 30000", () => ({ t: trace(noisy(helixCurve(50e-9, 10e-9, 12), 30000, 0.02, 17), 3), o: { step: 1e-9 } })],
  ["helix coordinateError 5000", () => ({ t: trace(noisy(helixCurve(50e-9, 15e-9, 6), 5000, 0.01, 18), 3), o: { coordinateError: 0.5e-9, seed: 9 } })],
  ...(small ? [] : [["scaling helix 100000", () => ({ t: trace(scalingHelix(100_000), 3), o: { bootstrap: 200 } })] as [string, () => { t: Trace; o: ProfileOptions }]]),
];

const FIELDS = ["s", "x", "y", "z", "T", "N", "B", "kappa", "kappaLo", "kappaHi", "tau", "tauLo", "tauHi", "flags", "inputRow", "kappaSamples", "tauSamples"] as const;
const SCALARS = ["n", "length", "closed", "resolution", "sigma", "lambda", "lambdaTorsion", "segments", "edf", "replicates"] as const;

function plain(p: Profile): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const f of FIELDS) {
    const v = (p as unknown as Record<string, ArrayLike<number> | undefined>)[f];
    if (v !== undefined) out[f] = Array.from(v, (x) => (Number.isFinite(x) ? x : String(x)));
  }
  for (const f of SCALARS) { const v = (p as unknown as Record<string, unknown>)[f]; out[f] = typeof v === "number" && !Number.isFinite(v) ? String(v) : v; }
  out.outliers = p.outliers;
  out.diagnostics = p.diagnostics;
  return out;
}

const results: Record<string, Record<string, unknown>> = {};
const times: Record<string, number> = {};
for (const [name, make] of cases) {
  const { t, o } = make();
  const t0 = performance.now();
  results[name] = plain(fitProfile(t, o));
  times[name] = performance.now() - t0;
}
if (mode === "save") {
  writeFileSync(file, JSON.stringify(results));
  for (const name of Object.keys(results)) console.log(`${name.padEnd(40)} ${times[name].toFixed(0).padStart(6)} ms  saved`);
} else {
  const ref = JSON.parse(readFileSync(file, "utf8")) as Record<string, Record<string, unknown>>;
  let worstAll = 0, bad = 0;
  for (const name of Object.keys(results)) {
    const a = ref[name], b = results[name];
    if (!a) { console.log(`${name}: not in ${file}`); continue; }
    const notes: string[] = [];
    let worst = 0, worstField = "";
    for (const k of new Set([...Object.keys(a), ...Object.keys(b)])) {
      const va = a[k], vb = b[k];
      if (Array.isArray(va) && Array.isArray(vb) && va.every((x) => typeof x === "number" || typeof x === "string")) {
        if (va.length !== vb.length) { notes.push(`${k}: length ${va.length} vs ${vb.length}`); continue; }
        let big = 0;
        for (const x of [...va, ...vb]) if (typeof x === "number") big = Math.max(big, Math.abs(x));
        let d = 0, pattern = 0;
        for (let i = 0; i < va.length; ++i) {
          const x = va[i], y = vb[i];
          if (typeof x !== "number" || typeof y !== "number") { if (x !== y) ++pattern; continue; }
          if (k === "flags" || k === "inputRow") { if (x !== y) ++pattern; continue; }
          d = Math.max(d, x === y ? 0 : Math.abs(x - y) / Math.max(Math.abs(x), Math.abs(y), 1e-12 * big));
        }
        if (pattern > 0) notes.push(`${k}: ${pattern} differing flags/NaN/rows`);
        if (d > worst) { worst = d; worstField = k; }
      } else if (typeof va === "number" && typeof vb === "number") {
        const d = va === vb ? 0 : Math.abs(va - vb) / Math.max(Math.abs(va), Math.abs(vb));
        if (d > worst) { worst = d; worstField = k; }
      } else if (JSON.stringify(va) !== JSON.stringify(vb)) notes.push(`${k}: ${JSON.stringify(va)?.slice(0, 200)} vs ${JSON.stringify(vb)?.slice(0, 200)}`);
    }
    worstAll = Math.max(worstAll, worst);
    const fail = worst > 1e-9 || notes.length > 0;
    if (fail) ++bad;
    console.log(`${name.padEnd(40)} ${times[name].toFixed(0).padStart(6)} ms  max rel diff ${worst.toExponential(2)}${worstField ? ` (${worstField})` : ""}${fail ? "  FAIL" : ""}${notes.length ? "\n    " + notes.join("\n    ") : ""}`);
  }
  console.log(`worst ${worstAll.toExponential(2)}; ${bad} case(s) failing`);
  if (bad > 0) process.exitCode = 1;
}
