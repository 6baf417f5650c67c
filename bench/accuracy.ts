/**
 * Accuracy benchmark (run by hand: `npx tsx bench/accuracy.ts [N] [curves] [noises]`).
 * For each synthetic curve and noise level (a fraction of the smallest curvature radius) it prints
 * the relative RMS error of kappa and tau against the truth at interior samples, for the automatic
 * smoothing and for the best single global level found by scanning lambda with the truth
 * (the "oracle"), their ratio, and the 95% band coverage. Invented synthetic curves, seeded.
 */
import { fitProfile, type ProfileOptions } from "../src/frame/profile.js";
import { FLAG_END } from "../src/types.js";
import {
  bendCurve, bumpCurve, circleCurve, conicalHelixCurve, denseTruth, helixCurve, matchTruth, sampleCurve,
  trefoilCurve, vivianiCurve, type TestCurve,
} from "../test/support/curves.js";

const N = Number(process.argv[2] ?? 1000);
const pick = process.argv[3]?.split(",");
const noises = (process.argv[4] ?? "0.002,0.01,0.03").split(",").map(Number);

const curves: TestCurve[] = [
  helixCurve(1, 0.4, 4), trefoilCurve(1), conicalHelixCurve(1, 3), vivianiCurve(1),
  bumpCurve(10, 0.6, 1), bendCurve(4, 0.5), circleCurve(1),
].filter((c) => !pick || pick.includes(c.name));

interface Score { k: number; t: number; covK: number; covT: number; lambda: number; segments: number }

function score(curve: TestCurve, xyz: Float64Array, truth: ReturnType<typeof denseTruth>, opts: ProfileOptions): Score {
  const p = fitProfile({ xyz, dims: 3, closed: curve.closed, source: { file: curve.name, unit: "m" }, diagnostics: [] }, opts);
  const idx = matchTruth(truth, p.x, p.y, p.z, curve.closed);
  let ek = 0, rk = 0, et = 0, rt = 0, ck = 0, ct = 0, nk = 0, nt = 0;
  for (let j = 0; j < p.n; ++j) {
    if (p.flags[j] & FLAG_END) continue;
    const k = truth.kappa[idx[j]], t = truth.tau[idx[j]];
    ek += (p.kappa[j] - k) ** 2; rk += k * k; ++nk;
    if (p.kappaLo[j] <= k && k <= p.kappaHi[j]) ++ck;
    const tj = Number.isNaN(p.tau[j]) ? 0 : p.tau[j];
    et += (tj - t) ** 2; rt += t * t; ++nt;
    if (Number.isNaN(p.tau[j]) || (p.tauLo[j] <= t && t <= p.tauHi[j])) ++ct;
  }
  // Planar curves have tau = 0: report the error relative to the RMS curvature instead.
  const tScale = rt > 1e-12 * rk ? rt : rk;
  return { k: Math.sqrt(ek / rk), t: Math.sqrt(et / tScale), covK: ck / nk, covT: ct / nt, lambda: p.lambda, segments: p.segments };
}

const rows: string[] = [];
rows.push("curve          noise   kappa_auto kappa_best ratio | tau_auto  tau_best  ratio | covK  covT");
for (const curve of curves) {
  const truth = denseTruth(curve, 20 * N);
  for (const noise of noises) {
    const { xyz } = sampleCurve(curve, N, noise * curve.radius, 11);
    const auto = score(curve, xyz, truth, { bootstrap: 200, ...(process.env.KAPPA_LEVEL === "risk" ? { kappaLevel: "risk" as const } : {}) });
    let bestK = Infinity, bestT = Infinity, eK = 0, eT = 0;
    for (let e = -12; e <= 12; ++e) {
      const lam = auto.lambda * Math.pow(10, e / 4);
      const s = score(curve, xyz, truth, { bootstrap: 0, lambda: lam, segments: auto.segments });
      if (s.k < bestK) { bestK = s.k; eK = e / 4; }
      if (s.t < bestT) { bestT = s.t; eT = e / 4; }
    }
    const f = (v: number) => (100 * v).toFixed(2).padStart(7) + "%";
    rows.push(`${curve.name.padEnd(14)} ${(noise * 100).toFixed(1).padStart(4)}% ${f(auto.k)} ${f(bestK)}  ${(auto.k / bestK).toFixed(2)} | ${f(auto.t)} ${f(bestT)}  ${(auto.t / bestT).toFixed(2)} | ${auto.covK.toFixed(2)}  ${auto.covT.toFixed(2)} | best log10(lambda/auto) k ${eK} t ${eT}`);
    console.log(rows[rows.length - 1]);
  }
}
