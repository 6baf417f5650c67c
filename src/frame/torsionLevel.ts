import { drawCoefPerturbation, kappaTauAt, noiseProbes, type GridBasis } from "./bootstrap.js";
import type { Skyline } from "./skyline.js";
import { solveAt, type SmoothFit, type Smoother } from "./smoother.js";

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
 * On a ladder of levels lambda_k = pilot x 10^(k/4), k = 0..4 maxDecades, the quantity q_k is
 * computed on a FIXED set of grid points (interior, and where the pilot curvature is resolved: 3
 * noise standard deviations), with its noise standard deviation SD_k from `probes` draws of
 * normal-plane noise pushed through each level's factor (common random numbers). The chosen level
 * is the largest k whose RMS difference to every less-smoothed level j < k stays within
 * c x RMS(SD_j): smoothing more changes the answer by no more than the noise of the less-smoothed
 * answers. Cost O(levels x (K b^2 + probes (K b + m))).
 */
export function balancedLevel(
  sm: Smoother, pilot: SmoothFit, C: Skyline, grid: GridBasis, interior: Uint8Array, seed: number,
  options: { quantity?: 0 | 1; probes?: number; maxDecades?: number; c?: number } = {},
): BalancedLevel {
  const quantity = options.quantity ?? 1, probes = options.probes ?? 16, maxDecades = options.maxDecades ?? 5, c = options.c ?? 1;
  const K = sm.basis.K, m = grid.m;
  const d12 = new Float64Array(12), kt = new Float64Array(5);
  const { xis, scratch, dc } = noiseProbes(K, probes, seed ^ 0x5bd1e995);
  // The scored set: interior points where the pilot's curvature vector is resolved.
  const kvec = new Float64Array(3 * m), kvar = new Float64Array(m), q0 = new Float64Array(m);
  for (let j = 0; j < m; ++j) {
    kappaTauAt(grid, pilot.coef, null, j, d12, kt);
    q0[j] = kt[quantity];
    kvec[3 * j] = kt[2]; kvec[3 * j + 1] = kt[3]; kvec[3 * j + 2] = kt[4];
  }
  for (const xi of xis) {
    drawCoefPerturbation(C, pilot.factor, xi, dc, scratch);
    for (let j = 0; j < m; ++j) {
      kappaTauAt(grid, pilot.coef, dc, j, d12, kt);
      kvar[j] += (kt[2] - kvec[3 * j]) ** 2 + (kt[3] - kvec[3 * j + 1]) ** 2 + (kt[4] - kvec[3 * j + 2]) ** 2;
    }
  }
  const use: number[] = [];
  for (let j = 0; j < m; ++j) {
    const sd = Math.sqrt(kvar[j] / (2 * probes));
    const k = Math.hypot(kvec[3 * j], kvec[3 * j + 1], kvec[3 * j + 2]);
    if (interior[j] && (quantity === 0 || k > 3 * sd) && Number.isFinite(q0[j])) use.push(j);
  }
  if (use.length === 0) return { fit: pilot, factorOfPilot: 1, atTop: false, scored: 0 };
  const levels: { fit: SmoothFit; q: Float64Array; sd: number }[] = [];
  const evalLevel = (f: number) => {
    const fit = f === 0 ? pilot : solveAt(sm, pilot.lambda * Math.pow(10, f));
    const q = new Float64Array(use.length), v = new Float64Array(use.length);
    for (let a = 0; a < use.length; ++a) q[a] = kappaTauAt(grid, fit.coef, null, use[a], d12, kt)[quantity];
    for (const xi of xis) {
      drawCoefPerturbation(C, fit.factor, xi, dc, scratch);
      for (let a = 0; a < use.length; ++a) {
        const t = kappaTauAt(grid, fit.coef, dc, use[a], d12, kt)[quantity];
        if (Number.isFinite(t)) v[a] += (t - q[a]) ** 2;
      }
    }
    let s2 = 0;
    for (let a = 0; a < use.length; ++a) s2 += v[a] / probes;
    return { fit, q, sd: Math.sqrt(s2 / use.length) };
  };
  levels.push(evalLevel(0));
  let chosen = 0;
  const top = 4 * maxDecades;
  for (let k = 1; k <= top; ++k) {
    const lv = evalLevel(k / 4);
    let ok = true;
    for (let j = 0; j < levels.length && ok; ++j) {
      let d2 = 0, cnt = 0;
      for (let a = 0; a < use.length; ++a) {
        const d = lv.q[a] - levels[j].q[a];
        if (Number.isFinite(d)) { d2 += d * d; ++cnt; }
      }
      ok = cnt > 0 && Math.sqrt(d2 / cnt) <= c * levels[j].sd;
    }
    if (!ok) break;
    levels.push(lv);
    chosen = k;
  }
  return { fit: levels[chosen].fit, factorOfPilot: Math.pow(10, chosen / 4), atTop: chosen === top, scored: use.length };
}
