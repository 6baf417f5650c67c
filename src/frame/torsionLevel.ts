import { addInto, derivativesAt, drawCoefPerturbation, kappaTauAt, noiseProbes, type GridBasis } from "./bootstrap.js";
import { kappaTau } from "./curve.js";
import type { Skyline } from "./skyline.js";
import { solveAt, type SmoothFit, type Smoother } from "./smoother.js";
import { hypot3 } from "./hypot3.js";

/**
 * Noise probes closed under sign flips of the coordinates: each of `base` seeded standard-normal
 * draws (3K, coefficient-major) in all 8 sign patterns of (x, y, z). A mirror image of the data is,
 * in the canonical frame, the data with some coordinates' signs flipped, and its right-hand-side
 * law is the flipped law (the envelope factor of D C D is D L D); a probe set closed under the
 * flips gives it the same set of curvature and torsion perturbations, so every decision taken on
 * the probes (the levels) is exactly mirror-symmetric and a mirror image gets exactly -tau.
 */
export function symmetricProbes(K: number, base: number, seed: number): ReturnType<typeof noiseProbes> {
  const raw = noiseProbes(K, base, seed);
  const xis: Float64Array[] = [];
  for (const xi of raw.xis) {
    for (let pattern = 0; pattern < 8; ++pattern) {
      const f = xi.slice();
      for (let c = 0; c < 3; ++c) if (pattern & (1 << c)) for (let k = c; k < f.length; k += 3) f[k] = -f[k];
      xis.push(f);
    }
  }
  return { ...raw, xis };
}

/** Outcome of the balancing rule. */
export interface BalancedLevel {
  readonly fit: SmoothFit;
  /** The chosen level over the pilot level. */
  readonly factorOfPilot: number;
  /** The scan reached its largest level without a significant change (the level may be larger still). */
  readonly atTop: boolean;
  /** Grid points the rule scored. */
  readonly scored: number;
}

/**
 * Smoothing level for a derivative quantity (torsion by default) by a Lepski-type balancing rule
 * (Lepskii 1990, Theory Probab. Appl. 35:454; for regularisation: Mathe 2006, Inverse Problems 22:
 * from memory). The third derivative wants more smoothing than positions or curvature (Rice &
 * Rosenblatt 1983, Ann. Stat. 11:141), but its bias can never be estimated reliably, only its noise.
 *
 * On a ladder of levels lambda_k = pilot x 10^(k/8), k = 0..8 maxDecades (eighth decades: with
 * quarter decades the choice jumped by a factor 1.8 between near-identical inputs), the quantity q_k is
 * computed on a FIXED set of grid points (interior, and where the pilot curvature is resolved: 3
 * noise standard deviations), with its noise from `probes` draws (rounded to a multiple of 8, see
 * `symmetricProbes`) of normal-plane noise pushed through each level's factor (common random
 * numbers). The chosen level is the largest k (scanning up, stopping at the first failure) whose
 * change against every less-smoothed level j < k, with the noise part of that change taken out,
 * stays within the noise of level j:
 *   mean (q_k - q_j)^2 - mean Var(q_k - q_j) <= c^2 mean Var(q_j),
 * i.e. smoothing more adds a bias no larger than c noise SDs of the less-smoothed answer. Without
 * the Var(q_k - q_j) term (the plain rule) the change against the pilot reaches the pilot's whole
 * noise SD once the noise is smoothed away, so the rule stopped on noise alone: on a trefoil knot
 * at 1% noise it stopped near 1 decade while the torsion error kept falling to 1.75 decades.
 * c = 0.85, measured (bench/families.ts, five non-planar families, N 200 and 1000, noise 0.2% and
 * 1%): seeds 1-6 tuned, 113/120 within 1.5x of the best single level (plain rule 110), seeds 7-12
 * unseen, 109/120 (plain 109) and every case within 2x (plain: 2 cases at 2.4x and 2.8x); c = 1
 * lowered the mean coverage of the truth to 0.83, c = 0.7 left cases beyond 2x.
 * Cost O(levels x (K b^2 + probes (K b + m)) + levels^2 probes m).
 */
export function balancedLevel(
  sm: Smoother, pilot: SmoothFit, C: Skyline, grid: GridBasis, interior: Uint8Array, seed: number,
  options: { quantity?: 0 | 1; probes?: number; maxDecades?: number; c?: number; stepsPerDecade?: number } = {},
): BalancedLevel {
  const quantity = options.quantity ?? 1, wanted = options.probes ?? 32, maxDecades = options.maxDecades ?? 5, c = options.c ?? 0.85;
  const K = sm.basis.K, m = grid.m;
  const d12 = new Float64Array(12), kt = new Float64Array(5);
  const { xis, scratch, dc } = symmetricProbes(K, Math.max(1, Math.round(wanted / 8)), seed ^ 0x5bd1e995);
  const probes = xis.length;
  // The scored set: interior points where the pilot's curvature vector is resolved.
  const kvec = new Float64Array(3 * m), kvar = new Float64Array(m), q0 = new Float64Array(m);
  for (let j = 0; j < m; ++j) {
    kappaTauAt(grid, pilot.coef, null, j, d12, kt);
    q0[j] = kt[quantity];
    kvec[3 * j] = kt[2]; kvec[3 * j + 1] = kt[3]; kvec[3 * j + 2] = kt[4];
  }
  const cs = new Float64Array(3 * K);
  for (const xi of xis) {
    drawCoefPerturbation(C, pilot.factor, xi, dc, scratch);
    addInto(pilot.coef, dc, cs);
    curvatureSpread(grid, cs, kvec, kvar, d12, kt);
  }
  const use: number[] = [];
  for (let j = 0; j < m; ++j) {
    const sd = Math.sqrt(kvar[j] / (2 * probes));
    const k = hypot3(kvec[3 * j], kvec[3 * j + 1], kvec[3 * j + 2]);
    if (interior[j] && (quantity === 0 || k > 3 * sd) && Number.isFinite(q0[j])) use.push(j);
  }
  if (use.length === 0) return { fit: pilot, factorOfPilot: 1, atTop: false, scored: 0 };
  const M = use.length;
  const useIdx = Int32Array.from(use);
  // Per level: values, per-probe perturbations (point-major) and the mean noise variance.
  const levels: { fit: SmoothFit; q: Float64Array; qp: Float64Array; var: number }[] = [];
  const evalLevel = (f: number) => {
    const fit = f === 0 ? pilot : solveAt(sm, pilot.lambda * Math.pow(10, f));
    const q = new Float64Array(M), qp = new Float64Array(M * probes);
    for (let a = 0; a < M; ++a) q[a] = kappaTauAt(grid, fit.coef, null, use[a], d12, kt)[quantity];
    let s2 = 0;
    for (let p = 0; p < probes; ++p) {
      drawCoefPerturbation(C, fit.factor, xis[p], dc, scratch);
      addInto(fit.coef, dc, cs);
      s2 = probeChanges(grid, cs, useIdx, quantity, q, qp, p, probes, s2, d12, kt);
    }
    return { fit, q, qp, var: s2 / (probes * M) };
  };
  levels.push(evalLevel(0));
  let chosen = 0;
  const steps = options.stepsPerDecade ?? 8;
  const top = steps * maxDecades;
  for (let k = 1; k <= top; ++k) {
    const lv = evalLevel(k / steps);
    let ok = true;
    for (let j = 0; j < levels.length && ok; ++j) {
      ok = biasChange(lv.q, lv.qp, levels[j].q, levels[j].qp, probes) <= c * c * levels[j].var;
    }
    if (!ok) break;
    levels.push(lv);
    chosen = k;
  }
  return { fit: levels[chosen].fit, factorOfPilot: Math.pow(10, chosen / steps), atTop: chosen === top, scored: use.length };
}

/**
 * The curvature vector's squared deviation from kvec at every grid point, added to kvar, for the
 * perturbed coefficients cs = coef + dc (formed once per probe: the sums of
 * `kappaTauAt(grid, coef, dc, ...)`, bit-identical).
 */
function curvatureSpread(grid: GridBasis, cs: Float64Array, kvec: Float64Array, kvar: Float64Array, d12: Float64Array, kt: Float64Array): void {
  for (let j = 0; j < grid.m; ++j) {
    derivativesAt(grid, cs, j, d12);
    kappaTau(d12, kt);
    kvar[j] += (kt[2] - kvec[3 * j]) ** 2 + (kt[3] - kvec[3 * j + 1]) ** 2 + (kt[4] - kvec[3 * j + 2]) ** 2;
  }
}

/** Probe p's change of the quantity against q at the scored points into qp (point-major; non-finite
 * values count 0), returning s2 plus its squares (for cs = coef + dc, as `curvatureSpread`). */
function probeChanges(
  grid: GridBasis, cs: Float64Array, use: Int32Array, quantity: number, q: Float64Array, qp: Float64Array, p: number, probes: number, s2: number, d12: Float64Array, kt: Float64Array,
): number {
  for (let a = 0; a < use.length; ++a) {
    derivativesAt(grid, cs, use[a], d12);
    const t = kappaTau(d12, kt)[quantity];
    const e = Number.isFinite(t) ? t - q[a] : 0;
    qp[a * probes + p] = e;
    s2 += e * e;
  }
  return s2;
}

/** Probe p's deviation of the quantity from q at the scored points into qp (point-major; for cs = coef + dc, as `curvatureSpread`). */
function probeDeviations(
  grid: GridBasis, cs: Float64Array, use: Int32Array, quantity: number, q: Float64Array, qp: Float64Array, p: number, probes: number, d12: Float64Array, kt: Float64Array,
): void {
  for (let a = 0; a < use.length; ++a) {
    derivativesAt(grid, cs, use[a], d12);
    qp[a * probes + p] = kappaTau(d12, kt)[quantity] - q[a];
  }
}

/**
 * Mean squared change between two levels' values with its noise part taken out:
 * mean (q_k - q_j)^2 - mean Var(q_k - q_j), the variance from the common-random-number probes
 * (perturbations point-major, `probes` per point). Points where either value is not finite are
 * skipped; Infinity when none is left.
 */
export function biasChange(qk: Float64Array, pk: Float64Array, qj: Float64Array, pj: Float64Array, probes: number): number {
  let d2 = 0, vd = 0, cnt = 0;
  for (let a = 0; a < qk.length; ++a) {
    const d = qk[a] - qj[a];
    if (!Number.isFinite(d)) continue;
    d2 += d * d; ++cnt;
    for (let p = a * probes, e = p + probes; p < e; ++p) vd += (pk[p] - pj[p]) ** 2;
  }
  return cnt > 0 ? (d2 - vd / probes) / cnt : Infinity;
}

/**
 * Smoothing level for a derivative quantity (the curvature by default) by an unbiased estimate of
 * its summed squared error. With q_k a level's values on the scored points and q_0 the pilot's
 * (the least-smoothed level, its bias taken as negligible),
 * E sum (q_k - q_0)^2 = sum (b_k - b_0)^2 + sum Var(q_k - q_0), so
 * R_k = sum (q_k - q_0)^2 - sum Var(q_k - q_0) + sum Var(q_k) estimates sum b_k^2 + sum Var(q_k)
 * (an unbiased-risk / Mallows C_p argument: Mallows 1973, Technometrics 15:661; Stein 1981, Ann.
 * Stat. 9:1135; both from memory). The variances come from common-random-number probes: the same
 * noise draws pushed through every level, so differences between levels are estimated with little
 * noise. The chosen level minimises R_k over the ladder pilot x 10^(k/4), k = 0..4 maxDecades;
 * `refinedFactor` is the vertex of the parabola through it and its neighbours.
 * Unlike a plug-in risk, the bias term is not clamped at 0 (NUMERICS.md sec. 7 item 1: the clamp
 * made every level look unbiased).
 * Where the top decade of the ladder shows the linear-bias regime (`linearBiasLaw`), the squared
 * bias of every level is read off that law instead: the per-level estimate carries the pilot's
 * realised noise (sum (q_k - q_0)^2 takes the pilot's noise beyond level k for bias), and where the
 * wire holds few independent noise modes (a ring a few resolution lengths long) that noise is far
 * from its expectation: one 1000-point ring's pilot curvature noise was 3.3x its mean (the 5-95%
 * range over 200 draws spans 10x), the level came out a decade low and its curvature error 1.7x
 * the best level's. At the top of the ladder the bias dwarfs that noise. Measured
 * (bench/families.ts, 8 families, N 200 and 1000, noise 0.2% and 1%, seeds 1-18): curvature within
 * 1.2x of the best single level 535/576 against 521/576, worst 1.75x against 2.31x; per set of 6
 * seeds 181, 174, 180 of 192 against 176, 166, 179; slope thresholds 1.2 and 1.8 gave 538 and 532
 * (one case at 2.31x), no threshold 536 (the bump and Viviani's curve lost 4 cases on seeds 13-18).
 * Those figures are for a ladder 2 decades high (CURVATURE_LADDER_UP: at 2.5 with slope 1.3,
 * 544/576, worst 1.59x, but coils with curvature steps lost).
 * Cost O(levels (K b^2 + probes (K b + M))), M scored points.
 */
export function riskLevel(
  sm: Smoother, pilot: SmoothFit, C: Skyline, grid: GridBasis, interior: Uint8Array, seed: number,
  options: { quantity?: 0 | 1; probes?: number; maxDecades?: number } = {},
): BalancedLevel & { readonly risks: Float64Array; readonly refinedFactor: number; readonly biasLaw: boolean } {
  const quantity = options.quantity ?? 0, wanted = options.probes ?? 32, maxDecades = options.maxDecades ?? 3;
  const K = sm.basis.K, m = grid.m;
  const d12 = new Float64Array(12), kt = new Float64Array(5);
  const { xis, scratch, dc } = symmetricProbes(K, Math.max(1, Math.round(wanted / 8)), seed ^ 0x1b873593);
  const probes = xis.length;
  const use: number[] = [];
  for (let j = 0; j < m; ++j) if (interior[j]) use.push(j);
  const top = 4 * maxDecades;
  const risks = new Float64Array(top + 1).fill(NaN);
  if (use.length === 0) return { fit: pilot, factorOfPilot: 1, atTop: false, scored: 0, risks, refinedFactor: 1, biasLaw: false };
  const M = use.length;
  const useIdx = Int32Array.from(use), cs = new Float64Array(3 * K);
  // Per level: values and per-probe perturbations on the scored points.
  const evalLevel = (f: number) => {
    const fit = f === 0 ? pilot : solveAt(sm, pilot.lambda * Math.pow(10, f));
    const q = new Float64Array(M), qp = new Float64Array(M * probes);
    for (let a = 0; a < M; ++a) q[a] = kappaTauAt(grid, fit.coef, null, use[a], d12, kt)[quantity];
    for (let p = 0; p < probes; ++p) {
      drawCoefPerturbation(C, fit.factor, xis[p], dc, scratch);
      addInto(fit.coef, dc, cs);
      probeDeviations(grid, cs, useIdx, quantity, q, qp, p, probes, d12, kt);
    }
    return { fit, q, qp };
  };
  const base = evalLevel(0);
  // Per level: squared bias (against the pilot) and variance, mean over the scored points.
  const bias2 = new Float64Array(top + 1), variance = new Float64Array(top + 1), fits: SmoothFit[] = [];
  for (let k = 0; k <= top; ++k) {
    const lv = k === 0 ? base : evalLevel(k / 4);
    fits.push(lv.fit);
    let b2 = 0, v = 0;
    for (let a = 0; a < M; ++a) {
      const d = lv.q[a] - base.q[a];
      let vd = 0, vk = 0;
      for (let p = 0; p < probes; ++p) {
        const ek = lv.qp[a * probes + p], e0 = base.qp[a * probes + p];
        vd += (ek - e0) ** 2; vk += ek * ek;
      }
      // Each probe is one draw of the noise: the mean square over probes is the variance.
      b2 += d * d - vd / probes; v += vk / probes;
    }
    bias2[k] = b2 / M; variance[k] = v / M;
  }
  const law = linearBiasLaw(bias2, top);
  if (law) for (let k = 0; k <= top; ++k) bias2[k] = Math.pow(10, law.intercept + (law.slope * k) / 4);
  let best = 0, bestRisk = Infinity, bestFit = pilot;
  for (let k = 0; k <= top; ++k) {
    const r = bias2[k] + variance[k];
    risks[k] = r;
    if (Number.isFinite(r) && r < bestRisk) { bestRisk = r; best = k; bestFit = fits[k]; }
  }
  // The vertex of the parabola through the least risk and its two neighbours (in quarter decades,
  // at most half a step away): the level then moves continuously with the data instead of jumping
  // a quarter decade when two ladder levels trade places.
  let vertex = best;
  if (best > 0 && best < top) {
    const a = risks[best - 1], b = risks[best], c = risks[best + 1], den = a - 2 * b + c;
    if (den > 0) vertex = best + Math.max(-0.5, Math.min(0.5, (0.5 * (a - c)) / den));
  }
  return { fit: bestFit, factorOfPilot: Math.pow(10, best / 4), atTop: best === top, scored: M, risks, refinedFactor: Math.pow(10, vertex / 4), biasLaw: law !== null };
}

/**
 * Least slope (decades of squared bias per decade of level) of the linear-bias regime (see
 * CURVATURE_LADDER_UP in levels.ts for 1.3 on a taller ladder, tried and dropped).
 */
export const LINEAR_BIAS_SLOPE = 1.5;

/**
 * The squared-bias law of the top decade of a risk ladder (levels k = top - 4 .. top, quarter
 * decades), when it is that of a bias proportional to the level: a least-squares line through
 * log10 bias2_k against k / 4 over the levels where bias2_k > 0 (at least 3), accepted when its slope
 * is at least LINEAR_BIAS_SLOPE (2 in the linear regime, where a smoother's bias on a slowly varying
 * signal is proportional to its level: the leading term of the transfer function's defect
 * lambda omega^8 / (1 + lambda omega^8); it falls toward 0 as the bias saturates, when the features
 * are smoothed away): measured 0.1-1.4 on knots, bumps, bends and varying coils, 1.98-2.01 on rings;
 * on a ladder reaching 2.5 decades above the discrepancy level, bench/families.ts seeds 1-12:
 * rings 1.97-2.01, helices 1.09-1.78, conical helices 0.69-2.03, varying coils 0.59-1.35, knots,
 * Viviani's curve, bumps and bends 0.04-1.07, and a coil with curvature steps 1.56).
 * The slope is capped at 2. Null when the law does not hold.
 */
export function linearBiasLaw(bias2: Float64Array, top: number): { slope: number; intercept: number } | null {
  let sx = 0, sy = 0, sxx = 0, sxy = 0, cnt = 0;
  for (let k = Math.max(1, top - 4); k <= top; ++k) {
    if (!(bias2[k] > 0)) continue;
    const x = k / 4, y = Math.log10(bias2[k]);
    sx += x; sy += y; sxx += x * x; sxy += x * y; ++cnt;
  }
  if (cnt < 3) return null;
  const slope = (cnt * sxy - sx * sy) / (cnt * sxx - sx * sx);
  if (!(slope >= LINEAR_BIAS_SLOPE)) return null;
  const used = Math.min(slope, 2);
  // Through the centroid of the points with the (capped) slope.
  return { slope: used, intercept: (sy - used * sx) / cnt };
}
