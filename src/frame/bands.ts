/**
 * Stage 5 of the geometry core: point estimates at the samples, bootstrap bands, bias flags, the
 * torsion gate, frames, and the final checks of the profile.
 */
import { InputError } from "../errors.js";
import {
  FLAG_BIAS, FLAG_END, FLAG_FRAME_TRANSPORTED, FLAG_TORSION_NOT_MEASURABLE, FLAG_TORSION_UNDEFINED,
  type Profile, type Trace,
} from "../types.js";
import { medianSpacing, spacingMeans, windowGrid, windowMeans } from "./spacingMean.js";
import { bootstrapBands, gridBasis, kappaTauAt, type BootstrapOutput, type GridBasis } from "./bootstrap.js";
import { hypot3 } from "./hypot3.js";
import { selectInPlace } from "./robustStart.js";
import type { SplineBasis } from "./bspline.js";
import { arcAt, evalCurve, kappaTau, type ArcTable } from "./curve.js";
import { frames } from "./frames.js";
import { inKinkZone, type Levels } from "./levels.js";
import { describeLength } from "./fitGuard.js";
import type { PassesResult } from "./passes.js";
import type { Samples, Start } from "./profile.js";
import { solveAt, type SmoothFit } from "./smoother.js";

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
 * is then moved by `shift` and widened on its side by `extrapolation` x shift (a Richardson step:
 * if each quarter of the level keeps a fraction r of the bias, the quarter-level fit keeps
 * r / (1 - r) of its difference to the full-level fit: 1/3 where bias grows linearly with the
 * level, r = 1/4; see KAPPA_EXTRAPOLATION for the curvature's), and finally stretched to contain
 * the estimate. Returns [lo, hi] with lo <= 0 <= hi.
 */
export function bandOffsets(sorted: Float64Array, shift: number, extrapolation = 1 / 3): [number, number] {
  const med = quantileSorted(sorted, 0.5);
  const sh = Number.isFinite(shift) ? shift : 0;
  const lo = quantileSorted(sorted, 0.025) - med + sh + Math.min(0, sh * extrapolation);
  const hi = quantileSorted(sorted, 0.975) - med + sh + Math.max(0, sh * extrapolation);
  return [Math.min(0, lo), Math.max(0, hi)];
}

export function fitBands(
  trace: Trace, start: Start, fit: PassesResult, lv: Levels, samples: Samples,
  set: { readonly replicates: number; readonly seed: number; readonly keepSamples: boolean }, diagnostics: string[],
): Profile {
  // The loops sit in the leaf functions below (one per function): the JIT's on-stack replacement
  // of a loop in this driver would otherwise be deoptimised at each later statement it had not run.
  const { basis, table } = fit;
  const { Q, scale: L0 } = start.canon;
  const closed = start.closed;
  const length = table.length;
  const R = set.replicates;
  const m = samples.u.length;
  const sampleU = samples.u;
  const normalDims: 1 | 2 = trace.dims === 2 ? 1 : 2;

  // Point estimates at the samples (their frames come after the torsion gate).
  const est = pointEstimates(basis, lv, samples, start.canon);
  if (fit.sparse) {
    // A near-interpolated trace resolves one point spacing, not the spline's knot intervals.
    const width = sparseSpacingMeans(fit, lv, samples, closed, L0, est);
    diagnostics.push(`sparse trace: curvature and torsion at each sample are means over one point spacing (${describeLength(width * L0, trace.source)}) centred on it, the resolution of a near-interpolated trace`);
  }
  const { s, kappa, tau, r1, kv } = est;

  // Bootstrap on the grid; bands from fits at a quarter of each level (less smoothing bias, so the
  // bands cover the truth where bias dominates: the reduced-penalty idea of Dai 2017, arXiv 1706.00865).
  const Rb = Math.max(R, 50);
  const grid = lv.grid, g = grid.m;
  const bandK = solveAt(lv.kappaSmoother, lv.kappaFit.lambda / 4);
  const bandT = lv.tauFit === lv.kappaFit ? bandK : solveAt(fit.smoother, lv.tauFit.lambda / 4);
  const shK = new Float64Array(g), shT = new Float64Array(g);
  let boot: BootstrapOutput;
  if (fit.sparse) {
    // Bands of the spacing means the samples report: replicates averaged over the same windows.
    boot = windowedBootstrap(fit, lv, bandK, bandT, normalDims, Rb, set.seed, closed, shK, shT);
  } else {
    boot = bootstrapBands({ C: lv.C, grid, kappaFit: bandK, tauFit: bandT, normalDims, replicates: Rb, seed: set.seed });
    gridShifts(grid, lv.kappaFit.coef, lv.tauFit.coef, bandK.coef, bandT.coef, shK, shT);
  }
  const gb = gridBands(g, boot, Rb, shK, shT);
  const gridPos = locateOnGrid(lv.gridU, sampleU, closed, basis);
  const resolutionM = lv.resolution * L0;
  // A near-interpolated sparse trace carries the spline's end effect over about three sample
  // spacings (measured on noise-free helices of 10-60 points, 3.6 per turn: +10% and +6% at the
  // third and fourth samples, under 1.5% beyond): its end zone is at least 3.5 spacings.
  const endZone = fit.sparse ? Math.max(resolutionM, (3.5 * length * L0) / Math.max(1, fit.u.length - 1)) : resolutionM;
  const flags = new Uint8Array(m);
  const bands = sampleBands({
    kappa, tau, kv, s, flags, gridPos, g, curvatureVar: boot.curvatureVar, gb, L0,
    noiseUnknown: fit.sel.sigmaFrom === "unknown", withBands: R > 0, normalDims, planarProjection: trace.planarProjection === true,
    closed, endZone, lengthM: length * L0,
  });
  const { kappaLo, kappaHi, tauLo, tauHi, straightCount } = bands;
  // Around a kink the fit bends at its hinge: biased there and one resolution length beyond.
  if (lv.kinkZones.length > 0) flagKinkZones(flags, table, sampleU, lv.kinkZones, closed, lv.resolution);
  if (lv.unresolved) flagAll(flags, FLAG_BIAS);
  const resolvedMask = torsionMask(flags);
  const fr = frames(r1, kv, resolvedMask, closed);
  markTransported(fr.transported, flags);
  rotateToLab(fr.T, Q); rotateToLab(fr.N, Q); rotateToLab(fr.B, Q);
  const undefinedCount = m - countSet(resolvedMask);
  if (straightCount === m) diagnostics.push("straight wire: the curvature cannot be told from zero anywhere; torsion is undefined (NaN) at every sample");
  else if (undefinedCount > 0 && !trace.planarProjection) diagnostics.push(`torsion: undefined at ${undefinedCount} of ${m} samples where the curvature cannot be told from zero (a twist-free frame is carried there)`);
  const biased = countBiased(flags);
  if (biased > 0) diagnostics.push(`bands: at ${biased} of ${m} samples the curvature or torsion changes by more than its noise band's half-width when smoothed less (a feature near the resolution length): the bands may under-cover there`);
  // Near a point where the curvature cannot be told from zero (an inflection of a 3D wire), torsion
  // is a ratio of two small quantities and the smoothed fit's bias there is not in its band
  // (measured: 2-4x the true torsion within a fifth of the torsion fit's resolution length of an
  // inflection, bands holding the truth at 62% of samples): flag it biased within half that length.
  const tauResolutionM = resolutionM * Math.pow(lv.tauFactor, 1 / 8);
  const nearZero = R > 0 && !trace.planarProjection && !lv.planarWithinNoise && straightCount < m ? flagNearUndefined(flags, s, closed, length * L0, 0.5 * tauResolutionM) : 0;
  if (nearZero > 0) diagnostics.push(`torsion: at ${nearZero} samples within ${describeLength(0.5 * tauResolutionM, trace.source)} of a point where the curvature cannot be told from zero, the torsion is flagged biased (16): its smoothing bias there is not in its band`);
  if (trace.planarProjection) diagnostics.push("planar projection: curvature is the projected curvature; torsion is not measurable");

  const kept = set.keepSamples && R > 0 ? keptReplicates(boot, Rb, R, gridPos, kappa, tau, L0) : undefined;
  const biasKept = kept ? biasEstimates(shK, shT, gridPos, g, kappa, tau, L0) : undefined;
  const rowOf = (i: number) => (trace.rows ? trace.rows[i] : i + 1);
  const inputRow = inputRows(samples.traceIndex, trace.rows);
  const downweighted = downweightedPoints(fit.w, start.kept);
  if (downweighted.length > 0) diagnostics.push(`robust fit: ${downweighted.length} point(s) downweighted as outliers (first at ${trace.rows ? "row" : "point"} ${rowOf(downweighted[0])})`);
  const outliers = [...start.dropped, ...downweighted].sort((a, b) => a - b);

  const profile: Profile = {
    n: m, s, x: est.x, y: est.y, z: est.z, T: fr.T, N: fr.N, B: fr.B,
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
    ...(kept ? { kappaSamples: kept.kappa, tauSamples: kept.tau } : {}),
    ...(biasKept ? { kappaBias: biasKept.kappa, tauBias: biasKept.tau } : {}),
  };
  checkProfile(profile, trace.source.file);
  return profile;
}

/** Point estimates at the samples (lab frame, metres): position, arc length, kappa, tau, r' and the curvature vector (canonical). */
interface PointEstimates {
  readonly s: Float64Array;
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly z: Float64Array;
  readonly kappa: Float64Array;
  readonly tau: Float64Array;
  /** r' at each sample (3 per sample, canonical frame). */
  readonly r1: Float64Array;
  /** Curvature vector at each sample (3 per sample, canonical units). */
  readonly kv: Float64Array;
}

function pointEstimates(basis: SplineBasis, lv: Levels, samples: Samples, canon: Start["canon"]): PointEstimates {
  const m = samples.u.length;
  const out: PointEstimates = {
    s: new Float64Array(m), x: new Float64Array(m), y: new Float64Array(m), z: new Float64Array(m),
    kappa: new Float64Array(m), tau: new Float64Array(m), r1: new Float64Array(3 * m), kv: new Float64Array(3 * m),
  };
  pointLoop(basis, lv.kappaFit.coef, lv.tauFit === lv.kappaFit ? null : lv.tauFit.coef, lv.planarWithinNoise, samples.u, samples.s, canon.Q, canon.centre, canon.scale, out);
  return out;
}

/**
 * The bootstrap of a sparse trace at its grid points' windows (`windowGrid`): the replicates at every
 * window's sub-points reduced to their spacing means (`windowMeans`, the curvature-vector variance
 * likewise), and the band fits' shifts as spacing means (into shK, shT), so the bands are those of
 * the spacing means the samples report. Before (point-value bands around spacing means) they held
 * the generating helix at 0.98-1.00 of samples.
 */
function windowedBootstrap(
  fit: PassesResult, lv: Levels, bandK: SmoothFit, bandT: SmoothFit, normalDims: 1 | 2, Rb: number, seed: number, closed: boolean,
  shK: Float64Array, shT: Float64Array,
): BootstrapOutput {
  const { basis } = fit;
  const { width, lo, hi } = sparseWindow(fit, closed);
  const g = lv.gridU.length;
  // 8 sub-points: the band offsets come from the replicates' spread about their own median, which
  // the quadrature barely moves (the estimate's 24-point means are not compared with them).
  const win = windowGrid(basis, lv.kappaFit.coef, lv.gridU, width, lo, hi, closed, 8);
  const raw = bootstrapBands({ C: lv.C, grid: gridBasis(basis, win.at), kappaFit: bandK, tauFit: bandT, normalDims, replicates: Rb, seed });
  const sepTau = lv.tauFit !== lv.kappaFit;
  const k0 = new Float64Array(g), t0 = new Float64Array(g), k1 = new Float64Array(g), t1 = new Float64Array(g);
  spacingMeans(basis, lv.kappaFit.coef, sepTau ? lv.tauFit.coef : null, false, lv.gridU, width, lo, hi, closed, k0, t0);
  spacingMeans(basis, bandK.coef, bandT === bandK ? null : bandT.coef, false, lv.gridU, width, lo, hi, closed, k1, t1);
  for (let j = 0; j < g; ++j) { shK[j] = k1[j] - k0[j]; shT[j] = t1[j] - t0[j]; }
  return {
    kappa: windowMeans(raw.kappa, win.weight, g, win.count, Rb),
    tau: windowMeans(raw.tau, win.weight, g, win.count, Rb),
    curvatureVar: windowMeans(raw.curvatureVar, win.weight, g, win.count, 1),
  };
}

/**
 * A sparse trace's kappa and tau at the samples replaced by their means over one median point
 * spacing (`spacingMeans`, clipped to the points' parameter range on an open wire); returns that
 * spacing as a length (canonical units).
 */
function sparseSpacingMeans(fit: PassesResult, lv: Levels, samples: Samples, closed: boolean, L0: number, est: PointEstimates): number {
  const { basis, table } = fit;
  const { width, lo, hi } = sparseWindow(fit, closed);
  spacingMeans(basis, lv.kappaFit.coef, lv.tauFit === lv.kappaFit ? null : lv.tauFit.coef, lv.planarWithinNoise, samples.u, width, lo, hi, closed, est.kappa, est.tau, L0);
  return (width * table.length) / (basis.nseg * basis.h);
}

/** A sparse trace's window: one median spacing of its points' parameters, within their range. */
function sparseWindow(fit: PassesResult, closed: boolean): { width: number; lo: number; hi: number } {
  const width = medianSpacing(fit.u, closed, fit.basis.nseg * fit.basis.h);
  let lo = Infinity, hi = -Infinity;
  for (const v of fit.u) { lo = Math.min(lo, v); hi = Math.max(hi, v); }
  return { width, lo, hi };
}

/** The loop of {@link pointEstimates}; `tauCoef` null: torsion from the curvature fit; `planar`: tau = 0. */
function pointLoop(
  basis: SplineBasis, kappaCoef: Float64Array, tauCoef: Float64Array | null, planar: boolean, u: Float64Array, sc: Float64Array,
  Q: Float64Array, centre: readonly [number, number, number], L0: number, out: PointEstimates,
): void {
  const { s, x, y, z, kappa, tau, r1, kv } = out;
  const d12 = new Float64Array(12), st = new Float64Array(1), sb = new Float64Array(24), kt = new Float64Array(5);
  const c0 = centre[0], c1 = centre[1], c2 = centre[2];
  for (let j = 0; j < u.length; ++j) {
    evalCurve(basis, kappaCoef, u[j], 3, d12, st, sb);
    s[j] = sc[j] * L0;
    const a = d12[0], b = d12[1], c = d12[2];
    x[j] = (Q[0] * a + Q[3] * b + Q[6] * c) * L0 + c0;
    y[j] = (Q[1] * a + Q[4] * b + Q[7] * c) * L0 + c1;
    z[j] = (Q[2] * a + Q[5] * b + Q[8] * c) * L0 + c2;
    kappaTau(d12, kt);
    kappa[j] = kt[0] / L0;
    r1[3 * j] = d12[3]; r1[3 * j + 1] = d12[4]; r1[3 * j + 2] = d12[5];
    kv[3 * j] = kt[2]; kv[3 * j + 1] = kt[3]; kv[3 * j + 2] = kt[4];
    if (planar) tau[j] = 0;
    else {
      if (tauCoef) evalCurve(basis, tauCoef, u[j], 3, d12, st, sb);
      tau[j] = kappaTau(d12, kt)[1] / L0;
    }
  }
}

/** Band offsets (canonical units, relative to the estimate) and bias ratios on the grid. */
interface GridBands {
  readonly kLo: Float64Array;
  readonly kHi: Float64Array;
  readonly tLo: Float64Array;
  readonly tHi: Float64Array;
  readonly kBias: Float64Array;
  readonly tBias: Float64Array;
}

/**
 * Per grid point: the less-smoothed fits' shifts (band fit minus estimate), the band offsets of
 * `bandOffsets` from the replicates, and the bias ratios (the shift over the noise band's
 * half-width); torsion bands need 10 finite replicates.
 */
function gridBands(g: number, boot: BootstrapOutput, Rb: number, shK: Float64Array, shT: Float64Array): GridBands {
  const out: GridBands = {
    kLo: new Float64Array(g), kHi: new Float64Array(g), tLo: new Float64Array(g), tHi: new Float64Array(g),
    kBias: new Float64Array(g), tBias: new Float64Array(g),
  };
  // The replicates of 8 grid points at a time (a cache line of each replicate's row), point-major.
  const kBlock = new Float64Array(COLUMN_BLOCK * Rb), tBlock = new Float64Array(COLUMN_BLOCK * Rb);
  for (let j0 = 0; j0 < g; j0 += COLUMN_BLOCK) {
    const width = Math.min(COLUMN_BLOCK, g - j0);
    gatherColumns(boot.kappa, g, Rb, j0, width, kBlock);
    gatherColumns(boot.tau, g, Rb, j0, width, tBlock);
    for (let jj = 0; jj < width; ++jj) columnBands(kBlock.subarray(jj * Rb, (jj + 1) * Rb), tBlock.subarray(jj * Rb, (jj + 1) * Rb), j0 + jj, shK, shT, out);
  }
  return out;
}

/** Grid points whose replicates are gathered together (8 doubles: one cache line per replicate). */
const COLUMN_BLOCK = 8;

/** dst[jj * Rb + r] = src[r * g + j0 + jj] for jj < width: columns j0.. of the replicate-major src. */
function gatherColumns(src: Float64Array, g: number, Rb: number, j0: number, width: number, dst: Float64Array): void {
  for (let r = 0; r < Rb; ++r) {
    const base = r * g + j0;
    for (let jj = 0; jj < width; ++jj) dst[jj * Rb + r] = src[base + jj];
  }
}

/**
 * The curvature band's Richardson step (`bandOffsets`): r / (1 - r) with r = 2/3, the fraction of
 * the curvature's smoothing bias a quarter of the level keeps. Linear bias (r = 1/4, a step of 1/3)
 * holds on rings only: the ratio of successive quarter-level moves, sum (k(l/4) - k(l)) (k(l/16) -
 * k(l/4)) / sum (k(l/4) - k(l))^2 on the noise-free points at the automatic level, measured 0.27 on
 * rings, 0.4-0.58 on helices, knots, Viviani's curve and conical helices, 0.64-0.71 on an ellipse
 * tip, bumps, bends and varying coils (bench/families.ts samplings, 2 seeds); on noisy points the
 * ratio is inflated by the noise (0.4-1.2), so a constant is used. An ellipse of 200 x 60 nm at 0.5
 * nm noise (1000 points, 3 seeds; its tip 7-10% low at the level of least error) had bands holding
 * the truth at 35-60% of the samples within the tip's half-maximum, 57-87% with r = 2/3; bench/
 * families.ts 1-6: mean coverage 0.902 -> 0.916 (sharp bend 0.85 -> 0.89, bump 0.92 -> 0.94, wavy
 * coil 0.89 -> 0.92; r = 0.6: 0.914). Torsion keeps 1/3 (its coverage is 0.915 already).
 */
export const KAPPA_EXTRAPOLATION = 2;

/** The bands and bias ratios of grid point j from its replicates (both arrays are reordered). */
function columnBands(kCol: Float64Array, tCol: Float64Array, j: number, shK: Float64Array, shT: Float64Array, out: GridBands): void {
  placeBandQuantiles(kCol);
  const half = 0.5 * (quantileSorted(kCol, 0.975) - quantileSorted(kCol, 0.025));
  // Bias ratio: the less-smoothed fit's move over the half-width of the noise band.
  out.kBias[j] = Math.abs(shK[j]) / Math.max(half, 1e-300);
  const [klo, khi] = bandOffsets(kCol, shK[j], KAPPA_EXTRAPOLATION);
  out.kLo[j] = klo; out.kHi[j] = khi;
  let finite = 0;
  for (let r = 0; r < tCol.length; ++r) { const v = tCol[r]; if (Number.isFinite(v)) tCol[finite++] = v; }
  const tc = placeBandQuantiles(tCol.subarray(0, finite));
  const sh = shT[j];
  out.tBias[j] = Number.isFinite(sh) && finite >= 10 ? Math.abs(sh) / Math.max(0.5 * (quantileSorted(tc, 0.975) - quantileSorted(tc, 0.025)), 1e-300) : 0;
  if (finite >= 10) {
    const [tlo, thi] = bandOffsets(tc, sh);
    out.tLo[j] = tlo; out.tHi[j] = thi;
  } else { out.tLo[j] = NaN; out.tHi[j] = NaN; }
}

/** shK = kappa of the band fit minus kappa of the estimate, shT the same for tau, at each grid point. */
function gridShifts(
  grid: GridBasis, kappaCoef: Float64Array, tauCoef: Float64Array, bandKCoef: Float64Array, bandTCoef: Float64Array, shK: Float64Array, shT: Float64Array,
): void {
  const d12 = new Float64Array(12), kt = new Float64Array(5);
  for (let j = 0; j < grid.m; ++j) {
    const gk = kappaTauAt(grid, kappaCoef, null, j, d12, kt)[0];
    const gt = kappaTauAt(grid, tauCoef, null, j, d12, kt)[1];
    shK[j] = kappaTauAt(grid, bandKCoef, null, j, d12, kt)[0] - gk;
    shT[j] = kappaTauAt(grid, bandTCoef, null, j, d12, kt)[1] - gt;
  }
}

/** The quantiles the bands read (see `quantileSorted`). */
const BAND_PS = Float64Array.of(0.025, 0.5, 0.975);

/**
 * Arranges `a` so that every entry `quantileSorted` reads for p = 0.025, 0.5 and 0.975 holds the
 * value an ascending sort would put there (Hoare selection of each, in ascending order, on the part
 * above the last one placed: O(n) instead of a sort); returns `a`. With a zero or a NaN in `a` it
 * sorts instead (the sort puts -0 before +0 and NaN last, which selection by < cannot tell).
 */
export function placeBandQuantiles(a: Float64Array): Float64Array {
  const n = a.length;
  for (let i = 0; i < n; ++i) { const v = a[i]; if (v === 0 || v !== v) return a.sort(); }
  let left = 0;
  for (let q = 0; q < BAND_PS.length; ++q) {
    const lo = Math.floor((n - 1) * BAND_PS[q]);
    if (lo >= left) {
      selectInPlace(a.subarray(left), n - left, lo - left);
      left = lo + 1;
    }
    if (lo + 1 < n && lo + 1 >= left) {
      // The next order statistic: the least of the part above.
      let at = lo + 1;
      for (let i = lo + 2; i < n; ++i) if (a[i] < a[at]) at = i;
      const t = a[lo + 1]; a[lo + 1] = a[at]; a[at] = t;
      left = lo + 2;
    }
  }
  return a;
}

/** Value of grid array `arr` linearly interpolated at sample j. */
function atSample(arr: Float64Array, pos: GridPosition, j: number, g: number): number {
  const k = pos.index[j], f = pos.frac[j];
  return arr[k] + f * (arr[Math.min(k + 1, g - 1)] - arr[k]);
}

/**
 * Per sample: the bands (from the grid), the bias and end flags, and the torsion gate (tau set to
 * NaN and flagged where the curvature cannot be told from zero, or a planar projection). `tau` and
 * `flags` are changed in place; returns the bands and the count of straight samples.
 */
function sampleBands(o: {
  readonly kappa: Float64Array; readonly tau: Float64Array; readonly kv: Float64Array; readonly s: Float64Array; readonly flags: Uint8Array;
  readonly gridPos: GridPosition; readonly g: number; readonly curvatureVar: Float64Array; readonly gb: GridBands; readonly L0: number;
  readonly noiseUnknown: boolean; readonly withBands: boolean; readonly normalDims: 1 | 2; readonly planarProjection: boolean;
  readonly closed: boolean; readonly endZone: number; readonly lengthM: number;
}): { kappaLo: Float64Array; kappaHi: Float64Array; tauLo: Float64Array; tauHi: Float64Array; straightCount: number } {
  const m = o.kappa.length;
  const out = {
    kappaLo: new Float64Array(m).fill(NaN), kappaHi: new Float64Array(m).fill(NaN),
    tauLo: new Float64Array(m).fill(NaN), tauHi: new Float64Array(m).fill(NaN), straightCount: 0,
  };
  out.straightCount = sampleLoop(o, out.kappaLo, out.kappaHi, out.tauLo, out.tauHi);
  return out;
}

/** The loop of {@link sampleBands}; returns the count of straight samples. */
function sampleLoop(
  o: Parameters<typeof sampleBands>[0], kappaLo: Float64Array, kappaHi: Float64Array, tauLo: Float64Array, tauHi: Float64Array,
): number {
  const { kappa, tau, kv, s, flags, gridPos, g, curvatureVar, L0, noiseUnknown, withBands, planarProjection, closed, endZone, lengthM } = o;
  const { kLo, kHi, tLo, tHi, kBias, tBias } = o.gb;
  const zeroWithin = o.normalDims === 2 ? 2.448 : 1.96;
  let straightCount = 0;
  for (let j = 0; j < kappa.length; ++j) {
    const sdK = noiseUnknown ? 0 : Math.sqrt(atSample(curvatureVar, gridPos, j, g));
    const kap = hypot3(kv[3 * j], kv[3 * j + 1], kv[3 * j + 2]);
    let resolved = kap > 3 * sdK && kap > STRAIGHT_KAPPA;
    if (!(kap > STRAIGHT_KAPPA)) ++straightCount;
    if (withBands) {
      kappaLo[j] = Math.max(0, kappa[j] + atSample(kLo, gridPos, j, g) / L0);
      // Where the curvature vector's 95% region holds 0 (|k| within sqrt(chi2_d(0.95)) of its
      // per-direction SD: 2.448 for the 2 normal directions in space, 1.96 in a plane; the
      // confidence region of a normal mean, common practice), the band of |k| reaches down to 0:
      // quantiles of the replicates' norms never do, and a straight stretch's band then misses 0.
      if (kap <= zeroWithin * sdK) kappaLo[j] = 0;
      kappaHi[j] = kappa[j] + atSample(kHi, gridPos, j, g) / L0;
      if (atSample(kBias, gridPos, j, g) > BIAS_RATIO_KAPPA) flags[j] |= FLAG_BIAS;
      // A curvature band that reaches 0 (noise, or the bias of a feature near the resolution
      // length) cannot tell the curvature from zero either: no torsion there.
      if (!(kappaLo[j] > 0)) resolved = false;
    }
    if (planarProjection) {
      flags[j] |= FLAG_TORSION_NOT_MEASURABLE;
      tau[j] = NaN;
    } else if (!resolved) {
      flags[j] |= FLAG_TORSION_UNDEFINED;
      tau[j] = NaN;
    } else if (withBands) {
      const lo = atSample(tLo, gridPos, j, g) / L0, hi = atSample(tHi, gridPos, j, g) / L0;
      tauLo[j] = tau[j] + lo;
      tauHi[j] = tau[j] + hi;
      if (atSample(tBias, gridPos, j, g) > BIAS_RATIO_TAU) flags[j] |= FLAG_BIAS;
    }
    if (!closed && (s[j] < endZone || s[j] > lengthM - endZone)) flags[j] |= FLAG_END;
  }
  return straightCount;
}

/**
 * Sets FLAG_BIAS on samples with a defined torsion that lie within `reach` (arc length) of a sample
 * whose torsion is undefined; returns how many were newly flagged. Samples are in order of s.
 */
function flagNearUndefined(flags: Uint8Array, s: Float64Array, closed: boolean, length: number, reach: number): number {
  const m = flags.length;
  const undef: number[] = [];
  for (let j = 0; j < m; ++j) if (flags[j] & FLAG_TORSION_UNDEFINED) undef.push(s[j]);
  if (undef.length === 0) return 0;
  let count = 0, a = 0;
  for (let j = 0; j < m; ++j) {
    if (flags[j] & FLAG_TORSION_UNDEFINED || flags[j] & FLAG_BIAS) continue;
    while (a + 1 < undef.length && undef[a + 1] <= s[j]) ++a;
    let d = Math.min(Math.abs(s[j] - undef[a]), a + 1 < undef.length ? Math.abs(undef[a + 1] - s[j]) : Infinity);
    if (closed) d = Math.min(d, length - Math.abs(s[j] - undef[0]), length - Math.abs(undef[undef.length - 1] - s[j]));
    if (d <= reach) { flags[j] |= FLAG_BIAS; ++count; }
  }
  return count;
}

/** 1 where the torsion is defined (not flagged undefined), else 0. */
function torsionMask(flags: Uint8Array): Uint8Array {
  const mask = new Uint8Array(flags.length);
  for (let j = 0; j < flags.length; ++j) mask[j] = flags[j] & FLAG_TORSION_UNDEFINED ? 0 : 1;
  return mask;
}

function countSet(mask: Uint8Array): number {
  let c = 0;
  for (let j = 0; j < mask.length; ++j) c += mask[j];
  return c;
}

/** flags[i] |= bit for every sample. */
function flagAll(flags: Uint8Array, bit: number): void {
  for (let i = 0; i < flags.length; ++i) flags[i] |= bit;
}

/** Sets FLAG_BIAS on samples in a kink's stretch (`kinkZones`) or within `margin` (arc length) of it. */
function flagKinkZones(flags: Uint8Array, table: ArcTable, sampleU: Float64Array, zones: Float64Array, closed: boolean, margin: number): void {
  for (let j = 0; j < flags.length; ++j) {
    if (inKinkZone(arcAt(table, sampleU[j], closed), zones, margin, closed, table.length)) flags[j] |= FLAG_BIAS;
  }
}

/** Samples flagged biased and not at an end. */
function countBiased(flags: Uint8Array): number {
  let c = 0;
  for (let j = 0; j < flags.length; ++j) if (flags[j] & FLAG_BIAS && !(flags[j] & FLAG_END)) ++c;
  return c;
}

function markTransported(transported: Uint8Array, flags: Uint8Array): void {
  for (let j = 0; j < flags.length; ++j) if (transported[j]) flags[j] |= FLAG_FRAME_TRANSPORTED;
}

/** v (3 per sample, canonical frame) turned to the lab frame in place: v <- Q^T v. */
function rotateToLab(v: Float64Array, Q: Float64Array): void {
  for (let j = 0; j < v.length; j += 3) {
    const a = v[j], b = v[j + 1], c = v[j + 2];
    v[j] = Q[0] * a + Q[3] * b + Q[6] * c;
    v[j + 1] = Q[1] * a + Q[4] * b + Q[7] * c;
    v[j + 2] = Q[2] * a + Q[5] * b + Q[8] * c;
  }
}

/** Input row of each sample (1-based, or the trace's row numbers; -1 for resampled samples). */
function inputRows(traceIndex: Int32Array, rows: Trace["rows"]): Int32Array {
  const out = new Int32Array(traceIndex.length);
  for (let j = 0; j < traceIndex.length; ++j) { const i = traceIndex[j]; out[j] = i < 0 ? -1 : rows ? rows[i] : i + 1; }
  return out;
}

/** Trace indices of the points whose robust weight is below 0.5. */
function downweightedPoints(w: Float64Array, kept: Int32Array): number[] {
  const out: number[] = [];
  for (let i = 0; i < w.length; ++i) if (w[i] < 0.5) out.push(kept[i]);
  return out;
}

/**
 * The replicates kept for the physics stage: each replicate's deviation from its grid point's
 * median, interpolated to the samples, added to the estimate (kappa floored at 0; NaN where tau is).
 */
function keptReplicates(
  boot: BootstrapOutput, Rb: number, R: number, gridPos: GridPosition, kappa: Float64Array, tau: Float64Array, L0: number,
): { kappa: Float64Array; tau: Float64Array } {
  const g = boot.curvatureVar.length, m = kappa.length;
  // Replicates recentred on their median, as the bands are.
  const kMed = new Float64Array(g), tMed = new Float64Array(g);
  gridMedians(boot, Rb, kMed, tMed);
  const out = { kappa: new Float64Array(R * m), tau: new Float64Array(R * m) };
  keptLoop(boot, R, gridPos, kappa, tau, L0, kMed, tMed, out.kappa, out.tau);
  return out;
}

function gridMedians(boot: BootstrapOutput, Rb: number, kMed: Float64Array, tMed: Float64Array): void {
  const g = kMed.length;
  const col = new Float64Array(Rb);
  for (let j = 0; j < g; ++j) {
    for (let r = 0; r < Rb; ++r) col[r] = boot.kappa[r * g + j];
    kMed[j] = quantileSorted(placeBandQuantiles(col), 0.5);
    let finite = 0;
    for (let r = 0; r < Rb; ++r) { const v = boot.tau[r * g + j]; if (Number.isFinite(v)) col[finite++] = v; }
    tMed[j] = finite > 0 ? quantileSorted(placeBandQuantiles(col.subarray(0, finite)), 0.5) : 0;
  }
}

function keptLoop(
  boot: BootstrapOutput, R: number, gridPos: GridPosition, kappa: Float64Array, tau: Float64Array, L0: number,
  kMed: Float64Array, tMed: Float64Array, kappaSamples: Float64Array, tauSamples: Float64Array,
): void {
  const g = kMed.length, m = kappa.length;
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

/**
 * The bands' estimate of the smoothing bias at each sample (1/m, signed; see Profile.kappaBias):
 * the less-smoothed band fit's shift extrapolated as the bands extrapolate it, (1 + KAPPA_EXTRAPOLATION)
 * shK for kappa (floored so that kappa + bias >= 0) and (1 + 1/3) shT for tau (bandOffsets' default);
 * NaN where tau is.
 */
function biasEstimates(
  shK: Float64Array, shT: Float64Array, gridPos: GridPosition, g: number, kappa: Float64Array, tau: Float64Array, L0: number,
): { kappa: Float64Array; tau: Float64Array } {
  const m = kappa.length;
  const out = { kappa: new Float64Array(m), tau: new Float64Array(m) };
  for (let j = 0; j < m; ++j) {
    const bk = ((1 + KAPPA_EXTRAPOLATION) * atSample(shK, gridPos, j, g)) / L0;
    out.kappa[j] = Number.isFinite(bk) ? Math.max(-kappa[j], bk) : 0;
    const bt = ((4 / 3) * atSample(shT, gridPos, j, g)) / L0;
    out.tau[j] = Number.isNaN(tau[j]) ? NaN : Number.isFinite(bt) ? bt : 0;
  }
  return out;
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

/** Where each sample sits on the grid: the interval and the fraction within. */
interface GridPosition {
  readonly index: Int32Array;
  readonly frac: Float64Array;
}

/** For each sorted sample parameter, the grid interval holding it and the fraction within. */
function locateOnGrid(grid: Float64Array, at: Float64Array, closed: boolean, basis: SplineBasis): GridPosition {
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
