/**
 * Stage 5 of the geometry core: point estimates at the samples, bootstrap bands, bias flags, the
 * torsion gate, frames, and the final checks of the profile.
 */
import { InputError } from "../errors.js";
import {
  FLAG_BIAS, FLAG_END, FLAG_FRAME_TRANSPORTED, FLAG_TORSION_NOT_MEASURABLE, FLAG_TORSION_UNDEFINED,
  type Profile, type Trace,
} from "../types.js";
import { bootstrapBands, kappaTauAt } from "./bootstrap.js";
import type { SplineBasis } from "./bspline.js";
import { evalCurve, kappaTau } from "./curve.js";
import { frames } from "./frames.js";
import type { Levels } from "./levels.js";
import type { PassesResult } from "./passes.js";
import type { Samples, Start } from "./profile.js";
import { solveAt } from "./smoother.js";

/** Canonical curvature (1 / chord length) below which a wire counts as straight whatever the noise. */
const STRAIGHT_KAPPA = 1e-6;
/**
 * Bias flags: the less-smoothed fit moved by more than this many half-widths of its noise band
 * (curvature: 1, as a bias comparable to the band; torsion: 1.5, its quarter-level noise is
 * larger relative to the band, and noise alone moved it past 1 half-width at ~4% of the samples of
 * a 1% noise helix, bench/families.ts).
 */
const BIAS_RATIO_KAPPA = 1;
const BIAS_RATIO_TAU = 1.5;

/** R-7 quantile (numpy's default) of sorted values. */
export function quantileSorted(sorted: Float64Array, p: number): number {
  const h = (sorted.length - 1) * p, lo = Math.floor(h);
  return lo + 1 < sorted.length ? sorted[lo] + (h - lo) * (sorted[lo + 1] - sorted[lo]) : sorted[lo];
}

/**
 * Band offsets around an estimate from bootstrap replicates of a less-smoothed fit (a quarter of
 * the level: less smoothing bias, the reduced-penalty idea of Dai 2017, arXiv 1706.00865).
 * `shift` is that fit's value minus the estimate. The replicates' 2.5/97.5% quantiles are taken
 * relative to their own MEDIAN, not to the less-smoothed value: noise inflates |r''|, so replicates
 * of kappa sit above their fit, and centring on their median removes that upward shift. The band
 * is then moved by `shift` and widened on its side by shift/3 (a Richardson step: if bias grows
 * linearly with the level, the quarter-level fit keeps a third of its difference to the full-level
 * fit), and finally stretched to contain the estimate. Returns [lo, hi] with lo <= 0 <= hi.
 */
export function bandOffsets(sorted: Float64Array, shift: number): [number, number] {
  const med = quantileSorted(sorted, 0.5);
  const sh = Number.isFinite(shift) ? shift : 0;
  const lo = quantileSorted(sorted, 0.025) - med + sh + Math.min(0, sh / 3);
  const hi = quantileSorted(sorted, 0.975) - med + sh + Math.max(0, sh / 3);
  return [Math.min(0, lo), Math.max(0, hi)];
}

export function fitBands(
  trace: Trace, start: Start, fit: PassesResult, lv: Levels, samples: Samples,
  set: { readonly replicates: number; readonly seed: number; readonly keepSamples: boolean }, diagnostics: string[],
): Profile {
  const { basis, table } = fit;
  const { Q, scale: L0, centre } = start.canon;
  const closed = start.closed;
  const length = table.length;
  const R = set.replicates;
  const m = samples.u.length;
  const sampleU = samples.u;
  const normalDims: 1 | 2 = trace.dims === 2 ? 1 : 2;
  const toLab = (v: Float64Array, j: number, out: Float64Array, o: number) => {
    const a = v[j], b = v[j + 1], c = v[j + 2];
    out[o] = Q[0] * a + Q[3] * b + Q[6] * c;
    out[o + 1] = Q[1] * a + Q[4] * b + Q[7] * c;
    out[o + 2] = Q[2] * a + Q[5] * b + Q[8] * c;
  };

  // Point estimates and frames at the samples.
  const s = new Float64Array(m), x = new Float64Array(m), yy = new Float64Array(m), z = new Float64Array(m);
  const kappa = new Float64Array(m), tau = new Float64Array(m);
  const r1 = new Float64Array(3 * m), kv = new Float64Array(3 * m);
  const d12 = new Float64Array(12), st = new Float64Array(1), sb = new Float64Array(24);
  const kt = new Float64Array(5), pos = new Float64Array(3);
  for (let j = 0; j < m; ++j) {
    evalCurve(basis, lv.kappaFit.coef, sampleU[j], 3, d12, st, sb);
    s[j] = samples.s[j] * L0;
    toLab(d12, 0, pos, 0);
    x[j] = pos[0] * L0 + centre[0]; yy[j] = pos[1] * L0 + centre[1]; z[j] = pos[2] * L0 + centre[2];
    kappaTau(d12, kt);
    kappa[j] = kt[0] / L0;
    r1[3 * j] = d12[3]; r1[3 * j + 1] = d12[4]; r1[3 * j + 2] = d12[5];
    kv[3 * j] = kt[2]; kv[3 * j + 1] = kt[3]; kv[3 * j + 2] = kt[4];
    if (lv.tauFit !== lv.kappaFit) evalCurve(basis, lv.tauFit.coef, sampleU[j], 3, d12, st, sb);
    tau[j] = lv.planarWithinNoise ? 0 : kappaTau(d12, kt)[1] / L0;
  }

  // Bootstrap on the grid; bands from fits at a quarter of each level (less smoothing bias, so the
  // bands cover the truth where bias dominates: the reduced-penalty idea of Dai 2017, arXiv 1706.00865).
  const kappaLo = new Float64Array(m).fill(NaN), kappaHi = new Float64Array(m).fill(NaN);
  const tauLo = new Float64Array(m).fill(NaN), tauHi = new Float64Array(m).fill(NaN);
  const flags = new Uint8Array(m);
  const Rb = Math.max(R, 50);
  const grid = lv.grid, g = grid.m;
  const bandK = solveAt(lv.kappaSmoother, lv.kappaFit.lambda / 4);
  const bandT = lv.tauFit === lv.kappaFit ? bandK : solveAt(fit.smoother, lv.tauFit.lambda / 4);
  const boot = bootstrapBands({ C: lv.C, grid, kappaFit: bandK, tauFit: bandT, normalDims, replicates: Rb, seed: set.seed });
  const gk = new Float64Array(g), gt = new Float64Array(g);
  for (let j = 0; j < g; ++j) {
    gk[j] = kappaTauAt(grid, lv.kappaFit.coef, null, j, d12, kt)[0];
    gt[j] = kappaTauAt(grid, lv.tauFit.coef, null, j, d12, kt)[1];
  }
  const kLo = new Float64Array(g), kHi = new Float64Array(g), tLo = new Float64Array(g), tHi = new Float64Array(g);
  const kBias = new Float64Array(g), tBias = new Float64Array(g);
  const col = new Float64Array(Rb);
  for (let j = 0; j < g; ++j) {
    for (let r = 0; r < Rb; ++r) col[r] = boot.kappa[r * g + j];
    col.sort();
    const half = 0.5 * (quantileSorted(col, 0.975) - quantileSorted(col, 0.025));
    const shK = kappaTauAt(grid, bandK.coef, null, j, d12, kt)[0] - gk[j];
    // Bias ratio: the less-smoothed fit's move over the half-width of the noise band.
    kBias[j] = Math.abs(shK) / Math.max(half, 1e-300);
    [kLo[j], kHi[j]] = bandOffsets(col, shK);
    let finite = 0;
    for (let r = 0; r < Rb; ++r) { const v = boot.tau[r * g + j]; if (Number.isFinite(v)) col[finite++] = v; }
    const tc = col.subarray(0, finite).sort();
    const shT = kappaTauAt(grid, bandT.coef, null, j, d12, kt)[1] - gt[j];
    tBias[j] = Number.isFinite(shT) && finite >= 10 ? Math.abs(shT) / Math.max(0.5 * (quantileSorted(tc, 0.975) - quantileSorted(tc, 0.025)), 1e-300) : 0;
    [tLo[j], tHi[j]] = finite >= 10 ? bandOffsets(tc, shT) : [NaN, NaN];
  }
  const gridPos = locateOnGrid(lv.gridU, sampleU, closed, basis);
  const at = (arr: Float64Array, j: number) => {
    const k = gridPos.index[j], f = gridPos.frac[j];
    return arr[k] + f * (arr[Math.min(k + 1, g - 1)] - arr[k]);
  };
  const resolutionM = lv.resolution * L0;
  // A near-interpolated sparse trace carries the spline's end effect over about three sample
  // spacings (measured on noise-free helices of 10-60 points, 3.6 per turn: +10% and +6% at the
  // third and fourth samples, under 1.5% beyond): its end zone is at least 3.5 spacings.
  const endZone = fit.sparse ? Math.max(resolutionM, (3.5 * length * L0) / Math.max(1, fit.u.length - 1)) : resolutionM;
  let straightCount = 0;
  for (let j = 0; j < m; ++j) {
    const sdK = fit.sel.sigmaFrom === "unknown" ? 0 : Math.sqrt(at(boot.curvatureVar, j));
    const kap = Math.hypot(kv[3 * j], kv[3 * j + 1], kv[3 * j + 2]);
    let resolved = kap > 3 * sdK && kap > STRAIGHT_KAPPA;
    if (!(kap > STRAIGHT_KAPPA)) ++straightCount;
    if (R > 0) {
      kappaLo[j] = Math.max(0, kappa[j] + at(kLo, j) / L0);
      // Where the curvature vector's 95% region holds 0 (|k| within sqrt(chi2_d(0.95)) of its
      // per-direction SD: 2.448 for the 2 normal directions in space, 1.96 in a plane; the
      // confidence region of a normal mean, common practice), the band of |k| reaches down to 0:
      // quantiles of the replicates' norms never do, and a straight stretch's band then misses 0.
      if (kap <= (normalDims === 2 ? 2.448 : 1.96) * sdK) kappaLo[j] = 0;
      kappaHi[j] = kappa[j] + at(kHi, j) / L0;
      if (at(kBias, j) > BIAS_RATIO_KAPPA) flags[j] |= FLAG_BIAS;
      // A curvature band that reaches 0 (noise, or the bias of a feature near the resolution
      // length) cannot tell the curvature from zero either: no torsion there.
      if (!(kappaLo[j] > 0)) resolved = false;
    }
    if (trace.planarProjection) {
      flags[j] |= FLAG_TORSION_NOT_MEASURABLE;
      tau[j] = NaN;
    } else if (!resolved) {
      flags[j] |= FLAG_TORSION_UNDEFINED;
      tau[j] = NaN;
    } else if (R > 0) {
      const lo = at(tLo, j) / L0, hi = at(tHi, j) / L0;
      tauLo[j] = tau[j] + lo;
      tauHi[j] = tau[j] + hi;
      if (at(tBias, j) > BIAS_RATIO_TAU) flags[j] |= FLAG_BIAS;
    }
    if (!closed && (s[j] < endZone || s[j] > (length * L0) - endZone)) flags[j] |= FLAG_END;
  }
  const resolvedMask = new Uint8Array(m);
  for (let j = 0; j < m; ++j) resolvedMask[j] = flags[j] & FLAG_TORSION_UNDEFINED ? 0 : 1;
  const fr = frames(r1, kv, resolvedMask, closed);
  for (let j = 0; j < m; ++j) if (fr.transported[j]) flags[j] |= FLAG_FRAME_TRANSPORTED;
  for (const f of [fr.T, fr.N, fr.B]) for (let j = 0; j < m; ++j) toLab(f, 3 * j, f, 3 * j);
  const undefinedCount = m - resolvedMask.reduce((a, v) => a + v, 0);
  if (straightCount === m) diagnostics.push("straight wire: the curvature cannot be told from zero anywhere; torsion is undefined (NaN) at every sample");
  else if (undefinedCount > 0 && !trace.planarProjection) diagnostics.push(`torsion: undefined at ${undefinedCount} of ${m} samples where the curvature cannot be told from zero (a twist-free frame is carried there)`);
  let biased = 0;
  for (let j = 0; j < m; ++j) if (flags[j] & FLAG_BIAS && !(flags[j] & FLAG_END)) ++biased;
  if (biased > 0) diagnostics.push(`bands: at ${biased} of ${m} samples the curvature or torsion changes by more than its noise band's half-width when smoothed less (a feature near the resolution length): the bands may under-cover there`);
  if (trace.planarProjection) diagnostics.push("planar projection: curvature is the projected curvature; torsion is not measurable");

  let kappaSamples: Float64Array | undefined, tauSamples: Float64Array | undefined;
  if (set.keepSamples && R > 0) {
    kappaSamples = new Float64Array(R * m);
    tauSamples = new Float64Array(R * m);
    // Replicates recentred on their median, as the bands are.
    const kMed = new Float64Array(g), tMed = new Float64Array(g);
    for (let j = 0; j < g; ++j) {
      for (let r = 0; r < Rb; ++r) col[r] = boot.kappa[r * g + j];
      kMed[j] = quantileSorted(col.sort(), 0.5);
      let finite = 0;
      for (let r = 0; r < Rb; ++r) { const v = boot.tau[r * g + j]; if (Number.isFinite(v)) col[finite++] = v; }
      tMed[j] = finite > 0 ? quantileSorted(col.subarray(0, finite).sort(), 0.5) : 0;
    }
    for (let r = 0; r < R; ++r) {
      for (let j = 0; j < m; ++j) {
        const k = gridPos.index[j], f = gridPos.frac[j], k1 = Math.min(k + 1, g - 1);
        const dk = (boot.kappa[r * g + k] - kMed[k]) * (1 - f) + (boot.kappa[r * g + k1] - kMed[k1]) * f;
        const dt = (boot.tau[r * g + k] - tMed[k]) * (1 - f) + (boot.tau[r * g + k1] - tMed[k1]) * f;
        kappaSamples[r * m + j] = Math.max(0, kappa[j] + dk / L0);
        tauSamples[r * m + j] = Number.isNaN(tau[j]) ? NaN : tau[j] + dt / L0;
      }
    }
  }

  const rowOf = (i: number) => (trace.rows ? trace.rows[i] : i + 1);
  const inputRow = new Int32Array(m);
  const rows = trace.rows;
  for (let j = 0; j < m; ++j) { const i = samples.traceIndex[j]; inputRow[j] = i < 0 ? -1 : rows ? rows[i] : i + 1; }
  const downweighted: number[] = [];
  for (let i = 0; i < fit.w.length; ++i) if (fit.w[i] < 0.5) downweighted.push(start.kept[i]);
  if (downweighted.length > 0) diagnostics.push(`robust fit: ${downweighted.length} point(s) downweighted as outliers (first at ${trace.rows ? "row" : "point"} ${rowOf(downweighted[0])})`);
  const outliers = [...start.dropped, ...downweighted].sort((a, b) => a - b);

  const profile: Profile = {
    n: m, s, x, y: yy, z, T: fr.T, N: fr.N, B: fr.B,
    kappa, kappaLo, kappaHi, tau, tauLo, tauHi, flags,
    length: length * L0, closed,
    resolution: resolutionM,
    sigma: fit.sel.sigmaFrom === "unknown" ? NaN : fit.sel.sigma * L0,
    lambda: lv.kappaFit.lambda,
    lambdaTorsion: lv.tauFit.lambda,
    segments: basis.nseg,
    edf: fit.sel.edf,
    replicates: R,
    outliers,
    inputRow,
    droppedRows: start.dropped.map(rowOf),
    downweightedRows: downweighted.map(rowOf),
    source: trace.source,
    planarProjection: trace.planarProjection ?? false,
    diagnostics,
    ...(kappaSamples && tauSamples ? { kappaSamples, tauSamples } : {}),
  };
  checkProfile(profile, trace.source.file);
  return profile;
}

/**
 * The final sanity check: finite positions, arc length from 0 and non-decreasing, finite kappa,
 * and every band containing its estimate. A failure here is a fault of the fit, reported as the
 * input it came from (never a profile with such numbers).
 */
export function checkProfile(p: Profile, file: string): void {
  const bad = (what: string, j: number) => {
    throw new InputError(file, null, "points", `the fit failed its final check (${what} at sample ${j + 1} of ${p.n}, s = ${p.s[j]} m); no profile was produced`);
  };
  if (!(Number.isFinite(p.length) && p.length > 0) || !(Number.isFinite(p.sigma) || (Number.isNaN(p.sigma) && p.replicates === 0))) bad("non-finite length or noise", 0);
  for (let j = 0; j < p.n; ++j) {
    if (!Number.isFinite(p.x[j]) || !Number.isFinite(p.y[j]) || !Number.isFinite(p.z[j])) bad("non-finite position", j);
    if (!Number.isFinite(p.s[j]) || p.s[j] < 0 || (j > 0 && p.s[j] < p.s[j - 1])) bad("arc length not increasing from 0", j);
    if (!Number.isFinite(p.kappa[j]) || p.kappa[j] < 0) bad("non-finite curvature", j);
    if (p.replicates > 0 && !(p.kappaLo[j] <= p.kappa[j] && p.kappa[j] <= p.kappaHi[j])) bad("curvature outside its band", j);
    if (p.replicates > 0 && Number.isFinite(p.tau[j]) && Number.isFinite(p.tauLo[j]) && !(p.tauLo[j] <= p.tau[j] && p.tau[j] <= p.tauHi[j])) bad("torsion outside its band", j);
  }
}

/** For each sorted sample parameter, the grid interval holding it and the fraction within. */
function locateOnGrid(grid: Float64Array, at: Float64Array, closed: boolean, basis: SplineBasis): { index: Int32Array; frac: Float64Array } {
  const index = new Int32Array(at.length), frac = new Float64Array(at.length);
  if (grid === at) {
    for (let j = 0; j < at.length; ++j) index[j] = j;
    return { index, frac };
  }
  const g = grid.length;
  const span = basis.nseg * basis.h;
  let k = 0;
  for (let j = 0; j < at.length; ++j) {
    let v = at[j];
    if (closed) v -= Math.floor((v - basis.u0) / span) * span;
    while (k + 1 < g && grid[k + 1] <= v) ++k;
    while (k > 0 && grid[k] > v) --k;
    if (k + 1 < g) {
      index[j] = k;
      frac[j] = Math.min(1, Math.max(0, (v - grid[k]) / (grid[k + 1] - grid[k])));
    } else {
      index[j] = g - 1;
      frac[j] = 0;
    }
  }
  return { index, frac };
}
