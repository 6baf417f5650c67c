/**
 * Spatially adaptive curvature: a local balancing rule over a ladder of global smoothing levels
 * (locally adaptive Lepski selection: Lepski, Mammen & Spokoiny 1997, Ann. Stat. 25:929, from
 * memory; NUMERICS.md sec. 7 item 8 names spatial adaptivity as the open problem). Where the
 * curvature varies slowly (a helix, a ring) the rule smooths more than any single global level may;
 * where it changes fast (a bump, a knot's tight turns, a bend) it smooths less.
 *
 * Status: opt-in (`ProfileOptions.adaptive`), experimental. Against the discrepancy level it beat
 * the best single global level on the bump and the sharp bend (0.82-0.99x) and was 2-8x worse on
 * coils. Against the default since the curvature risk rule (`curvatureLevel`, its pilot here), it is
 * worse on every family (2026-12-03, `ADAPTIVE=1 npx tsx bench/families.ts 200,1000 0.002,0.01 1-3`
 * and `4-6`: error over the default's, geometric mean per family: sharp bend 1.00, wavy coil 1.18,
 * bump 1.31, Viviani 1.36, trefoil 1.39, helix 1.61, conical helix 1.86, ring 3.79; curvature within
 * 1.2x of the best single level in 65/192 cases against 176/192): the local rule decides on windows
 * of a resolution length, too few degrees of freedom, and stops early on noise.
 */
import { drawCoefPerturbation, kappaTauAt, noiseProbes, type GridBasis } from "./bootstrap.js";
import type { Skyline } from "./skyline.js";
import { solveAt, wavelengthForLambda, type SmoothFit, type Smoother } from "./smoother.js";

/** The locally chosen level along the grid. */
export interface AdaptiveCurvature {
  /** log10 of the chosen level over the pilot level, per grid point. */
  readonly logFactor: Float64Array;
}

/**
 * On levels lambda_q = pilot x 10^((q - down) step), q = 0..down + up (step 1/4 decade, two decades
 * either way by default), the curvature kappa_q and its
 * noise SD_q (from `probes` common-random-number draws) at every grid point. At grid point j, level
 * k is accepted when for every less-smoothed level i < k the mean of (kappa_k - kappa_i)^2 over a
 * window of one resolution length of level k around j stays within c^2 times the mean of SD_i^2 over
 * that window; the chosen level is the last accepted before the first refusal, then lowered to the
 * smallest choice within its own window (no smoothing across the edge of a feature).
 * `gridS`: arc length of each grid point (increasing). Cost O(levels (K b^2 + probes (K b + m)) +
 * levels^2 m).
 */
export function adaptiveCurvature(
  sm: Smoother, pilot: SmoothFit, C: Skyline, grid: GridBasis, gridS: Float64Array, seed: number,
  options: { down?: number; up?: number; probes?: number; c?: number; step?: number } = {},
): AdaptiveCurvature {
  const step = options.step ?? 0.25;
  const down = options.down ?? Math.round(2 / step), up = options.up ?? Math.round(2 / step), probes = options.probes ?? 16, c = options.c ?? 1;
  const K = sm.basis.K, m = grid.m, L = down + up + 1;
  const rho = sm.normal.wSum / (sm.basis.nseg * sm.basis.h);
  const d12 = new Float64Array(12), kt = new Float64Array(5);
  const { xis, scratch, dc } = noiseProbes(K, probes, seed ^ 0x2c1b3c6d);
  const kap: Float64Array[] = [], var2: Float64Array[] = [], half: number[] = [];
  for (let q = 0; q < L; ++q) {
    const fit = q === down ? pilot : solveAt(sm, pilot.lambda * Math.pow(10, (q - down) * step));
    const kq = new Float64Array(m), vq = new Float64Array(m);
    for (let j = 0; j < m; ++j) kq[j] = kappaTauAt(grid, fit.coef, null, j, d12, kt)[0];
    for (const xi of xis) {
      drawCoefPerturbation(C, fit.factor, xi, dc, scratch);
      for (let j = 0; j < m; ++j) vq[j] += (kappaTauAt(grid, fit.coef, dc, j, d12, kt)[0] - kq[j]) ** 2 / probes;
    }
    kap.push(kq);
    var2.push(vq);
    half.push(0.5 * wavelengthForLambda(fit.lambda, rho, sm.basis.h));
  }
  // Window [lo, hi) of grid indices within +-half of each point, per level (two pointers).
  const windows = half.map((h) => {
    const lo = new Int32Array(m), hi = new Int32Array(m);
    let a = 0, b = 0;
    for (let j = 0; j < m; ++j) {
      while (gridS[a] < gridS[j] - h) ++a;
      while (b < m && gridS[b] <= gridS[j] + h) ++b;
      lo[j] = a; hi[j] = b;
    }
    return { lo, hi };
  });
  const prefix = (v: Float64Array) => {
    const p = new Float64Array(m + 1);
    for (let j = 0; j < m; ++j) p[j + 1] = p[j] + v[j];
    return p;
  };
  const varPrefix = var2.map(prefix);
  const chosen = new Int32Array(m).fill(0);
  const alive = new Uint8Array(m).fill(1);
  const diff = new Float64Array(m);
  for (let k = 1; k < L; ++k) {
    const ok = new Uint8Array(m).fill(1);
    for (let i = 0; i < k; ++i) {
      for (let j = 0; j < m; ++j) diff[j] = (kap[k][j] - kap[i][j]) ** 2;
      const dp = prefix(diff), vp = varPrefix[i], w = windows[k];
      for (let j = 0; j < m; ++j) {
        if (!alive[j] || !ok[j]) continue;
        const a = w.lo[j], b = w.hi[j];
        if (dp[b] - dp[a] > c * c * (vp[b] - vp[a])) ok[j] = 0;
      }
    }
    for (let j = 0; j < m; ++j) {
      if (!alive[j]) continue;
      if (ok[j]) chosen[j] = k;
      else alive[j] = 0;
    }
  }
  // No smoothing across a feature's edge: the smallest choice within the chosen level's window.
  const level = new Int32Array(m);
  for (let j = 0; j < m; ++j) {
    const w = windows[chosen[j]];
    let v = chosen[j];
    for (let a = w.lo[j]; a < w.hi[j]; ++a) if (chosen[a] < v) v = chosen[a];
    level[j] = v;
  }
  const logFactor = new Float64Array(m);
  for (let j = 0; j < m; ++j) logFactor[j] = (level[j] - down) * step;
  return { logFactor };
}
