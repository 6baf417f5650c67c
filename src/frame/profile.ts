import { ParameterError, InputError } from "../errors.js";
import {
  FLAG_BIAS, FLAG_END, FLAG_FRAME_TRANSPORTED, FLAG_TORSION_NOT_MEASURABLE, FLAG_TORSION_UNDEFINED,
  type Profile, type Trace,
} from "../types.js";
import { makeBasis, type SplineBasis } from "./bspline.js";
import { bootstrapBands, gridBasis, kappaTauAt, rhsNoiseFactor } from "./bootstrap.js";
import { torsionLevel } from "./torsionLevel.js";
import { arcAt, arcTable, evalCurve, kappaTau, uAtArc } from "./curve.js";
import { canonicalFrame } from "./canonicalFrame.js";
import { symEigen3 } from "./symEigen3.js";
import { detectClosed } from "./detectClosed.js";
import { frames } from "./frames.js";
import { makeSmoother, selectSmoothing, solveAt, wavelengthForLambda, type Selection, type Smoother } from "./smoother.js";

/** Options of `fitProfile`; lengths in metres. */
export interface ProfileOptions {
  /** Force a closed (periodic) or open fit; undefined: use trace.closed, else detect from the ends. */
  readonly closed?: boolean;
  /** Bootstrap replicates for the 95% bands (default 200; 0 disables the bands). */
  readonly bootstrap?: number;
  /** Seed of the bootstrap random stream (default 1). */
  readonly seed?: number;
  /** Resample at this arc-length step (m) instead of one sample per input point. */
  readonly step?: number;
  /** Keep the bootstrap replicates of kappa and tau in the profile (for the physics stage). */
  readonly keepSamples?: boolean;
  /** Use this smoothing level instead of the automatic choice (dimensionless, as reported). */
  readonly lambda?: number;
  /**
   * Curvature smoothing level: the discrepancy rule (default) or the plug-in risk of kappa from a
   * GCV pilot. The risk rule is closer to the best level on wires with localised curvature (bumps,
   * knots) but measured 1.3-6x worse on helix-like wires (bench/accuracy.ts), hence not the default.
   */
  readonly kappaLevel?: "discrepancy" | "risk";
  /** Number of knot intervals (default: from the point count, then matched to the smoothing scale). */
  readonly segments?: number;
  /** Foot-point re-parametrisation passes (default 3; 2 above 20000 points). */
  readonly passes?: number;
}

const MAX_SEGMENTS = 5_000;
const KNOTS_PER_WAVELENGTH = 12;
const INITIAL_SEGMENTS_CAP = 1500;
/** Turning angle between samples (rad) above which a trace counts as sparse. */
const SPARSE_TURN = 0.35;

/** Number of knot intervals: rich enough for sparse traces, capped for long ones. */
export function segmentCount(n: number, closed: boolean): number {
  const target = n <= 400 ? n : Math.max(400, Math.round(n / 4));
  return Math.min(MAX_SEGMENTS, Math.max(closed ? 12 : 8, target));
}

/** Hampel-style redescending weight of a normal-plane residual e with robust scale sc. */
function robustWeight(e: number, sc: number): number {
  const r = e / sc;
  if (r <= 4) return 1;
  if (r >= 8) return 0;
  const q = (r - 4) / 4;
  return (1 - q * q) * (1 - q * q);
}

function median(values: Float64Array): number {
  const v = values.slice().sort();
  const n = v.length;
  return n === 0 ? NaN : n % 2 ? v[(n - 1) >> 1] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

/**
 * Curvature and torsion profile of a traced wire, with 95% bootstrap bands.
 *
 * Method (NUMERICS.md, sec. 5): a quintic P-spline per coordinate (Eilers & Marx 1996, Stat. Sci.
 * 11:89) with a 4th-order difference penalty, one smoothing level for x, y, z, fitted against an
 * arc-length parameter refined by foot-point projection (Hoschek 1988, CAGD 5:27; Wang, Pottmann &
 * Liu 2006, ACM TOG 25:214), with redescending weights against gross outliers (Hampel 1974, JASA 69:383).
 * Smoothing: GCV, then the noise estimate, then the discrepancy level (see `selectSmoothing`).
 * Bands: parametric bootstrap of normal-plane noise through the factorised smoother (`bootstrapBands`).
 * Torsion follows B' = -tau N (a right-handed helix has tau > 0); it is NaN and flagged where the
 * curvature vector cannot be told from zero (kappa below 3 standard deviations of its own noise).
 *
 * Units: metres in, metres and 1/m out. Cost O(n) per pass plus O(R (K + m)) for R replicates.
 * @throws {InputError} fewer than 6 points, non-finite coordinates, or a trace of zero length.
 * @throws {ParameterError} bad options.
 * @example fitProfile(helixTrace).kappa[100] // ~ R / (R^2 + c^2)
 */
export function fitProfile(trace: Trace, options: ProfileOptions = {}): Profile {
  const file = trace.source.file;
  const R = options.bootstrap ?? 200;
  const seed = options.seed ?? 1;
  // Dense traces converge in fewer foot-point passes (measured at 1e5 points: the same kappa error
  // to 1% with 2 passes as with 3).
  const passes = options.passes ?? (trace.xyz.length / 3 > 20_000 ? 2 : 3);
  if (!Number.isInteger(R) || R < 0 || R > 100_000) throw new ParameterError("profile", "bootstrap", `must be an integer from 0 to 100000 (got ${R})`);
  if (!Number.isInteger(seed)) throw new ParameterError("profile", "seed", `must be an integer (got ${seed})`);
  if (options.step !== undefined && !(options.step > 0 && Number.isFinite(options.step))) throw new ParameterError("profile", "step", `must be a positive length (got ${options.step})`);
  if (options.segments !== undefined && !(Number.isInteger(options.segments) && options.segments >= 8 && options.segments <= 100_000)) throw new ParameterError("profile", "segments", `must be an integer from 8 to 100000 (got ${options.segments})`);
  if (options.lambda !== undefined && !(options.lambda > 0)) throw new ParameterError("profile", "lambda", `must be positive (got ${options.lambda})`);
  const n = trace.xyz.length / 3;
  if (!Number.isInteger(n) || n < 6) throw new InputError(file, null, "points", `need at least 6 points for a quintic fit, got ${Math.floor(n)}`);
  for (let k = 0; k < 3 * n; ++k) {
    if (!Number.isFinite(trace.xyz[k])) throw new InputError(file, null, "xyz", `coordinate ${k % 3} of point ${Math.floor(k / 3) + 1} is not finite`);
  }
  const diagnostics: string[] = [...trace.diagnostics];
  const planar = trace.dims === 2;
  const normalDims: 1 | 2 = planar ? 1 : 2;

  // Work in centred, scaled coordinates: centroid at 0, total chord length 1.
  let cx = 0, cy = 0, cz = 0;
  for (let i = 0; i < n; ++i) { cx += trace.xyz[3 * i]; cy += trace.xyz[3 * i + 1]; cz += trace.xyz[3 * i + 2]; }
  cx /= n; cy /= n; cz /= n;
  let chord = 0;
  for (let i = 1; i < n; ++i) chord += Math.hypot(trace.xyz[3 * i] - trace.xyz[3 * i - 3], trace.xyz[3 * i + 1] - trace.xyz[3 * i - 2], trace.xyz[3 * i + 2] - trace.xyz[3 * i - 1]);
  if (!(chord > 0)) throw new InputError(file, null, "points", "all points coincide: the trace has zero length");
  const L0 = chord;
  const y = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    y[3 * i] = (trace.xyz[3 * i] - cx) / L0;
    y[3 * i + 1] = (trace.xyz[3 * i + 1] - cy) / L0;
    y[3 * i + 2] = (trace.xyz[3 * i + 2] - cz) / L0;
  }

  // Rotate into the canonical frame (3D only: planar traces stay in their xy plane).
  const Q = planar ? Float64Array.of(1, 0, 0, 0, 1, 0, 0, 0, 1) : canonicalFrame(y);
  for (let i = 0; i < n; ++i) {
    const a = y[3 * i], b = y[3 * i + 1], c = y[3 * i + 2];
    y[3 * i] = Q[0] * a + Q[1] * b + Q[2] * c;
    y[3 * i + 1] = Q[3] * a + Q[4] * b + Q[5] * c;
    y[3 * i + 2] = Q[6] * a + Q[7] * b + Q[8] * c;
  }
  /** Back to the lab frame: v_lab = Q^T v. */
  const toLab = (v: Float64Array, j: number, out: Float64Array, o: number) => {
    const a = v[j], b = v[j + 1], c = v[j + 2];
    out[o] = Q[0] * a + Q[3] * b + Q[6] * c;
    out[o + 1] = Q[1] * a + Q[4] * b + Q[7] * c;
    out[o + 2] = Q[2] * a + Q[5] * b + Q[8] * c;
  };
  const closed = options.closed ?? trace.closed ?? detectClosed(y, diagnostics);

  // Initial parameter: cumulative chord length of a lightly smoothed polyline (chord lengths of raw
  // noisy points are mostly noise when the spacing is below the noise).
  const u = new Float64Array(n);
  {
    const half = n >= 60 ? 2 : 0;
    const sm = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) {
      for (let c = 0; c < 3; ++c) {
        let acc = 0, cnt = 0;
        for (let k = -half; k <= half; ++k) {
          let j = i + k;
          if (closed) j = (j + n) % n;
          else if (j < 0 || j >= n) continue;
          acc += y[3 * j + c]; ++cnt;
        }
        sm[3 * i + c] = acc / cnt;
      }
    }
    for (let i = 1; i < n; ++i) u[i] = u[i - 1] + Math.hypot(sm[3 * i] - sm[3 * i - 3], sm[3 * i + 1] - sm[3 * i - 2], sm[3 * i + 2] - sm[3 * i - 1]);
    if (!(u[n - 1] > 0)) throw new InputError(file, null, "points", "all points coincide: the trace has zero length");
  }
  let span = closed
    ? u[n - 1] + Math.hypot(y[0] - y[3 * n - 3], y[1] - y[3 * n - 2], y[2] - y[3 * n - 1])
    : u[n - 1];
  const w = new Float64Array(n).fill(1);
  const medianStep = (() => {
    const st = new Float64Array(n - 1);
    for (let i = 1; i < n; ++i) st[i - 1] = Math.hypot(y[3 * i] - y[3 * i - 3], y[3 * i + 1] - y[3 * i - 2], y[3 * i + 2] - y[3 * i - 1]);
    return median(st);
  })();
  // Large traces start on a coarser basis; the first pass's smoothing scale then sets the knots.
  const fullSegments = segmentCount(n, closed);
  let nseg = options.segments ?? Math.min(fullSegments, INITIAL_SEGMENTS_CAP);

  let basis: SplineBasis = makeBasis(0, span, nseg, closed);
  let sparse = false;
  let sel: Selection | undefined;
  let smFinal: Smoother | undefined;
  const d12 = new Float64Array(12), st = new Float64Array(1), sb = new Float64Array(24);
  const resid = new Float64Array(n);
  for (let pass = 0; pass <= passes; ++pass) {
    const sm = makeSmoother(basis, u, y, w);
    // Each pass starts its GCV search near the previous level (same knots: the levels compare).
    sel = selectSmoothing(sm, normalDims, options.lambda, sel && sel.basisSegments === nseg ? Math.log10(sel.lambdaGcv) : undefined);
    smFinal = sm;
    if (pass === passes) break;
    // Foot-point projection: Newton on |r(u) - p|^2, steps limited to one knot interval.
    const coef = sel.fit.coef;
    for (let i = 0; i < n; ++i) {
      let ui = u[i];
      for (let it = 0; it < 4; ++it) {
        evalCurve(basis, coef, ui, 2, d12, st, sb);
        const ex = d12[0] - y[3 * i], ey = d12[1] - y[3 * i + 1], ez = d12[2] - y[3 * i + 2];
        const g = ex * d12[3] + ey * d12[4] + ez * d12[5];
        const hss = d12[3] * d12[3] + d12[4] * d12[4] + d12[5] * d12[5] + ex * d12[6] + ey * d12[7] + ez * d12[8];
        const sp2 = d12[3] * d12[3] + d12[4] * d12[4] + d12[5] * d12[5];
        let du = -g / (hss > 0.1 * sp2 ? hss : sp2);
        if (du > basis.h) du = basis.h;
        else if (du < -basis.h) du = -basis.h;
        ui += du;
        if (!closed) ui = Math.min(Math.max(ui, basis.u0), basis.u0 + basis.nseg * basis.h);
        if (Math.abs(du) < 1e-7 * basis.h) break;
      }
      u[i] = ui;
      evalCurve(basis, coef, ui, 0, d12, st, sb);
      resid[i] = Math.hypot(d12[0] - y[3 * i], d12[1] - y[3 * i + 1], d12[2] - y[3 * i + 2]);
    }
    // Robust weights from the residual norms (Rayleigh median in 3D: 1.1774 sigma; half-normal in 2D: 0.6745 sigma).
    // Floor the scale at 1% of the median input step: a gross outlier is off by a good part of a
    // step at least, and nearly noise-free traces (designed paths, mesh centre lines with a small
    // deterministic ripple) must keep unit weights.
    const sc = Math.max(median(resid) / (normalDims === 2 ? 1.1774 : 0.6745), 1e-2 * medianStep);
    if (sc > 0) for (let i = 0; i < n; ++i) w[i] = robustWeight(resid[i], sc);
    // Map parameters to the arc length of the current fit.
    const table = arcTable(basis, sel.fit.coef);
    for (let i = 0; i < n; ++i) u[i] = arcAt(table, u[i], closed);
    if (closed) for (let i = 0; i < n; ++i) u[i] -= Math.floor(u[i] / table.length) * table.length;
    span = table.length;
    // Once the smoothing scale is known, a basis with ~KNOTS_PER_WAVELENGTH intervals per resolved
    // wavelength represents the fit as well as a richer one; fewer coefficients make every later step cheaper.
    const wl = wavelengthForLambda(sel.fit.lambda, sm.normal.wSum / (basis.nseg * basis.h), basis.h);
    // Sparse traces (a few points per turn, e.g. a molecule's atoms): a knot interval per point cannot
    // follow the curve between samples and the fit shrinks it; give them four intervals per point.
    if (pass === 0 && !sparse && n <= 2000 && options.segments === undefined) {
      let turn = 0;
      const kt0 = new Float64Array(5);
      for (let i = 0; i < n; ++i) {
        evalCurve(basis, sel.fit.coef, u[i], 3, d12, st, sb);
        turn = Math.max(turn, kappaTau(d12, kt0)[0] * medianStep);
      }
      if (turn > SPARSE_TURN) {
        sparse = true;
        nseg = Math.min(MAX_SEGMENTS, 4 * n);
        diagnostics.push(`sparse trace: the curve turns by up to ${turn.toFixed(2)} rad between samples; fitted with ${nseg} knot intervals`);
      }
    }
    if (options.lambda === undefined && options.segments === undefined && !sparse) {
      const want = Math.ceil((KNOTS_PER_WAVELENGTH * span) / wl);
      // Shrink when the basis is much richer than the smoothing scale; grow back (up to the
      // point-count rule) when the basis is too coarse, but not after the first pass, whose
      // parameters are still noisy and whose level is too low.
      if (wl > 2 * KNOTS_PER_WAVELENGTH * basis.h) nseg = Math.max(closed ? 12 : 8, want);
      else if (pass > 0 && wl < KNOTS_PER_WAVELENGTH * basis.h / 2) nseg = Math.min(fullSegments, Math.max(nseg, want));
    }
    basis = makeBasis(0, span, nseg, closed);
  }
  if (!sel || !smFinal) throw new Error("unreachable");
  const fit = sel.fit;
  const coef = fit.coef;
  const table = arcTable(basis, coef);
  const length = table.length;
  if (sel.rule !== "discrepancy") diagnostics.push("smoothing: the discrepancy level could not be bracketed (noise-free data?); used 3x the GCV level");

  const outliers: number[] = [];
  for (let i = 0; i < n; ++i) if (w[i] < 0.5) outliers.push(i);
  if (outliers.length > 0) diagnostics.push(`robust fit: ${outliers.length} point(s) downweighted as outliers (first at input point ${outliers[0] + 1})`);

  // Sample parameters: sorted foot points, or a uniform arc-length step.
  let sampleU: Float64Array;
  if (options.step !== undefined) {
    const step = options.step / L0;
    const count = closed ? Math.max(1, Math.floor(length / step - 1e-9) + 1) : Math.floor(length / step + 1e-9) + 1;
    if (count > 5_000_000) throw new ParameterError("profile", "step", `gives ${count} samples; use a larger step`);
    sampleU = new Float64Array(count);
    for (let k = 0; k < count; ++k) sampleU[k] = uAtArc(basis, coef, table, Math.min(k * step, length));
  } else {
    sampleU = u.slice().sort();
  }
  const m = sampleU.length;

  // Resolution length: half-power wavelength of the smoother's transfer function
  // 1 / (1 + (lambda h^7 / rho) omega^8) (the difference penalty is a discretised integral of
  // (r'''')^2: sum (D^4 c)^2 ~ h^7 int (c'''')^2), bounded below by the knot spacing and the sampling.
  const rho = sm0WeightDensity(w, length);
  const resolutionInternal = Math.max(wavelengthForLambda(fit.lambda, rho, basis.h), 2 * basis.h, 2 / rho);

  // Point estimates and frames at the samples.
  const s = new Float64Array(m), x = new Float64Array(m), yy = new Float64Array(m), z = new Float64Array(m);
  const kappa = new Float64Array(m), tau = new Float64Array(m);
  const r1 = new Float64Array(3 * m), kv = new Float64Array(3 * m);
  const kt = new Float64Array(5), pos = new Float64Array(3);
  for (let j = 0; j < m; ++j) {
    evalCurve(basis, coef, sampleU[j], 3, d12, st, sb);
    s[j] = arcAt(table, sampleU[j], closed) * L0;
    toLab(d12, 0, pos, 0);
    x[j] = pos[0] * L0 + cx; yy[j] = pos[1] * L0 + cy; z[j] = pos[2] * L0 + cz;
    kappaTau(d12, kt);
    kappa[j] = kt[0] / L0;
    tau[j] = kt[1] / L0;
    r1[3 * j] = d12[3]; r1[3 * j + 1] = d12[4]; r1[3 * j + 2] = d12[5];
    kv[3 * j] = kt[2]; kv[3 * j + 1] = kt[3]; kv[3 * j + 2] = kt[4];
  }

  // Bootstrap on a grid of at most 4 points per knot interval (the bands vary on the resolution
  // scale, which is at least two intervals), interpolated to the samples.
  const kappaLo = new Float64Array(m).fill(NaN), kappaHi = new Float64Array(m).fill(NaN);
  const tauLo = new Float64Array(m).fill(NaN), tauHi = new Float64Array(m).fill(NaN);
  const flags = new Uint8Array(m);
  const Rb = Math.max(R, 50);
  // The bands vary on the resolution scale: 10 grid points per resolution length suffice.
  const gridCount = Math.min(4 * basis.nseg, Math.max(256, Math.ceil((10 * length) / resolutionInternal)));
  const gridU = m <= gridCount ? sampleU : uniformGrid(basis, gridCount, closed);
  const tangent = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    evalCurve(basis, coef, u[i], 1, d12, st, sb);
    const sp = Math.hypot(d12[3], d12[4], d12[5]);
    tangent[3 * i] = d12[3] / sp; tangent[3 * i + 1] = d12[4] / sp; tangent[3 * i + 2] = d12[5] / sp;
  }
  const C = rhsNoiseFactor(basis, u, w, tangent, sel.sigma, normalDims);
  const grid = gridBasis(basis, gridU);
  const interior = new Uint8Array(grid.m);
  for (let j = 0; j < grid.m; ++j) {
    const sj = arcAt(table, gridU[j], closed);
    interior[j] = closed || (sj > resolutionInternal && sj < length - resolutionInternal) ? 1 : 0;
  }
  // The risk sums need no more than ~1000 points: take every k-th grid point.
  const riskGrid = (() => {
    const stride = Math.max(1, Math.ceil(grid.m / 600));
    const count = Math.ceil(grid.m / stride);
    const at = new Float64Array(count), sArc = new Float64Array(count);
    for (let k = 0; k < count; ++k) { at[k] = gridU[k * stride]; sArc[k] = arcAt(table, at[k], closed); }
    return { grid: stride === 1 ? grid : gridBasis(basis, at), ends: { s: sArc, length, closed, rho, h: basis.h } };
  })();
  // Curvature level: plug-in risk of kappa from the GCV pilot (GCV undersmooths for derivatives);
  // torsion level: plug-in risk of tau from the curvature fit (see torsionLevel).
  const auto = options.lambda === undefined;
  let kFit = fit;
  if (auto && options.kappaLevel === "risk") {
    const pilotK = solveAt(smFinal, sel.lambdaGcv);
    kFit = torsionLevel(smFinal, pilotK, C, riskGrid.grid, riskGrid.ends, seed, 0, 16, 4).fit;
  }
  const planarWithinNoise = !planar && !trace.planarProjection && outOfPlaneVariance(y, w) <= sel.sigma * sel.sigma * (1 + 4 * Math.sqrt(2 / n));
  const tauChoice = planar || trace.planarProjection || !auto || planarWithinNoise
    ? { fit: kFit, factorOfPilot: 1 }
    : torsionLevel(smFinal, kFit, C, riskGrid.grid, riskGrid.ends, seed, 1, 16);
  const tauFit = tauChoice.fit;
  if (tauChoice.factorOfPilot !== 1) diagnostics.push(`torsion: smoothing level ${tauChoice.factorOfPilot.toPrecision(3)}x the curvature level (plug-in risk of the third derivative)`);
  if (planarWithinNoise) diagnostics.push("planar within the noise (out-of-plane spread not above the noise): torsion reported as 0 with its noise band");
  if (kFit !== fit) {
    for (let j = 0; j < m; ++j) {
      evalCurve(basis, kFit.coef, sampleU[j], 3, d12, st, sb);
      kappaTau(d12, kt);
      kappa[j] = kt[0] / L0;
      kv[3 * j] = kt[2]; kv[3 * j + 1] = kt[3]; kv[3 * j + 2] = kt[4];
    }
  }
  for (let j = 0; j < m; ++j) {
    evalCurve(basis, tauFit.coef, sampleU[j], 3, d12, st, sb);
    tau[j] = planarWithinNoise ? 0 : kappaTau(d12, kt)[1] / L0;
  }
  // Bands from a fit at a quarter of each level: less smoothing bias, so the bands cover the truth
  // where bias dominates (the reduced-penalty idea of Dai 2017, arXiv 1706.00865).
  const bandK = solveAt(smFinal, kFit.lambda / 4);
  const bandT = tauFit === kFit ? bandK : solveAt(smFinal, tauFit.lambda / 4);
  const boot = bootstrapBands({ C, grid, kappaFit: bandK, tauFit: bandT, normalDims, replicates: Rb, seed });
  const g = gridU.length;
  const gk = new Float64Array(g), gt = new Float64Array(g), gvar = boot.curvatureVar;
  for (let j = 0; j < g; ++j) {
    gk[j] = kappaTauAt(grid, kFit.coef, null, j, d12, kt)[0];
    gt[j] = kappaTauAt(grid, tauFit.coef, null, j, d12, kt)[1];
  }
  // Quantile offsets on the grid (R-7 quantiles, as numpy's default).
  const kBias = new Float64Array(g);
  const kLoOff = new Float64Array(g), kHiOff = new Float64Array(g), tLoOff = new Float64Array(g), tHiOff = new Float64Array(g);
  const col = new Float64Array(Rb);
  const q = (sorted: Float64Array, p: number) => {
    const h = (sorted.length - 1) * p, lo = Math.floor(h);
    return lo + 1 < sorted.length ? sorted[lo] + (h - lo) * (sorted[lo + 1] - sorted[lo]) : sorted[lo];
  };
  for (let j = 0; j < g; ++j) {
    for (let r = 0; r < Rb; ++r) col[r] = boot.kappa[r * g + j];
    col.sort();
    // Bias-aware widening: if bias grows linearly with the level, the quarter-level fit keeps a
    // third of the difference d between it and the full-level fit, on d's side (a Richardson step).
    const dK = (kappaTauAt(grid, bandK.coef, null, j, d12, kt)[0] - gk[j]) / 3;
    kBias[j] = Math.abs(3 * dK);
    kLoOff[j] = q(col, 0.025) - gk[j] + Math.min(0, dK); kHiOff[j] = q(col, 0.975) - gk[j] + Math.max(0, dK);
    for (let r = 0; r < Rb; ++r) col[r] = boot.tau[r * g + j];
    col.sort();
    const dT = (kappaTauAt(grid, bandT.coef, null, j, d12, kt)[1] - gt[j]) / 3;
    tLoOff[j] = q(col, 0.025) - gt[j] + Math.min(0, dT || 0); tHiOff[j] = q(col, 0.975) - gt[j] + Math.max(0, dT || 0);
  }
  const interp = (arr: Float64Array, j: number, k: number, f: number) => arr[k] + f * (arr[Math.min(k + 1, g - 1)] - arr[k]);
  const gridPos = locateOnGrid(gridU, sampleU, closed, basis);
  for (let j = 0; j < m; ++j) {
    const k = gridPos.index[j], f = gridPos.frac[j];
    const sdK = Math.sqrt(interp(gvar, j, k, f));
    const kap = Math.hypot(kv[3 * j], kv[3 * j + 1], kv[3 * j + 2]);
    const resolved = kap > 3 * sdK;
    if (R > 0) {
      kappaLo[j] = Math.max(0, kappa[j] + interp(kLoOff, j, k, f) / L0);
      kappaHi[j] = kappa[j] + interp(kHiOff, j, k, f) / L0;
      // Bias check: the quarter-level fit moved by more than the band's half-width.
      if (interp(kBias, j, k, f) / L0 > 0.5 * (kappaHi[j] - kappaLo[j])) flags[j] |= FLAG_BIAS;
    }
    if (trace.planarProjection) {
      flags[j] |= FLAG_TORSION_NOT_MEASURABLE;
      tau[j] = NaN;
    } else if (!resolved) {
      flags[j] |= FLAG_TORSION_UNDEFINED;
      tau[j] = NaN;
    } else if (R > 0) {
      // Planar within the noise: tau = 0, with the replicates' spread as its band.
      const lo = interp(tLoOff, j, k, f) / L0, hi = interp(tHiOff, j, k, f) / L0;
      tauLo[j] = planarWithinNoise ? Math.min(0, lo) : tau[j] + lo;
      tauHi[j] = planarWithinNoise ? Math.max(0, hi) : tau[j] + hi;
    }
    if (!closed && (s[j] < resolutionInternal * L0 || s[j] > (length - resolutionInternal) * L0)) flags[j] |= FLAG_END;
  }
  const resolvedMask = new Uint8Array(m);
  for (let j = 0; j < m; ++j) resolvedMask[j] = flags[j] & FLAG_TORSION_UNDEFINED ? 0 : 1;
  const fr = frames(r1, kv, resolvedMask, closed);
  for (let j = 0; j < m; ++j) if (fr.transported[j]) flags[j] |= FLAG_FRAME_TRANSPORTED;
  for (const f of [fr.T, fr.N, fr.B]) for (let j = 0; j < m; ++j) toLab(f, 3 * j, f, 3 * j);
  const undefinedCount = resolvedMask.reduce((a, v) => a + (v ? 0 : 1), 0);
  if (undefinedCount > 0 && !trace.planarProjection) diagnostics.push(`torsion: undefined at ${undefinedCount} of ${m} samples where the curvature cannot be told from zero (a twist-free frame is carried there)`);
  let biased = 0;
  for (let j = 0; j < m; ++j) if (flags[j] & FLAG_BIAS && !(flags[j] & FLAG_END)) ++biased;
  if (biased > 0) diagnostics.push(`bands: at ${biased} of ${m} samples the curvature changes by more than its band when smoothed less (a feature near the resolution length): the bands may under-cover there`);
  if (trace.planarProjection) diagnostics.push("planar projection: curvature is the projected curvature; torsion is not measurable");

  let kappaSamples: Float64Array | undefined, tauSamples: Float64Array | undefined;
  if (options.keepSamples && R > 0) {
    kappaSamples = new Float64Array(R * m);
    tauSamples = new Float64Array(R * m);
    for (let r = 0; r < R; ++r) {
      for (let j = 0; j < m; ++j) {
        const k = gridPos.index[j], f = gridPos.frac[j], k1 = Math.min(k + 1, g - 1);
        const dk = (boot.kappa[r * g + k] - gk[k]) * (1 - f) + (boot.kappa[r * g + k1] - gk[k1]) * f;
        const dt = (boot.tau[r * g + k] - gt[k]) * (1 - f) + (boot.tau[r * g + k1] - gt[k1]) * f;
        kappaSamples[r * m + j] = kappa[j] + dk / L0;
        tauSamples[r * m + j] = Number.isNaN(tau[j]) ? NaN : tau[j] + dt / L0;
      }
    }
  }

  const profile: Profile = {
    n: m, s, x, y: yy, z, T: fr.T, N: fr.N, B: fr.B,
    kappa, kappaLo, kappaHi, tau, tauLo, tauHi, flags,
    length: length * L0, closed,
    resolution: resolutionInternal * L0,
    sigma: sel.sigma * L0,
    lambda: kFit.lambda,
    lambdaTorsion: tauFit.lambda,
    segments: basis.nseg,
    edf: sel.edf,
    replicates: R,
    outliers,
    source: trace.source,
    planarProjection: trace.planarProjection ?? false,
    diagnostics,
    ...(kappaSamples && tauSamples ? { kappaSamples, tauSamples } : {}),
  };
  return profile;
}

function sm0WeightDensity(w: Float64Array, length: number): number {
  let t = 0;
  for (let i = 0; i < w.length; ++i) t += w[i];
  return t / length;
}

function uniformGrid(basis: SplineBasis, count: number, closed: boolean): Float64Array {
  const span = basis.nseg * basis.h;
  const g = new Float64Array(closed ? count : count + 1);
  for (let k = 0; k < g.length; ++k) g[k] = basis.u0 + (span * k) / count;
  return g;
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

/** Smallest principal variance of the weighted points (variance off their best plane). */
function outOfPlaneVariance(y: Float64Array, w: Float64Array): number {
  const n = w.length;
  let sw = 0, mx = 0, my = 0, mz = 0;
  for (let i = 0; i < n; ++i) { sw += w[i]; mx += w[i] * y[3 * i]; my += w[i] * y[3 * i + 1]; mz += w[i] * y[3 * i + 2]; }
  mx /= sw; my /= sw; mz /= sw;
  const c = [0, 0, 0, 0, 0, 0];
  for (let i = 0; i < n; ++i) {
    const dx = y[3 * i] - mx, dy = y[3 * i + 1] - my, dz = y[3 * i + 2] - mz, wi = w[i];
    c[0] += wi * dx * dx; c[1] += wi * dx * dy; c[2] += wi * dx * dz; c[3] += wi * dy * dy; c[4] += wi * dy * dz; c[5] += wi * dz * dz;
  }
  for (let k = 0; k < 6; ++k) c[k] /= sw;
  return symEigen3([c[0], c[1], c[2], c[1], c[3], c[4], c[2], c[4], c[5]]).values[0];
}
