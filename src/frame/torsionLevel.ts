import type { Skyline } from "./skyline.js";
import { drawCoefPerturbation, kappaTauAt, normalGenerator, type GridBasis } from "./bootstrap.js";
import { solveAt, wavelengthForLambda, type SmoothFit, type Smoother } from "./smoother.js";

/** Arc length of each grid point, the curve length, and what sets the resolution length. */
export interface EndMargin {
  readonly s: Float64Array;
  readonly length: number;
  readonly closed: boolean;
  readonly rho: number;
  readonly h: number;
}
import { solveLdl, symMul } from "./skyline.js";

/**
 * Smoothing level for torsion by a plug-in risk estimate (torsion needs the third derivative, which
 * wants more smoothing than positions or curvature: Rice & Rosenblatt 1983, Ann. Stat. 11:141).
 *
 * For each candidate lambda >= the pilot level, the risk of tau over the interior grid is
 *   sum_j v_j [ (tau_lambda[pilot]_j - tau_pilot_j)^2 + Var_j(tau_lambda) ],
 * where tau_lambda[pilot] smooths the pilot curve itself (its coefficients map through
 * (G + lambda P)^{-1} G c_pilot: the extra bias that lambda adds), and the variance comes from
 * `probes` draws of normal-plane noise with common random numbers across lambda (so the risk curve
 * is smooth in lambda). v_j = 1 where the pilot curvature is resolved (3 noise standard deviations),
 * 0 elsewhere: torsion is not defined where curvature vanishes. The plug-in principle: Ruppert,
 * Sheather & Wand 1995, JASA 90:1257 (from memory). Cost O(levels * (K b^2 + probes (K b + m))).
 */
export function torsionLevel(
  sm: Smoother, pilot: SmoothFit, C: Skyline, grid: GridBasis, ends: EndMargin, seed: number,
  quantity: 0 | 1 = 1, probes = 12, maxDecades = 5,
): { fit: SmoothFit; factorOfPilot: number } {
  const interior = new Uint8Array(grid.m).fill(1);
  const K = sm.basis.K, m = grid.m;
  const d12 = new Float64Array(12), kt = new Float64Array(5);
  const rnd = normalGenerator(seed ^ 0x5bd1e995);
  const xis: Float64Array[] = [];
  for (let p = 0; p < probes; ++p) {
    const xi = new Float64Array(3 * K);
    for (let k = 0; k < 3 * K; ++k) xi[k] = rnd();
    xis.push(xi);
  }
  const scratch: { db: Float64Array; rhs: Float64Array; sol: Float64Array; sqrtD?: Float64Array } = { db: new Float64Array(3 * K), rhs: new Float64Array(K), sol: new Float64Array(K) };
  const dc = new Float64Array(3 * K);
  // Pilot torsion, and which grid points carry a resolved curvature (gate from the pilot's noise).
  const tauPilot = new Float64Array(m), kvec = new Float64Array(3 * m), kvar = new Float64Array(m);
  for (let j = 0; j < m; ++j) {
    kappaTauAt(grid, pilot.coef, null, j, d12, kt);
    tauPilot[j] = kt[quantity];
    kvec[3 * j] = kt[2]; kvec[3 * j + 1] = kt[3]; kvec[3 * j + 2] = kt[4];
  }
  for (const xi of xis) {
    drawCoefPerturbation(C, pilot.factor, xi, dc, scratch);
    for (let j = 0; j < m; ++j) {
      kappaTauAt(grid, pilot.coef, dc, j, d12, kt);
      kvar[j] += (kt[2] - kvec[3 * j]) ** 2 + (kt[3] - kvec[3 * j + 1]) ** 2 + (kt[4] - kvec[3 * j + 2]) ** 2;
    }
  }
  const gate = new Uint8Array(m);
  let used = 0;
  for (let j = 0; j < m; ++j) {
    const sd = Math.sqrt(kvar[j] / (2 * probes));
    const k = Math.hypot(kvec[3 * j], kvec[3 * j + 1], kvec[3 * j + 2]);
    gate[j] = interior[j] && (quantity === 0 || k > 3 * sd) && Number.isFinite(tauPilot[j]) ? 1 : 0;
    used += gate[j];
  }
  if (used === 0) return { fit: pilot, factorOfPilot: 1 };
  // G c_pilot, the right-hand side that reproduces the pilot curve as data.
  const G = sm.normal.G;
  const GdcOf = (v: Float64Array) => {
    const out = new Float64Array(3 * K);
    for (let c = 0; c < 3; ++c) symMul(G, v, c * K, out.subarray(c * K, (c + 1) * K));
    return out;
  };
  const Gc = GdcOf(pilot.coef);
  // Pilot-noise probes: dc_k = A_pilot^{-1} dB_k, used to remove the pilot's own noise from the bias term.
  const pilotDc: Float64Array[] = xis.map((xi) => drawCoefPerturbation(C, pilot.factor, xi, new Float64Array(3 * K), scratch).slice());
  const pilotGdc = pilotDc.map(GdcOf);
  const smoothBy = (factor: Skyline, rhs: Float64Array) => {
    const out = new Float64Array(3 * K), sol = new Float64Array(K);
    for (let c = 0; c < 3; ++c) {
      solveLdl(factor, rhs.subarray(c * K, (c + 1) * K), sol);
      out.set(sol, c * K);
    }
    return out;
  };
  const q = (cf: Float64Array, d: Float64Array | null, j: number) => kappaTauAt(grid, cf, d, j, d12, kt)[quantity];
  const risk = (logF: number): { r: number; fit: SmoothFit } => {
    const fit = solveAt(sm, pilot.lambda * Math.pow(10, logF));
    // Score only points farther than one resolution length of this level from an open end, as the
    // profile flags the rest: end bias would otherwise cap the level for the interior.
    const margin = ends.closed ? 0 : wavelengthForLambda(fit.lambda, ends.rho, ends.h);
    const use = new Uint8Array(m);
    let count = 0;
    for (let j = 0; j < m; ++j) {
      use[j] = gate[j] && ends.s[j] > margin && ends.s[j] < ends.length - margin ? 1 : 0;
      count += use[j];
    }
    if (count === 0) return { r: Infinity, fit };
    const cl = smoothBy(fit.factor, Gc);
    const tl = new Float64Array(m);
    const diff = new Float64Array(m);
    for (let j = 0; j < m; ++j) {
      if (!use[j]) continue;
      tl[j] = q(cl, null, j);
      diff[j] = tl[j] - tauPilot[j];
    }
    // Bias^2 of smoothing more, net of the pilot noise it also removes:
    // E[(S q_p - q_p)^2] = bias^2 + Var(S q_p - q_p), the variance estimated from the probes.
    const noiseOfDiff = new Float64Array(m);
    for (let k = 0; k < probes; ++k) {
      const sd = smoothBy(fit.factor, pilotGdc[k]);
      for (let j = 0; j < m; ++j) {
        if (!use[j]) continue;
        const e = q(cl, sd, j) - q(pilot.coef, pilotDc[k], j) - diff[j];
        noiseOfDiff[j] += e * e;
      }
    }
    let bias = 0, vr = 0;
    for (let j = 0; j < m; ++j) if (use[j]) bias += diff[j] * diff[j] - noiseOfDiff[j] / probes;
    bias = Math.max(bias, 0);
    for (const xi of xis) {
      drawCoefPerturbation(C, fit.factor, xi, dc, scratch);
      for (let j = 0; j < m; ++j) {
        if (!use[j]) continue;
        const t = q(cl, dc, j);
        vr += (t - tl[j]) ** 2;
      }
    }
    return { r: (bias + vr / probes) / count, fit };
  };
  // Half-decade scan, then the quarter decades on either side of the best point.
  let best = risk(0), bestF = 0;
  for (let e = 1; e <= 2 * maxDecades; ++e) {
    const f = e / 2;
    const v = risk(f);
    if (v.r < best.r) { best = v; bestF = f; }
    else if (f - bestF >= 2) break;
  }
  for (const f of [bestF - 0.25, bestF + 0.25]) {
    if (f < 0) continue;
    const v = risk(f);
    if (v.r < best.r) { best = v; bestF = f; }
  }
  return { fit: best.fit, factorOfPilot: Math.pow(10, bestF) };
}
