/**
 * Stage 3 of the geometry core: the curvature and torsion levels, and what the bands need (the law
 * of the right-hand-side noise, the evaluation grid, the resolution length).
 */
import { InputError } from "../errors.js";
import type { Trace } from "../types.js";
import { gridBasis, rhsNoiseFactor, type GridBasis } from "./bootstrap.js";
import type { Kink } from "./kinks.js";
import type { SplineBasis } from "./bspline.js";
import { arcAt, evalCurve, kappaTau } from "./curve.js";
import { describeLength } from "./fitGuard.js";
import type { PassesResult } from "./passes.js";
import type { Samples, Start } from "./profile.js";
import { lambdaForWavelength, solveAt, wavelengthForLambda, type SmoothFit, type Smoother } from "./smoother.js";
import type { Skyline } from "./skyline.js";
import { hypot3 } from "./hypot3.js";
import { symEigen3 } from "./symEigen3.js";
import { balancedLevel, riskLevel } from "./torsionLevel.js";
import { adaptiveCurvature } from "./adaptiveLevel.js";
import { differencePenalty } from "./design.js";

export interface Levels {
  readonly kappaFit: SmoothFit;
  readonly tauFit: SmoothFit;
  /** Torsion level over curvature level. */
  readonly tauFactor: number;
  readonly planarWithinNoise: boolean;
  /** Shortest length the curvature fit resolves (canonical units). */
  readonly resolution: number;
  /** Factorised law of B^T W dy (normal-plane noise at the estimated level). */
  readonly C: Skyline;
  readonly grid: GridBasis;
  readonly gridU: Float64Array;
  /** Arc length of each grid point from the domain start. */
  readonly gridS: Float64Array;
  /** The smoother of the curvature fit (its penalty varies along the wire when adaptive). */
  readonly kappaSmoother: Smoother;
  /** Stretches around kinks (`kinkZones`: triples of arc length, reach back, reach on). */
  readonly kinkZones: Float64Array;
  /** The fit (hinged at kinks) resolves nothing shorter than the wire: every sample is biased. */
  readonly unresolved: boolean;
}

/**
 * Decades above the discrepancy level that the curvature ladder reaches; `riskLevel` reads the
 * linear-bias law off its top decade. Tried (2026-12-03): 2.5 decades with the law from slope 1.3.
 * Where the pilot came out noisier than its expectation (its realised curvature error ranged
 * 0.5-2.5x the expected over 12 noise draws of one helix), a 2-decade top still carries that noise,
 * the law is refused and the level comes out low (helix N=1000 1% seed 5: 1.75x the best level);
 * at 2.5 decades it is 1.03x, and bench/families.ts seeds 1-18 gave curvature within 1.2x 544/576
 * (535 here), torsion 543 (546), headline 193/216 (187). But a coil whose curvature steps between
 * constant stretches (bench/steppedCoil.ts, 0.3 nm noise, 12 seeds) then got the law from the
 * helix-like top of its ladder, and the steps, whose bias saturates, were smoothed too much: ratio
 * to the best level 1.04-1.23 (mean 1.14) against 1.00-1.14 (mean 1.03) here. Wires of stretches of
 * near-constant geometry are the trade's commonest, so the ladder stays 2 decades high.
 */
export const CURVATURE_LADDER_UP = 2;

/** Outcome of the curvature level rule. */
export interface CurvatureLevel {
  /** The chosen level (canonical units). */
  readonly lambda: number;
  /** log10 of the chosen level over the passes' (discrepancy) level. */
  readonly decades: number;
  readonly atTop: boolean;
  /** The squared bias followed the linear-bias law of the ladder's top decade (`linearBiasLaw`). */
  readonly biasLaw: boolean;
}

/**
 * Curvature level by an unbiased estimate of the curvature's summed squared error (`riskLevel`):
 * on a ladder of quarter-decade levels from one decade below the passes' discrepancy level to
 * CURVATURE_LADDER_UP decades above, the squared bias of each level is estimated against the least-smoothed one (its bias taken
 * as negligible) minus the noise of the difference, and the variance from common-random-number
 * probes; the level of least estimated error is chosen. The discrepancy rule aims at the positions:
 * measured across wire families it smooths coils too little and localised features too much
 * (NUMERICS.md sec. 7 item 8); this rule aims at the curvature itself. Scored on at most ~600
 * interior grid points (one discrepancy resolution length from an open end). A mesh centre line is
 * never resolved below four facets.
 */
export function curvatureLevel(
  trace: Trace, start: Start, fit: PassesResult, seed: number,
  options: { down?: number; up?: number; kinks?: readonly Kink[] } = {},
): CurvatureLevel {
  const { basis, smoother, sel, table, u, w } = fit;
  const down = options.down ?? 1, up = options.up ?? CURVATURE_LADDER_UP;
  const closed = start.closed, length = table.length;
  const normalDims: 1 | 2 = trace.dims === 2 ? 1 : 2;
  const rho = smoother.normal.wSum / length;
  const resolution = resolutionLength(fit);
  const C = rhsNoiseFactor(basis, u, w, unitTangents(basis, sel.fit.coef, u), sel.sigma, normalDims);
  const count = Math.min(600, Math.max(64, Math.ceil((10 * length) / resolution)));
  const gridU = uniformGrid(basis, count, closed);
  const interior = new Uint8Array(gridU.length);
  const zones = kinkZones(fit, options.kinks ?? [], closed);
  for (let j = 0; j < gridU.length; ++j) {
    const sj = arcAt(table, gridU[j], closed);
    interior[j] = (closed || (sj > resolution && sj < length - resolution)) && !inKinkZone(sj, zones, KINK_ZONE * resolution, closed, length) ? 1 : 0;
  }
  const pilot = solveAt(smoother, sel.fit.lambda * Math.pow(10, -down));
  const r = riskLevel(smoother, pilot, C, gridBasis(basis, gridU), interior, seed ^ 0x3c6ef372, { quantity: 0, maxDecades: down + up });
  const minLambda = start.minWavelength > 0 ? lambdaForWavelength(start.minWavelength, rho, basis.h) : 0;
  const lambda = Math.max(pilot.lambda * r.refinedFactor, minLambda);
  return { lambda, decades: Math.log10(lambda / sel.fit.lambda), atTop: r.atTop, biasLaw: r.biasLaw };
}

/**
 * Resolution length of the passes' fit (canonical units): the half-power wavelength of the
 * smoother's transfer function 1 / (1 + (lambda h^7 / rho) omega^8), bounded below by the knot
 * spacing and the sampling.
 */
function resolutionLength(fit: PassesResult): number {
  const { basis, smoother, sel, table } = fit;
  const rho = smoother.normal.wSum / table.length;
  return Math.max(wavelengthForLambda(sel.fit.lambda, rho, basis.h), 2 * basis.h, 2 / rho);
}

/** Unit tangent of the fit at each parameter (interleaved xyz), for the noise law. */
function unitTangents(basis: SplineBasis, coef: Float64Array, u: Float64Array): Float64Array {
  const d12 = new Float64Array(12), st = new Float64Array(1), sb = new Float64Array(24);
  const n = u.length, tangent = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    evalCurve(basis, coef, u[i], 1, d12, st, sb);
    const sp = hypot3(d12[3], d12[4], d12[5]);
    tangent[3 * i] = d12[3] / sp; tangent[3 * i + 1] = d12[4] / sp; tangent[3 * i + 2] = d12[5] / sp;
  }
  return tangent;
}

/** Running mean of v over +-half in s (s increasing). */
function runningMean(v: Float64Array, s: Float64Array, half: number): Float64Array {
  const m = v.length, out = new Float64Array(m), p = new Float64Array(m + 1);
  for (let j = 0; j < m; ++j) p[j + 1] = p[j] + v[j];
  let a = 0, b = 0;
  for (let j = 0; j < m; ++j) {
    while (s[a] < s[j] - half) ++a;
    while (b < m && s[b] <= s[j] + half) ++b;
    out[j] = (p[b] - p[a]) / (b - a);
  }
  return out;
}

/** Linear interpolation of v(x) at t (x increasing; clamped at the ends). */
function interpolate(x: Float64Array, v: Float64Array, t: number): number {
  const m = x.length;
  if (t <= x[0]) return v[0];
  if (t >= x[m - 1]) return v[m - 1];
  let lo = 0, hi = m - 1;
  while (hi - lo > 1) { const mid = (lo + hi) >> 1; if (x[mid] <= t) lo = mid; else hi = mid; }
  return v[lo] + ((t - x[lo]) / (x[hi] - x[lo])) * (v[hi] - v[lo]);
}

/**
 * Curvature level: the passes' level (after `curvatureLevel` and its refit in `fitProfile`; the
 * discrepancy rule or near-interpolation where that rule does not apply).
 * Torsion level: the balancing rule (`balancedLevel`) on the interior grid, unless the wire is
 * planar (tau = 0 with its noise band) or the level was fixed by the user.
 * Refuses a fit whose resolution length exceeds the wire's length (it resolves nothing) unless the
 * fit is straight (turns by less than 0.1 rad in all: a straight wire has nothing to resolve).
 */
export function chooseLevels(
  trace: Trace, start: Start, fit: PassesResult, samples: Samples,
  set: { readonly lambda?: number; readonly seed: number; readonly torsionBalance: number; readonly adaptive: boolean}, diagnostics: string[],
  kinks: readonly Kink[] = [],
): Levels {
  const { basis, smoother, sel, table, u, w } = fit;
  const closed = start.closed;
  const length = table.length;
  const y = start.canon.y;
  const n = u.length;
  const normalDims: 1 | 2 = trace.dims === 2 ? 1 : 2;
  const kappaFit = sel.fit;
  const resolution = resolutionLength(fit);
  const zones = kinkZones(fit, kinks, closed);
  // Straight: turning by less than 0.1 rad in all, or, with kinks, away from them (a polygon's
  // sides: a closed triangle with hinged corners had been fitted smooth, its sides curved).
  const unresolved = resolution > length && ((closed && kinks.length === 0) || totalTurning(fit, kappaFit.coef, zones, closed) > 0.1);
  const resolvedText = () => `its resolution length (${describeLength(resolution * start.canon.scale, trace.source)}) exceeds the wire's length (${describeLength(length * start.canon.scale, trace.source)})`;
  if (unresolved && kinks.length === 0) throw new InputError(trace.source.file, null, "points", `the fit resolves nothing: ${resolvedText()}; too few points or too much noise for this wire`);
  // Hinged at kinks, the pieces between them may be smooth enough for a level beyond the wire's
  // length (short noisy arcs): their curvature is then the fit's mean shape, flagged biased. Fitted
  // smooth instead, the kinks set the level: short kinked arcs (100-500 nm radius, 120-300 points,
  // noise 0.1-0.4 steps, 34 cases) came out 35% off away from the kink (median) with bands holding
  // the truth at 89% of samples; hinged, 2.7% off, bands 56% (hence the flag).
  if (unresolved) diagnostics.push(`kinks: with hinges at them the fit resolves nothing shorter than the wire (${resolvedText()}): the curvature between the kinks is the fit's mean shape there; every sample is flagged biased (16)`);
  const unknownNoise = sel.sigmaFrom === "unknown";
  const C = rhsNoiseFactor(basis, u, w, unitTangents(basis, kappaFit.coef, u), unknownNoise ? start.sigmaFloor || 1e-9 : sel.sigma, normalDims);
  // The bands vary on the resolution scale: 10 grid points per resolution length suffice.
  const gridCount = Math.min(4 * basis.nseg, Math.max(256, Math.ceil((10 * length) / resolution)));
  const gridU = samples.u.length <= gridCount ? samples.u : uniformGrid(basis, gridCount, closed);
  const grid = gridBasis(basis, gridU);
  const gridS = new Float64Array(grid.m);
  for (let j = 0; j < grid.m; ++j) gridS[j] = arcAt(table, gridU[j], closed);
  const planarWithinNoise = trace.dims === 3 && !trace.planarProjection && outOfPlaneVariance(y, w) <= sel.sigma * sel.sigma * (1 + 4 * Math.sqrt(2 / n));
  if (planarWithinNoise) diagnostics.push("planar within the noise (out-of-plane spread not above the noise): torsion reported as 0 with its noise band");
  let tauFit = kappaFit, tauFactor = 1;
  if (set.lambda === undefined && trace.dims === 3 && !trace.planarProjection && !planarWithinNoise && !unknownNoise) {
    // Score the interior only (one resolution length from an open end), on at most ~600 points.
    const stride = Math.max(1, Math.ceil(grid.m / 600));
    const at: number[] = [];
    for (let j = 0; j < grid.m; j += stride) at.push(j);
    const sub = stride === 1 ? grid : gridBasis(basis, Float64Array.from(at, (j) => gridU[j]));
    const interior = Uint8Array.from(at, (j) => ((closed || (gridS[j] > resolution && gridS[j] < length - resolution)) && !inKinkZone(gridS[j], zones, KINK_ZONE * resolution, closed, length) ? 1 : 0));
    const b = balancedLevel(smoother, kappaFit, C, sub, interior, set.seed, { c: set.torsionBalance });
    tauFit = b.fit;
    tauFactor = b.factorOfPilot;
    if (tauFactor !== 1) diagnostics.push(`torsion: smoothing level ${tauFactor.toPrecision(3)}x the curvature level (balancing rule: the largest level whose torsion moves, beyond its noise, by less than the noise of every less-smoothed one)`);
    if (b.atTop) diagnostics.push("torsion: the balancing rule reached the top of its scan (torsion nearly constant along the wire)");
  }
  let kappaOut = kappaFit, kappaSmoother = smoother;
  if (set.adaptive && set.lambda === undefined && !fit.sparse && !unknownNoise) {
    const ad = adaptiveCurvature(smoother, kappaFit, C, grid, gridS, set.seed);
    // The local level, smoothed over one resolution length, becomes a weight on each row of the
    // difference penalty (a spatially varying penalty: Ruppert & Carroll 2000, Aust. N. Z. J. Stat.
    // 42:205): one spline, smooth everywhere, stiffer where the curvature varies slowly.
    const lf = runningMean(ad.logFactor, gridS, resolution / 2);
    const rows = basis.periodic ? basis.K : basis.K - 4;
    const weights = new Float64Array(rows);
    const span = basis.nseg * basis.h;
    for (let r = 0; r < rows; ++r) {
      let p = basis.u0 + r * basis.h;
      if (basis.periodic) p -= Math.floor((p - basis.u0) / span) * span;
      weights[r] = Math.pow(10, interpolate(gridU, lf, p));
    }
    kappaSmoother = { ...smoother, P: differencePenalty(basis, weights) };
    kappaOut = solveAt(kappaSmoother, kappaFit.lambda);
    const f = Array.from(lf).sort((a, b) => a - b);
    if (f[0] !== 0 || f[f.length - 1] !== 0) {
      diagnostics.push(`curvature: spatially adaptive smoothing, from ${Math.pow(10, f[0]).toPrecision(2)}x to ${Math.pow(10, f[f.length - 1]).toPrecision(2)}x the discrepancy level along the wire (median ${Math.pow(10, f[f.length >> 1]).toPrecision(2)}x)`);
    }
  }
  return { kappaFit: kappaOut, kappaSmoother, tauFit, tauFactor, planarWithinNoise, resolution, C, grid, gridU, gridS, kinkZones: zones, unresolved };
}

/**
 * Half-width of the stretch around a kink left out of the level rules' scores, in resolution
 * lengths of the fit they start from (the ladders reach two decades above it, 1.8x its resolution).
 */
export const KINK_ZONE = 2.5;

/** Windows (`Kink.window` points) either side of a kink that its zone spans: the doubled window the detector saw the turn over. */
export const KINK_ZONE_WINDOWS = 2;

/**
 * The stretch around each kink (KINK_ZONE_WINDOWS windows of points either side, where the fit's
 * hinge lets it bend): triples (arc length of the kink's foot point, arc length back to the first
 * point of the stretch, arc length on to the last), from the domain start.
 */
function kinkZones(fit: PassesResult, kinks: readonly Kink[], closed: boolean): Float64Array {
  const n = fit.u.length, length = fit.table.length, out = new Float64Array(3 * kinks.length);
  const arc = (i: number) => arcAt(fit.table, fit.u[closed ? ((i % n) + n) % n : Math.min(n - 1, Math.max(0, i))], closed);
  kinks.forEach((k, z) => {
    const c = arc(k.at);
    const b = KINK_ZONE_WINDOWS * k.window;
    const back = c - arc(k.at - b), on = arc(k.at + b) - c;
    out[3 * z] = c;
    out[3 * z + 1] = closed ? back - Math.floor(back / length) * length : Math.max(0, back);
    out[3 * z + 2] = closed ? on - Math.floor(on / length) * length : Math.max(0, on);
  });
  return out;
}

/**
 * Whether arc length s lies in a kink's stretch widened by `margin` either side (signed
 * offsets taken the short way round a ring of `length`).
 */
export function inKinkZone(s: number, zones: Float64Array, margin: number, closed: boolean, length: number): boolean {
  for (let z = 0; z < zones.length; z += 3) {
    let d = s - zones[z];
    if (closed) d -= Math.round(d / length) * length;
    if (d >= -zones[z + 1] - margin && d <= zones[z + 2] + margin) return true;
  }
  return false;
}

/**
 * Total turning angle of the fitted curve outside the kink zones (`kinkZones`), the integral of
 * kappa ds (200-point midpoint rule).
 */
function totalTurning(fit: PassesResult, coef: Float64Array, zones: Float64Array, closed: boolean): number {
  const { basis, table } = fit, length = table.length;
  const d12 = new Float64Array(12), kt = new Float64Array(5), st = new Float64Array(1), sb = new Float64Array(24);
  const span = basis.nseg * basis.h;
  let sum = 0;
  for (let k = 0; k < 200; ++k) {
    const u = basis.u0 + ((k + 0.5) * span) / 200;
    if (zones.length > 0 && inKinkZone(arcAt(table, u, closed), zones, 0, closed, length)) continue;
    evalCurve(basis, coef, u, 3, d12, st, sb);
    sum += kappaTau(d12, kt)[0];
  }
  return (sum * length) / 200;
}

function uniformGrid(basis: SplineBasis, count: number, closed: boolean): Float64Array {
  const span = basis.nseg * basis.h;
  const g = new Float64Array(closed ? count : count + 1);
  for (let k = 0; k < g.length; ++k) g[k] = basis.u0 + (span * k) / count;
  return g;
}

/** Smallest principal variance of the weighted points (variance off their best plane). */
export function outOfPlaneVariance(y: Float64Array, w: Float64Array): number {
  // The two loops in functions of their own, their sums in locals (the same sums in the same order).
  const m = new Float64Array(4);
  weightedSums(y, w, m);
  const sw = m[0], mx = m[1] / sw, my = m[2] / sw, mz = m[3] / sw;
  const c = new Float64Array(6);
  weightedScatter(y, w, mx, my, mz, c);
  for (let k = 0; k < 6; ++k) c[k] /= sw;
  return symEigen3([c[0], c[1], c[2], c[1], c[3], c[4], c[2], c[4], c[5]]).values[0];
}

/** out = [sum w, sum w x, sum w y, sum w z]. */
function weightedSums(y: Float64Array, w: Float64Array, out: Float64Array): void {
  let sw = 0, mx = 0, my = 0, mz = 0;
  for (let i = 0; i < w.length; ++i) { sw += w[i]; mx += w[i] * y[3 * i]; my += w[i] * y[3 * i + 1]; mz += w[i] * y[3 * i + 2]; }
  out[0] = sw; out[1] = mx; out[2] = my; out[3] = mz;
}

/** c = the weighted sums of dx dx, dx dy, dx dz, dy dy, dy dz, dz dz about (mx, my, mz). */
function weightedScatter(y: Float64Array, w: Float64Array, mx: number, my: number, mz: number, c: Float64Array): void {
  let c0 = 0, c1 = 0, c2 = 0, c3 = 0, c4 = 0, c5 = 0;
  for (let i = 0; i < w.length; ++i) {
    const dx = y[3 * i] - mx, dy = y[3 * i + 1] - my, dz = y[3 * i + 2] - mz, wi = w[i];
    c0 += wi * dx * dx; c1 += wi * dx * dy; c2 += wi * dx * dz; c3 += wi * dy * dy; c4 += wi * dy * dz; c5 += wi * dz * dz;
  }
  c[0] = c0; c[1] = c1; c[2] = c2; c[3] = c3; c[4] = c4; c[5] = c5;
}
