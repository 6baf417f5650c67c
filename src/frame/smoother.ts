import type { SplineBasis } from "./bspline.js";
import { differencePenalty, normalEquations, type Normal } from "./design.js";
import { factorLdl, selectedInverse, solveLdl3, symMul3, type Skyline } from "./skyline.js";

/**
 * A penalised spline smoother for one parametrisation: the normal equations, the penalty, and
 * solves at any smoothing level lambda of  sum_i w_i |p_i - r(u_i)|^2 + lambda sum |D^4 c|^2,
 * one lambda shared by x, y and z (P-splines: Eilers & Marx 1996, Stat. Sci. 11:89).
 */
export interface Smoother {
  readonly basis: SplineBasis;
  readonly normal: Normal;
  readonly P: Skyline;
  /** log10 of the lambdas whose half-power wavelength is one knot interval and four curve lengths. */
  readonly logLambdaRange: readonly [number, number];
}

/** The fit at one lambda: coefficients (x, y, z blocks of K), factor of G + lambda P, RSS. */
export interface SmoothFit {
  readonly lambda: number;
  readonly coef: Float64Array;
  readonly factor: Skyline;
  /** Weighted residual sum of squares over all three coordinates. */
  readonly rss: number;
}

export function makeSmoother(basis: SplineBasis, u: Float64Array, xyz: Float64Array, w: Float64Array): Smoother {
  const normal = normalEquations(basis, u, xyz, w);
  const P = differencePenalty(basis);
  const span = basis.nseg * basis.h;
  const rho = normal.wSum / span;
  return { basis, normal, P, logLambdaRange: [Math.log10(lambdaForWavelength(basis.h, rho, basis.h)), Math.log10(lambdaForWavelength(4 * span, rho, basis.h))] };
}

/**
 * The smoothing level whose transfer function 1 / (1 + (lambda h^7 / rho) omega^8) halves at
 * wavelength `wavelength`: the 4th-difference penalty is a discretised integral of (r'''')^2,
 * sum (D^4 c)^2 ~ h^7 int (c'''')^2, and the data term weighs rho (weight per unit length).
 */
export function lambdaForWavelength(wavelength: number, rho: number, h: number): number {
  return (rho * Math.pow(wavelength / (2 * Math.PI), 8)) / Math.pow(h, 7);
}

/** Inverse of lambdaForWavelength: the half-power wavelength of a smoothing level. */
export function wavelengthForLambda(lambda: number, rho: number, h: number): number {
  return 2 * Math.PI * Math.pow((lambda * Math.pow(h, 7)) / rho, 1 / 8);
}

/** Solves at one lambda. Cost O(K b^2). */
export function solveAt(sm: Smoother, lambda: number): SmoothFit {
  // No loops here: they sit in the leaf functions below, so the JIT's on-stack replacement of a
  // loop never compiles this driver before its later calls have run (that deoptimised every call).
  const { G, rhs, yWy } = sm.normal;
  const A: Skyline = { n: G.n, first: G.first, offset: G.offset, data: combined(G.data, lambda, sm.P.data) };
  factorLdl(A, 0);
  const coef = new Float64Array(3 * sm.basis.K);
  const rss = solveCoordinates(A, G, rhs, interleavedRhs(sm.normal), yWy, coef, solveScratch(3 * sm.basis.K));
  return { lambda, coef, factor: A, rss: Math.max(rss, 0) };
}

/** The right-hand sides interleaved (b[3k + c]), once per normal equations (the same for every lambda). */
const interleaved = new WeakMap<Normal, Float64Array>();

function interleavedRhs(normal: Normal): Float64Array {
  let b3 = interleaved.get(normal);
  if (!b3) {
    const K = normal.G.n;
    b3 = new Float64Array(3 * K);
    interleave3(normal.rhs, K, b3);
    interleaved.set(normal, b3);
  }
  return b3;
}

/** Scratch of solveCoordinates (the solve's workspace and G c), shared by all solves of one length:
 * every entry is written before it is read, and nothing is kept between calls. */
let scratchOf: { work: Float64Array; Gc: Float64Array } | null = null;

function solveScratch(len: number): { work: Float64Array; Gc: Float64Array } {
  if (!scratchOf || scratchOf.work.length !== len) scratchOf = { work: new Float64Array(len), Gc: new Float64Array(len) };
  return scratchOf;
}

/** g + lambda p, entry by entry (G and P share their envelope). */
function combined(g: Float64Array, lambda: number, p: Float64Array): Float64Array {
  const out = new Float64Array(g.length);
  for (let k = 0; k < out.length; ++k) out[k] = g[k] + lambda * p[k];
  return out;
}

/**
 * Coefficients of x, y, z into `coef` from the factor A (b3: the right-hand sides interleaved), and
 * the weighted RSS (yWy - 2 c.b + c.G c).
 * The three coordinates share each sweep over A and G (`solveLdl3`, `symMul3`: per coordinate the
 * operations of `solveLdl` and `symMul`), the RSS summed coordinate by coordinate.
 */
function solveCoordinates(
  A: Skyline, G: Skyline, rhs: Float64Array, b3: Float64Array, yWy: number, coef: Float64Array, scratch: { readonly work: Float64Array; readonly Gc: Float64Array },
): number {
  solveLdl3(A, b3, coef, scratch.work);
  symMul3(G, coef, scratch.Gc);
  return residualSum(coef, rhs, scratch.Gc, yWy);
}

/** out[3k + c] = blocks[c K + k]. */
function interleave3(blocks: Float64Array, K: number, out: Float64Array): void {
  for (let k = 0; k < K; ++k) { out[3 * k] = blocks[k]; out[3 * k + 1] = blocks[K + k]; out[3 * k + 2] = blocks[2 * K + k]; }
}

/** yWy + sum_i (-2 c_i b_i + c_i (G c)_i), in index order. */
function residualSum(coef: Float64Array, rhs: Float64Array, Gc: Float64Array, yWy: number): number {
  let rss = yWy;
  for (let i = 0; i < coef.length; ++i) rss += -2 * coef[i] * rhs[i] + coef[i] * Gc[i];
  return rss;
}

/** Effective degrees of freedom per coordinate, tr((G + lambda P)^-1 G), by the selected inverse. */
const edfScratch = new WeakMap<Int32Array, Float64Array>();

export function edfOf(sm: Smoother, fit: SmoothFit): number {
  // The selected inverse is only summed here: its storage is reused per envelope.
  let buf = edfScratch.get(fit.factor.first);
  if (!buf || buf.length !== fit.factor.data.length) { buf = new Float64Array(fit.factor.data.length); edfScratch.set(fit.factor.first, buf); }
  const Z = selectedInverse(fit.factor, buf);
  const G = sm.normal.G;
  let t = 0;
  for (let i = 0; i < G.n; ++i) {
    const fi = G.first[i], oi = G.offset[i];
    for (let j = fi; j < i; ++j) t += 2 * Z.data[oi + j - fi] * G.data[oi + j - fi];
    t += Z.data[oi + i - fi] * G.data[oi + i - fi];
  }
  return t;
}

/** Outcome of the automatic smoothing choice. */
export interface Selection {
  readonly fit: SmoothFit;
  readonly edf: number;
  /** Noise standard deviation per normal direction used for the level and the bands. */
  readonly sigma: number;
  /** Where sigma came from. */
  readonly sigmaFrom: "gcv" | "floor" | "given" | "fixed" | "unknown";
  readonly lambdaGcv: number;
  readonly edfGcv: number;
  readonly rule: "discrepancy" | "gcv-x3" | "fixed";
  /** Knot intervals of the basis the levels refer to. */
  readonly basisSegments: number;
}

/** Options of {@link selectSmoothing}. */
export interface SelectOptions {
  /** Use this level (no search). */
  readonly fixedLambda?: number;
  /** log10 of the previous pass's GCV level (same knots): search four decades around it first. */
  readonly hintLogGcv?: number;
  /** Lower bound of the noise standard deviation (rounding, tessellation). */
  readonly sigmaFloor?: number;
  /** The noise standard deviation is known (a coordinate error given by the user): no estimate. */
  readonly sigmaKnown?: number;
  /** Smallest level allowed (e.g. near-interpolation of a sparse trace). */
  readonly minLambda?: number;
}

/** The GCV minimum: lambda_GCV minimises GCV(lambda) = n RSS / (n - edf)^2 (Craven & Wahba 1979,
 * Numer. Math. 31:377), on a log grid then refined by golden section. */
export function gcvLevel(sm: Smoother, hintLogGcv?: number): { fit: SmoothFit; edf: number; logLambda: number } {
  const n = sm.normal.wSum;
  const cache = new Map<number, { fit: SmoothFit; edf: number }>();
  const evalGcv = (logL: number) => {
    const hit = cache.get(logL);
    if (hit) return hit;
    const fit = solveAt(sm, Math.pow(10, logL));
    const v = { fit, edf: edfOf(sm, fit) };
    cache.set(logL, v);
    return v;
  };
  const gcv = (logL: number) => {
    const { fit, edf } = evalGcv(logL);
    const dof = Math.max(n - edf, 1e-9);
    return (n * fit.rss) / (dof * dof);
  };
  const [lo0, hi0] = sm.logLambdaRange;
  const lo = hintLogGcv === undefined ? lo0 : Math.max(lo0, hintLogGcv - 3);
  const hi = hintLogGcv === undefined ? hi0 : Math.min(hi0, hintLogGcv + 3);
  // GCV is smooth in log lambda: a 1.5-decade grid, then golden section around the best point.
  const steps = Math.max(7, Math.ceil((hi - lo) / 1.5) + 1);
  let best = lo, bestV = Infinity;
  for (let k = 0; k < steps; ++k) {
    const x = lo + ((hi - lo) * k) / (steps - 1);
    const v = gcv(x);
    if (v < bestV) { bestV = v; best = x; }
  }
  // A minimum on the edge of a hinted window means the hint was off: search the whole range.
  if (hintLogGcv !== undefined && (best <= lo + 1e-9 || best >= hi - 1e-9) && (lo > lo0 || hi < hi0)) return gcvLevel(sm);
  const dx = (hi - lo) / (steps - 1);
  let a = Math.max(lo, best - dx), b = Math.min(hi, best + dx);
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a), d = a + g * (b - a);
  let fc = gcv(c), fd = gcv(d);
  for (let it = 0; it < 30 && b - a > 1e-3; ++it) {
    if (fc < fd) { b = d; d = c; fd = fc; c = b - g * (b - a); fc = gcv(c); }
    else { a = c; c = d; fc = fd; d = a + g * (b - a); fd = gcv(d); }
  }
  const xg = fc < fd ? c : d;
  const r = evalGcv(xg);
  return { fit: r.fit, edf: r.edf, logLambda: xg };
}

/**
 * The discrepancy level: the largest lambda >= 10^fromLog with RSS(lambda) <= d n sigma^2 (the
 * discrepancy principle, Reinsch 1967, Numer. Math. 10:177): it smooths more than GCV, which
 * derivatives want. null when RSS stays below the target up to the top of the range.
 */
export function discrepancyLevel(sm: Smoother, sigma: number, normalDims: number, fromLog: number, fitAtFrom?: SmoothFit): SmoothFit | null {
  const n = sm.normal.wSum;
  const target = normalDims * n * sigma * sigma;
  const hi = sm.logLambdaRange[1];
  let left = fromLog, right = fromLog;
  // `fitAtFrom`: the caller's fit at 10^fromLog, when it has one (the same numbers as solving again).
  let fitRight = fitAtFrom ?? solveAt(sm, Math.pow(10, right));
  if (fitRight.rss > target) return fitRight;
  let fitLeft = fitRight;
  while (fitRight.rss < target && right < hi) {
    left = right;
    fitLeft = fitRight;
    right = Math.min(hi, right + 1);
    fitRight = solveAt(sm, Math.pow(10, right));
  }
  if (fitRight.rss < target) return null;
  for (let it = 0; it < 40 && right - left > 1e-3; ++it) {
    const mid = 0.5 * (left + right);
    const fitMid = solveAt(sm, Math.pow(10, mid));
    if (fitMid.rss <= target) { left = mid; fitLeft = fitMid; }
    else right = mid;
  }
  // The fit at 10^left was solved on the way (solving is deterministic: no need to solve again).
  return fitLeft;
}

/**
 * Automatic smoothing aimed at the derivatives (NUMERICS.md step 5):
 * 1. lambda_GCV (see {@link gcvLevel});
 * 2. noise sigma^2 = RSS_GCV / (d (n - edf_GCV)), d = number of normal directions (2 in 3D, 1 in a
 *    plane), since foot-point parameters leave no tangential residual; raised to `sigmaFloor`;
 *    replaced by `sigmaKnown` when the user gave it;
 * 3. the discrepancy level for that sigma (see {@link discrepancyLevel}), at least `minLambda`.
 * Falls back to 3 lambda_GCV when the discrepancy search fails to bracket.
 */
export function selectSmoothing(sm: Smoother, normalDims: number, options: SelectOptions = {}): Selection {
  const n = sm.normal.wSum;
  const basisSegments = sm.basis.nseg;
  if (options.fixedLambda !== undefined) {
    const fit = solveAt(sm, options.fixedLambda);
    const edf = edfOf(sm, fit);
    const est = Math.sqrt(fit.rss / (normalDims * Math.max(n - edf, 1)));
    const sigma = options.sigmaKnown ?? Math.max(est, options.sigmaFloor ?? 0);
    return { fit, edf, sigma, sigmaFrom: options.sigmaKnown !== undefined ? "given" : "fixed", lambdaGcv: options.fixedLambda, edfGcv: edf, rule: "fixed", basisSegments };
  }
  const g = gcvLevel(sm, options.hintLogGcv);
  const est = Math.sqrt(g.fit.rss / (normalDims * Math.max(n - g.edf, 1)));
  let sigma = est, sigmaFrom: Selection["sigmaFrom"] = "gcv";
  if (options.sigmaKnown !== undefined) { sigma = options.sigmaKnown; sigmaFrom = "given"; }
  else if (options.sigmaFloor !== undefined && !(est >= options.sigmaFloor)) { sigma = options.sigmaFloor; sigmaFrom = "floor"; }
  const fromLog = Math.max(g.logLambda, options.minLambda !== undefined ? Math.log10(options.minLambda) : -Infinity);
  let fit = sigma > 0 ? discrepancyLevel(sm, sigma, normalDims, fromLog, fromLog === g.logLambda ? g.fit : undefined) : null;
  let rule: Selection["rule"] = "discrepancy";
  if (!fit) {
    rule = "gcv-x3";
    fit = solveAt(sm, Math.max(3 * Math.pow(10, g.logLambda), options.minLambda ?? 0));
  }
  return { fit, edf: fit === g.fit ? g.edf : edfOf(sm, fit), sigma, sigmaFrom, lambdaGcv: Math.pow(10, g.logLambda), edfGcv: g.edf, rule, basisSegments };
}
