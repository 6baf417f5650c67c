/**
 * Are the noise probes of the level rules calibrated? (run by hand:
 * `npx tsx bench/probeCalibration.ts [N] [noise] [replicates] [ratio] [noiseKind] [fixedAtLevel]`,
 * e.g. `npx tsx bench/probeCalibration.ts 1000 0.01 30 3 normal`).
 *
 * The curvature level rule (`riskLevel`) subtracts probe variances from squared differences between
 * levels; probes that miss part of the variance make it smooth too little. This bench takes one
 * invented helix (radius 1, pitch parameter 0.4, 4 turns), sampled unevenly (density ratio `ratio`,
 * fixed sampling), adds fresh seeded noise `replicates` times, and at levels from -1 to +1 decade
 * about the discrepancy level prints, over the middle 80% of the samples:
 * - the Monte Carlo SD of kappa across replicates, from the full fit (robust start and foot-point
 *   passes: the parameters depend on the noise);
 * - the same with the parameters held fixed (one replicate's parameters; the fit is then linear in
 *   the data);
 * - the probes' SD (`symmetricProbes` through `rhsNoiseFactor`'s normal-plane law, as the rule uses).
 * `noiseKind`: `iso` (isotropic, default) or `normal` (noise in the true normal plane only).
 * `fixedAtLevel` = 1 runs every replicate's passes at the first replicate's level, so the level does
 * not move with the noise estimate.
 * Environment: QUANTITY=tau scores the torsion (SDs relative to the RMS true torsion) instead of the
 * curvature; CURVE=trefoil takes the invented trefoil knot (closed), CURVE=conical a conical helix, instead of the helix; OFFSETS=0,1,2
 * sets the levels (decades about the discrepancy level).
 */
import { robustStart } from "../src/frame/profile.js";
import { runPasses, type PassesResult } from "../src/frame/passes.js";
import { makeSmoother, solveAt } from "../src/frame/smoother.js";
import { drawCoefPerturbation, gridBasis, kappaTauAt, rhsNoiseFactor } from "../src/frame/bootstrap.js";
import { symmetricProbes } from "../src/frame/torsionLevel.js";
import { evalCurve } from "../src/frame/curve.js";
import { hypot3 } from "../src/frame/hypot3.js";
import { conicalHelixCurve, denseTruth, helixCurve, numericKappaTau, sampleCurveUneven, trefoilCurve } from "../test/support/curves.js";
import { normalStream } from "../test/support/rng.js";

const N = Number(process.argv[2] ?? 1000), noise = Number(process.argv[3] ?? 0.01), reps = Number(process.argv[4] ?? 30);
const ratio = Number(process.argv[5] ?? 3), kind = process.argv[6] ?? "iso", fixedLevel = process.argv[7] === "1";
const quantity = process.env.QUANTITY === "tau" ? 1 : 0;
const curve = process.env.CURVE === "trefoil" ? trefoilCurve(1) : process.env.CURVE === "conical" ? conicalHelixCurve(1, 3) : helixCurve(1, 0.4, 4);
// The reference the SDs are relative to: the RMS of the true quantity along the curve.
const dense = denseTruth(curve, 20000), trueQ = quantity ? dense.tau : dense.kappa;
const k0 = Math.sqrt(trueQ.reduce((a, v) => a + v * v, 0) / trueQ.length);
const offsets = (process.env.OFFSETS ?? "-1,-0.5,0,0.5,1").split(",").map(Number);
const lo = Math.floor(0.1 * N), hi = Math.ceil(0.9 * N);

/** Noisy samples: the same sampling (seed phase) for every replicate, fresh noise; `normal` removes the true tangential part. */
function sample(rep: number): Float64Array {
  const { xyz, t } = sampleCurveUneven(curve, N, noise * curve.radius, 507 + 7 * rep, ratio);
  if (kind !== "normal") return xyz;
  const out = new Float64Array(xyz);
  for (let i = 0; i < N; ++i) {
    const p = curve.r(t[i]), a = curve.r(t[i] - 1e-6), b = curve.r(t[i] + 1e-6);
    const tg = [b[0] - a[0], b[1] - a[1], b[2] - a[2]], tn = hypot3(tg[0], tg[1], tg[2]);
    const e = [0, 1, 2].map((q) => xyz[3 * i + q] - p[q]);
    const et = (e[0] * tg[0] + e[1] * tg[1] + e[2] * tg[2]) / tn;
    for (let q = 0; q < 3; ++q) out[3 * i + q] = p[q] + e[q] - (et * tg[q]) / tn;
  }
  return out;
}

function tangents(fit: PassesResult): Float64Array {
  const { basis, sel, u } = fit, n = u.length;
  const out = new Float64Array(3 * n), d12 = new Float64Array(12), st = new Float64Array(1), sb = new Float64Array(24);
  for (let i = 0; i < n; ++i) {
    evalCurve(basis, sel.fit.coef, u[i], 1, d12, st, sb);
    const sp = hypot3(d12[3], d12[4], d12[5]);
    for (let q = 0; q < 3; ++q) out[3 * i + q] = d12[3 + q] / sp;
  }
  return out;
}

// The true quantity at each input point (relative to the reference), for the bias of the mean fit.
const tTrue = sampleCurveUneven(curve, N, 0, 507, ratio).t;
const qTrue = Float64Array.from(tTrue, (t) => numericKappaTau(curve, t)[quantity] / k0);
const full = offsets.map(() => ({ s: new Float64Array(N), s2: new Float64Array(N) }));
const fixedU = offsets.map(() => ({ s: new Float64Array(N), s2: new Float64Array(N) }));
const probeVar = new Float64Array(offsets.length);
const d12 = new Float64Array(12), kt = new Float64Array(5);
let lambda0 = 0, segments0 = 0, sigmaRatio = 0;
let first: { fit: PassesResult; scale: number; truth: Float64Array; kept: Int32Array } | null = null;
for (let rep = 0; rep < reps; ++rep) {
  const trace = { xyz: sample(rep), dims: 3 as const, source: { file: "calibration", unit: "m" as const }, diagnostics: [] };
  const notes: string[] = [];
  const start = robustStart(trace, {}, notes);
  const fit = runPasses(trace, start, { passes: 3, ...(fixedLevel && rep > 0 ? { lambda: lambda0, segments: segments0 } : {}) }, notes);
  const scale = start.canon.scale;
  if (rep === 0) { lambda0 = fit.sel.fit.lambda; segments0 = fit.basis.nseg; }
  sigmaRatio += (fit.sel.sigma * scale) / (noise * curve.radius);
  const level = fixedLevel ? lambda0 : fit.sel.fit.lambda;
  const gb = gridBasis(fit.basis, fit.u);
  const C = rhsNoiseFactor(fit.basis, fit.u, fit.w, tangents(fit), fit.sel.sigma, 2);
  const { xis, scratch, dc } = symmetricProbes(fit.basis.K, 4, 99 + rep);
  offsets.forEach((o, l) => {
    const f = solveAt(fit.smoother, level * Math.pow(10, o));
    const q = new Float64Array(N);
    for (let i = 0; i < N; ++i) {
      q[i] = kappaTauAt(gb, f.coef, null, i, d12, kt)[quantity];
      const e = q[i] / scale / k0, pt = start.kept[i];
      full[l].s[pt] += e; full[l].s2[pt] += e * e;
    }
    let v = 0, cnt = 0;
    for (const xi of xis) {
      drawCoefPerturbation(C, f.factor, xi, dc, scratch);
      for (let i = lo; i < hi; ++i) { v += ((kappaTauAt(gb, f.coef, dc, i, d12, kt)[quantity] - q[i]) / scale / k0) ** 2; ++cnt; }
    }
    probeVar[l] += v / cnt / reps;
  });
  if (rep === 0) {
    // The first replicate's parameters and frame, and the true points in that frame.
    const { Q, centre } = start.canon, n = fit.u.length, truth = new Float64Array(3 * n);
    const { t } = sampleCurveUneven(curve, N, 0, 507, ratio);
    for (let i = 0; i < n; ++i) {
      const p = curve.r(t[start.kept[i]]), v = [p[0] - centre[0], p[1] - centre[1], p[2] - centre[2]];
      for (let r = 0; r < 3; ++r) truth[3 * i + r] = (Q[3 * r] * v[0] + Q[3 * r + 1] * v[1] + Q[3 * r + 2] * v[2]) / scale;
    }
    first = { fit, scale, truth, kept: start.kept };
  }
}
// Parameters held fixed: the first replicate's parameters, weights and knots; fresh noise of the
// same law (isotropic, or projected on the fit's normal plane) on the true points.
{
  const { fit, scale, truth } = first!;
  const n = fit.u.length, tan = tangents(fit), gb = gridBasis(fit.basis, fit.u), g = normalStream(12345);
  for (let rep = 0; rep < reps; ++rep) {
    const y = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) {
      const e = [g(), g(), g()].map((v) => v * fit.sel.sigma);
      const et = kind === "normal" ? e[0] * tan[3 * i] + e[1] * tan[3 * i + 1] + e[2] * tan[3 * i + 2] : 0;
      for (let q = 0; q < 3; ++q) y[3 * i + q] = truth[3 * i + q] + e[q] - et * tan[3 * i + q];
    }
    const sm = makeSmoother(fit.basis, fit.u, y, fit.w);
    offsets.forEach((o, l) => {
      const f = solveAt(sm, fit.sel.fit.lambda * Math.pow(10, o));
      for (let i = 0; i < n; ++i) {
        const e = kappaTauAt(gb, f.coef, null, i, d12, kt)[quantity] / scale / k0;
        fixedU[l].s[i] += e; fixedU[l].s2[i] += e * e;
      }
    });
  }
}
const sd = (acc: { s: Float64Array; s2: Float64Array }) => {
  let v = 0;
  for (let i = lo; i < hi; ++i) { const m = acc.s[i] / reps; v += ((acc.s2[i] / reps - m * m) * reps) / (reps - 1); }
  return Math.sqrt(v / (hi - lo));
};
console.log(`${curve.name} (${quantity ? "torsion" : "curvature"}), N=${N}, noise ${noise} of the radius (${kind}), sampling ratio ${ratio}:1, ${reps} replicates, level ${fixedLevel ? "fixed" : "per replicate"}; noise estimate / truth ${(sigmaRatio / reps).toFixed(3)}`);
// RMS bias of the mean fit, less the noise left in a mean of `reps` replicates (its variance / reps).
const bias = (acc: { s: Float64Array; s2: Float64Array }) => {
  let v = 0;
  for (let i = lo; i < hi; ++i) {
    const m = acc.s[i] / reps, vi = ((acc.s2[i] / reps - m * m) * reps) / (reps - 1);
    v += (m - qTrue[i]) ** 2 - vi / reps;
  }
  return Math.sqrt(Math.max(0, v / (hi - lo)));
};
console.log("decades  SD full fit  SD fixed params  SD probes  full/probes  bias full fit   (relative to the RMS true value, %)");
offsets.forEach((o, l) => {
  const a = sd(full[l]), b = sd(fixedU[l]), p = Math.sqrt(probeVar[l]);
  console.log(`${(o >= 0 ? "+" : "") + o.toFixed(2)}    ${(100 * a).toFixed(3).padStart(8)}    ${(100 * b).toFixed(3).padStart(8)}      ${(100 * p).toFixed(3).padStart(8)}    ${(a / p).toFixed(2).padStart(6)}   ${(100 * bias(full[l])).toFixed(3).padStart(8)}`);
});
