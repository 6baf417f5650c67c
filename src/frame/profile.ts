import { ParameterError, InputError } from "../errors.js";
import type { Profile, ProfileKink, Trace } from "../types.js";
import { fitBands } from "./bands.js";
import { arcAt, uAtArc, type ArcTable } from "./curve.js";
import { checkClosable, describeLength, GAP_LIMIT } from "./fitGuard.js";
import { detectClosed } from "./detectClosed.js";
import { findKinks, type Kink } from "./kinks.js";
import { chordTurn, COARSE_CHORD_TURN, MAX_SPARSE_POINTS, NORMAL_MISFIT_LIMIT, normalMisfit, runPasses, zigzags, type PassesResult } from "./passes.js";
export { segmentCount } from "./passes.js";
import { differenceNoise, findOverlap, findRetrace, selfWindow, grossOutliers, medianOf, referenceLength, startParameter, stepLengths, toCanonical, type CanonicalTrace } from "./robustStart.js";
import { chooseLevels, curvatureLevel, KINK_ZONE_WINDOWS } from "./levels.js";

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
  /** Number of knot intervals (default: from the point count, then matched to the smoothing scale). */
  readonly segments?: number;
  /** Foot-point re-parametrisation passes (default 3; 2 above 20000 points). */
  readonly passes?: number;
  /**
   * Standard deviation of the coordinate error per coordinate (m), when the user knows it: the
   * noise is then not estimated, and the curvature level follows from it (discrepancy rule).
   */
  readonly coordinateError?: number;
  /** Constant c of the torsion balancing rule (default 0.85; see `balancedLevel`). */
  readonly torsionBalance?: number;
  /**
   * How the curvature level is chosen: "risk" (default: least estimated error of the curvature, see
   * `curvatureLevel`) or "discrepancy" (the passes' level, aimed at the positions).
   */
  readonly curvatureRule?: "risk" | "discrepancy";
  /**
   * Spatially adaptive curvature smoothing (default false: one curvature level along the wire).
   * Experimental and worse than the default on every family measured (see adaptiveLevel.ts).
   */
  readonly adaptive?: boolean;
}

/** Validated options with their defaults. */
interface Settings {
  readonly replicates: number;
  readonly seed: number;
  readonly passes: number;
  readonly step?: number;
  readonly segments?: number;
  readonly lambda?: number;
  readonly coordinateError?: number;
  readonly torsionBalance: number;
  readonly curvatureRule: "risk" | "discrepancy";
  readonly keepSamples: boolean;
  readonly adaptive: boolean;
}

/** Stage 0: options checked, with defaults (one line per bad option). */
function settingsOf(options: ProfileOptions, n: number): Settings {
  const R = options.bootstrap ?? 200;
  const seed = options.seed ?? 1;
  if (!Number.isInteger(R) || R < 0 || R > 100_000) throw new ParameterError("profile", "bootstrap", `must be an integer from 0 to 100000 (got ${R})`);
  if (!Number.isInteger(seed)) throw new ParameterError("profile", "seed", `must be an integer (got ${seed})`);
  if (options.step !== undefined && !(options.step > 0 && Number.isFinite(options.step))) throw new ParameterError("profile", "step", `must be a positive length (got ${options.step})`);
  if (options.segments !== undefined && !(Number.isInteger(options.segments) && options.segments >= 8 && options.segments <= 100_000)) throw new ParameterError("profile", "segments", `must be an integer from 8 to 100000 (got ${options.segments})`);
  if (options.lambda !== undefined && !(options.lambda > 0)) throw new ParameterError("profile", "lambda", `must be positive (got ${options.lambda})`);
  if (options.coordinateError !== undefined && !(options.coordinateError > 0 && Number.isFinite(options.coordinateError))) throw new ParameterError("profile", "coordinateError", `must be a positive length (got ${options.coordinateError})`);
  if (options.torsionBalance !== undefined && !(options.torsionBalance > 0)) throw new ParameterError("profile", "torsionBalance", `must be positive (got ${options.torsionBalance})`);
  if (options.curvatureRule !== undefined && options.curvatureRule !== "risk" && options.curvatureRule !== "discrepancy") throw new ParameterError("profile", "curvatureRule", `must be "risk" or "discrepancy" (got ${JSON.stringify(options.curvatureRule)})`);
  // Dense traces converge in fewer foot-point passes (measured at 1e5 points: the same kappa error
  // to 1% with 2 passes as with 3).
  const s: { -readonly [K in keyof Settings]: Settings[K] } = {
    replicates: R, seed, passes: options.passes ?? (n > 20_000 ? 2 : 3), torsionBalance: options.torsionBalance ?? 0.85, curvatureRule: options.curvatureRule ?? "risk", keepSamples: options.keepSamples ?? false, adaptive: options.adaptive ?? false,
  };
  if (options.step !== undefined) s.step = options.step;
  if (options.segments !== undefined) s.segments = options.segments;
  if (options.lambda !== undefined) s.lambda = options.lambda;
  if (options.coordinateError !== undefined) s.coordinateError = options.coordinateError;
  return s;
}

/** What the robust start decided: the kept points in the canonical frame and where they came from. */
export interface Start {
  readonly canon: CanonicalTrace;
  /** Trace index of each kept point. */
  readonly kept: Int32Array;
  /** Trace indices of gross outliers left out before the fit. */
  readonly dropped: readonly number[];
  readonly closed: boolean;
  readonly u: Float64Array;
  readonly span: number;
  /** Robust length of the wire (canonical units), for the divergence guard. */
  readonly referenceLength: number;
  readonly medianStep: number;
  /** Lower bound of the noise standard deviation (canonical units). */
  readonly sigmaFloor: number;
  /** Difference-based noise estimate at the start (canonical units). */
  readonly sigmaDiff: number;
  /** Shortest wavelength the fit may resolve (canonical units; 0: no limit): 4 facets of a mesh. */
  readonly minWavelength: number;
  /** Kinks of the kept points (`findKinks`; indices into the kept points). */
  readonly kinks: readonly Kink[];
}

/** Human name of an input point (its line or row), for messages. */
export function rowName(trace: Trace, i: number): string {
  return trace.rows ? `row ${trace.rows[i]}` : `point ${i + 1}`;
}

/**
 * Stage 1: the robust start (NUMERICS.md sec. 7 items 2, 5, 7): gross outliers flagged before any
 * parametrisation, the canonical frame of the kept points, the open/closed decision (a declared
 * ring must have ends that meet), the running-median start parameter, a robust reference length,
 * and the noise floor (coordinate rounding; tessellation spread of a mesh centre line).
 */
export function robustStart(trace: Trace, options: ProfileOptions, diagnostics: string[]): Start {
  const file = trace.source.file;
  const n = trace.xyz.length / 3;
  const planar = trace.dims === 2;
  const all = toCanonical(trace.xyz, planar);
  if (!all) throw new InputError(file, null, "points", "all points coincide: the trace has zero length");
  const declaredClosed = options.closed ?? trace.closed;
  // The step lengths of all points serve the outlier screen and, when it drops none, the gap check.
  const allSteps = stepLengths(all.y);
  const allMedianStep = medianOf(allSteps);
  // Doubles keep about 16 digits: far enough from the origin their rounding exceeds the steps
  // between points (a 100 nm helix at x = 1e17 nm, steps 3 nm, rounded to 15 nm: curvature -12%,
  // bands holding the truth at half the samples, exit 0).
  const maxAbs = largestMagnitude(trace.xyz);
  if (Number.EPSILON * maxAbs > allMedianStep * all.scale) {
    throw new InputError(file, null, "points", `coordinates reach ${describeLength(maxAbs, trace.source)} from the origin, where numbers carry about 16 digits and are rounded by up to ${describeLength(0.5 * Number.EPSILON * maxAbs, trace.source)}, more than half the median step between points (${describeLength(allMedianStep * all.scale, trace.source)}): subtract an offset (the first point, say) from every point`);
  }
  const keepMask = grossOutliers(all.y, declaredClosed === true, allMedianStep);
  const { kept, dropped } = splitKept(keepMask);
  if (kept.length < 6) throw new InputError(file, null, "points", `need at least 6 points for a quintic fit after leaving out ${dropped.length} gross outliers, got ${kept.length}`);
  if (dropped.length > 0.2 * n) {
    throw new InputError(file, null, "points", `${dropped.length} of ${n} points (${rowListing(trace, dropped)}) sit far off their neighbours: the points are not an ordered trace of one wire (for unordered points use --format cloud)`);
  }
  let xyz = trace.xyz;
  if (dropped.length > 0) {
    xyz = pointsAt(trace.xyz, kept);
    diagnostics.push(`robust start: left out ${dropped.length} gross outlier${dropped.length === 1 ? "" : "s"} far off their neighbours (${rowListing(trace, dropped)})`);
  }
  const canon = dropped.length > 0 ? toCanonical(xyz, planar) : all;
  if (!canon) throw new InputError(file, null, "points", "all points coincide: the trace has zero length");
  const y = canon.y;
  const steps = canon === all ? allSteps : stepLengths(y);
  const medianStep = canon === all ? allMedianStep : medianOf(steps);
  const longest = indexOfMax(steps);
  if (steps[longest] > GAP_LIMIT * medianStep) {
    throw new InputError(file, null, "points",
      `no points over ${describeLength(steps[longest] * canon.scale, trace.source)} of the wire between ${rowName(trace, kept[longest])} and ${rowName(trace, kept[longest + 1])} (${(steps[longest] / medianStep).toFixed(0)}x the median step): the fit would invent the wire there; trace it more evenly or split it at the gap`);
  }
  let closed: boolean;
  if (declaredClosed === undefined) closed = detectClosed(y, diagnostics, steps);
  else {
    closed = declaredClosed;
    if (closed) checkClosable(y, medianStep, file, (d) => describeLength(d * canon.scale, trace.source));
  }
  const { u, span } = startParameter(y, closed);
  if (!(span > 0)) throw new InputError(file, null, "points", "all points coincide: the trace has zero length");
  const normalDims: 1 | 2 = planar ? 1 : 2;
  const sigmaDiff = differenceNoise(y, u, normalDims);
  const win = selfWindow(y, closed, sigmaDiff, medianStep);
  const back = findRetrace(y, closed, sigmaDiff, medianStep, win);
  if (back) {
    const end = closed ? (back.at + back.count) % kept.length : back.at + back.count;
    throw new InputError(file, null, "points",
      `the trace turns back on its own path near ${rowName(trace, kept[back.at])}: the next ${back.count} points (to ${rowName(trace, kept[end])}) run back over the points before it (within ${describeLength(back.within * canon.scale, trace.source)}); a wire cannot retrace itself: remove the retraced rows or split the file there`);
  }
  const again = trace.dims === 3 && !trace.planarProjection ? findOverlap(y, closed, sigmaDiff, medianStep, win) : null;
  if (again) {
    const m = kept.length, wrap = (j: number) => ((j % m) + m) % m;
    const a = rowName(trace, kept[again.at]), b = rowName(trace, kept[wrap(again.at + again.count - 1)]);
    const c = rowName(trace, kept[Math.min(again.other, again.otherEnd)]), d = rowName(trace, kept[Math.max(again.other, again.otherEnd)]);
    throw new InputError(file, null, "points",
      `the trace runs along the same path twice: ${a} to ${b} and ${c} to ${d} lie within ${describeLength(again.within * canon.scale, trace.source)} of each other with no offset between them; a wire cannot pass through itself (and turns of a coil closer than the noise cannot be told apart): remove the repeated rows or split the file there`);
  }
  // Noise floor: coordinates carry finitely many digits: 1e-9 of the wire's extent about its centre
  // (below any text file) plus the rounding of the largest coordinate to a double (its rms at most a
  // quarter of the double's epsilon times that coordinate); a mesh centre line carries the
  // tessellation's ripple, a fraction of the radius spread.
  // Not 1e-9 of the largest coordinate: far from the origin that floor exceeded the noise (a 20 nm
  // helix with 0.1 nm of noise at x = 1e10 nm: noise 10 nm, length -41%, exit 0).
  let floor = 1e-9 * largestMagnitude(y) + (0.25 * Number.EPSILON * maxAbs) / canon.scale;
  if (trace.radiusSpread && trace.radiusSpread.length > 0) floor = Math.max(floor, (0.25 * medianOf(trace.radiusSpread)) / canon.scale);
  return {
    canon, kept, dropped, closed, u, span, referenceLength: referenceLength(y, closed), medianStep,
    sigmaFloor: floor, sigmaDiff, minWavelength: trace.facetLength ? (4 * trace.facetLength) / canon.scale : 0,
    kinks: findKinks(y, u, closed, span),
  };
}

/** "rows 3, 17 and 40" / "points 3, 17 ...", at most 8 named. */
export function rowListing(trace: Trace, indices: readonly number[]): string {
  const names = indices.slice(0, 8).map((i) => (trace.rows ? String(trace.rows[i]) : String(i + 1)));
  const more = indices.length > 8 ? ` and ${indices.length - 8} more` : "";
  const noun = trace.rows ? (indices.length === 1 ? "row" : "rows") : (indices.length === 1 ? "point" : "points");
  return `${noun} ${names.join(", ")}${more}`;
}

// The loops of robustStart and fitProfile, one per function (the JIT compiles each alone; a loop
// compiled on the stack in a driver is deoptimised at the first later statement it had not run).

/** Index of the first non-finite entry, -1 when all are finite. */
function firstNonFinite(v: Float64Array): number {
  for (let k = 0; k < v.length; ++k) if (!Number.isFinite(v[k])) return k;
  return -1;
}

/** Trace indices of the kept points (mask 1) and of the dropped ones (mask 0), ascending. */
function splitKept(keepMask: Uint8Array): { kept: Int32Array; dropped: number[] } {
  let count = 0;
  for (let i = 0; i < keepMask.length; ++i) count += keepMask[i] ? 1 : 0;
  const kept = new Int32Array(count), dropped: number[] = [];
  for (let i = 0, k = 0; i < keepMask.length; ++i) {
    if (keepMask[i]) kept[k++] = i;
    else dropped.push(i);
  }
  return { kept, dropped };
}

/** The points with the given indices (interleaved xyz). */
function pointsAt(xyz: Float64Array, indices: Int32Array): Float64Array {
  const out = new Float64Array(3 * indices.length);
  for (let k = 0; k < indices.length; ++k) {
    const i = indices[k];
    out[3 * k] = xyz[3 * i]; out[3 * k + 1] = xyz[3 * i + 1]; out[3 * k + 2] = xyz[3 * i + 2];
  }
  return out;
}

/** Index of the first largest value (0 for an empty array). */
function indexOfMax(v: Float64Array): number {
  let best = 0;
  for (let k = 1; k < v.length; ++k) if (v[k] > v[best]) best = k;
  return best;
}

/** Largest absolute value (0 for none). */
function largestMagnitude(v: Float64Array): number {
  let m = 0;
  for (let k = 0; k < v.length; ++k) m = Math.max(m, Math.abs(v[k]));
  return m;
}

/**
 * Curvature and torsion profile of a traced wire, with 95% bootstrap bands: a short pipeline of
 * named stages, each testable alone.
 *
 * 1. `robustStart`: gross outliers, canonical frame, open/closed, start parameter, noise floor;
 * 2. `runPasses`: quintic P-spline (Eilers & Marx 1996, Stat. Sci. 11:89), 4th-order difference
 *    penalty, one level for x, y, z, foot-point re-parametrisation (Hoschek 1988, CAGD 5:27; Wang,
 *    Pottmann & Liu 2006, ACM TOG 25:214) and robust weights (Hampel 1974, JASA 69:383), knots
 *    matched to the smoothing scale, sparse traces near-interpolated; a divergence guard after
 *    every pass (`fitGuard`);
 * 3. `chooseLevels`: curvature level (discrepancy rule), torsion level (balancing rule);
 * 4. samples: kappa and tau at each kept point's foot point (or a uniform `step`);
 * 5. `fitBands`: bootstrap bands, bias flags, frames, torsion gate, and the final checks.
 *
 * Torsion follows B' = -tau N (a right-handed helix has tau > 0); it is NaN and flagged where the
 * curvature vector cannot be told from zero. Units: metres in, metres and 1/m out.
 * @throws {InputError} too few points, non-finite coordinates, zero length, a declared ring whose
 *   ends do not meet, or a fit that fails its checks (one line saying what and where).
 * @throws {ParameterError} bad options.
 * @example fitProfile(helixTrace).kappa[100] // ~ R / (R^2 + c^2)
 */
export function fitProfile(trace: Trace, options: ProfileOptions = {}): Profile {
  const file = trace.source.file;
  const n = trace.xyz.length / 3;
  const set = settingsOf(options, n);
  if (!Number.isInteger(n) || n < 6) throw new InputError(file, null, "points", `need at least 6 points for a quintic fit, got ${Math.floor(n)}`);
  const bad = firstNonFinite(trace.xyz);
  if (bad >= 0) throw new InputError(file, null, "xyz", `coordinate ${bad % 3} of ${rowName(trace, Math.floor(bad / 3))} is not finite`);
  const diagnostics: string[] = [...trace.diagnostics];
  if (set.coordinateError !== undefined) diagnostics.push(`noise: the coordinate error given (${describeLength(set.coordinateError, trace.source)} per coordinate) is the noise level; it is not estimated`);
  const start = robustStart(trace, options, diagnostics);
  if (start.kinks.length === 0) return fitFrom(trace, start, set, diagnostics);
  // Kinks: a hinge in the fit and their stretches out of the level rules (`fitFrom`). Where that
  // fit fails its checks (a short kinked arc's level ran away: "resolves nothing"), the wire is
  // fitted as a smooth one, as before kinks were sought, and the diagnostic says so.
  // The passes without hinges, kept for that fallback. Their length is the check of the fit with
  // hinges: a hinge lets the fit keep a corner, so the fit with them is the longer one; shorter,
  // the hinges freed too much of the wire (kinks close together, a polygon's sides) and it wandered.
  const smoothStart = { ...start, kinks: [] }, smoothDiagnostics: string[] = [];
  const smooth = runPasses(trace, smoothStart, set, smoothDiagnostics);
  try {
    return fitFrom(trace, start, set, [...diagnostics], smooth.sparse ? {} : { smoothLength: smooth.table.length });
  } catch (err) {
    if (!(err instanceof InputError)) throw err;
    diagnostics.push(`kinks: found at ${kinkNames(trace, start)}, but the fit with them failed its checks (${err.message.replace(/^[^:]*: [^:]*: /, "")}); fitted as a smooth wire: the kinks set its smoothing level`, ...smoothDiagnostics);
    return fitFrom(trace, smoothStart, set, diagnostics, { passes: smooth });
  }
}

/** "row 151 (26 degrees), ..." for the kinks of `start` (at most 8 named). */
function kinkNames(trace: Trace, start: Start): string {
  const k = start.kinks;
  return `${k.slice(0, 8).map((q) => `${rowName(trace, start.kept[q.at])} (${((q.angle * 180) / Math.PI).toFixed(0)} degrees)`).join(", ")}${k.length > 8 ? ` and ${k.length - 8} more` : ""}`;
}

/**
 * Least length of the passes with hinges at kinks over the one without (below it `fitFrom` refuses
 * and `fitProfile` fits the wire smooth). Measured: closed pentagrams (sides of 80 points, five 144
 * degree kinks) came out 9-22% short with hinges (ratios 0.84-0.97; noise estimates 3-20x those
 * without), 3-4% short without; the kinked arcs and helices of `bench/kinks.ts` (seeds 1-3), which
 * gain from hinges, 0.974 and up (0.99: 4 of their 76 good cases lost). Since the knots of a hinged
 * fit stay within half a kink window (passes.ts, `kinkSegments`) pentagrams of sides of 50-120
 * points keep their hinges: 4-9% short, sides straight (median curvature 8e-4/nm, 0.018 smooth).
 */
export const KINK_LENGTH_RATIO = 0.97;

/**
 * Stages 3-5 of `fitProfile` from its robust start. `smoothLength`: the length of the passes
 * without hinges, which those with hinges must reach (KINK_LENGTH_RATIO); `passes`: passes already
 * run on `start` (their diagnostics already said).
 */
function fitFrom(trace: Trace, start: Start, set: Settings, diagnostics: string[], given: { smoothLength?: number; passes?: PassesResult } = {}): Profile {
  const smoothLength = given.smoothLength;
  let fit = given.passes ?? runPasses(trace, start, set, diagnostics);
  if (smoothLength !== undefined && !fit.sparse && fit.table.length < KINK_LENGTH_RATIO * smoothLength) {
    throw new InputError(trace.source.file, null, "points", `with hinges at them the fit is ${(100 * (1 - fit.table.length / smoothLength)).toFixed(1)}% shorter than without`);
  }
  if (!fit.sparse && set.lambda === undefined && set.segments === undefined && set.coordinateError === undefined && fit.u.length <= MAX_SPARSE_POINTS) {
    // A coarse trace whose smoothing fit runs inside its points by more than the noise estimate:
    // that "noise" is the shape the few points per turn leave between them; near-interpolate it.
    const misfit = normalMisfit(fit, start.canon.y), chords = chordTurn(start.canon.y, start.closed);
    if (misfit < NORMAL_MISFIT_LIMIT && chords > COARSE_CHORD_TURN && !zigzags(start.canon.y)) {
      fit = runPasses(trace, start, { ...set, forceSparse: `the smoothing fit ran inside the points by ${(-misfit).toFixed(2)} of its noise estimate on average, which was the shape between points a coarse trace leaves (chords turning by ${chords.toFixed(2)} rad at the median)` }, diagnostics);
    }
  }
  // Kinks (a turn by a finite angle within a few points): the passes lift the smoothness penalty
  // there (a hinge) and the level rules leave their stretches out of their scores: no level
  // resolves a kink, and scored it would set the level of the whole wire.
  const kinks = fit.sparse ? [] : start.kinks;
  if (kinks.length > 0) {
    diagnostics.push(`kink${kinks.length === 1 ? "" : "s"}: the wire turns by a finite angle within a few points at ${kinkNames(trace, start)}, sharper than any smoothing level resolves: the fit bends there freely and the smoothing levels are chosen without the wire near ${kinks.length === 1 ? "it" : "them"}; the curvature there is flagged biased (16)`);
  }
  if (set.curvatureRule === "risk" && set.lambda === undefined && !fit.sparse && fit.sel.sigmaFrom === "gcv" && !(trace.facetLength && trace.facetLength > 0)) {
    // The curvature level of least estimated error, then foot points, weights and arc length at
    // that level (one more pass from where the passes ended, the noise kept): a fit is best at its
    // level when its parameters come from that level. Only for noise estimated from the data: the
    // rule models white noise, and a mesh centre line's tessellation ripple or a noise floor is not
    // (a capped straight tube then showed torsion at 12 of 94 samples).
    const lv = curvatureLevel(trace, start, fit, set.seed, { kinks });
    if (Math.abs(lv.decades) > 1e-9) {
      const refit = runPasses(trace, start, { passes: 1, lambda: lv.lambda, segments: fit.basis.nseg }, diagnostics, { u: fit.u, w: fit.w, span: fit.table.length, sigma: fit.sel.sigma });
      fit = { ...refit, sel: { ...refit.sel, sigmaFrom: fit.sel.sigmaFrom, rule: fit.sel.rule } };
      diagnostics.push(`curvature: smoothing level ${Math.pow(10, lv.decades).toPrecision(2)}x the discrepancy level (least estimated curvature error${lv.biasLaw ? ", bias extrapolated from the top of the scan, where it grows in proportion to the level" : ""}${lv.atTop ? ", top of the scan" : ""})`);
    }
  }
  const samples = sampleAt(trace, start, fit, set);
  const levels = chooseLevels(trace, start, fit, samples, set, diagnostics, kinks);
  if (fit.sel.sigmaFrom === "unknown" && set.replicates > 0) {
    diagnostics.push(`noise not estimable: on a sparse trace (${fit.u.length} points, a few per turn) the shape cannot be told from the noise; no bands (give the coordinate error to get them)`);
    return fitBands(trace, start, fit, levels, samples, { ...set, replicates: 0 }, diagnostics);
  }
  const profile = fitBands(trace, start, fit, levels, samples, set, diagnostics);
  return kinks.length > 0 ? { ...profile, kinks: profileKinks(trace, start, fit, samples, kinks) } : profile;
}

/** The hinged kinks on the profile's arc length (from its start, wrapped on a ring), in order of s. */
function profileKinks(trace: Trace, start: Start, fit: PassesResult, samples: Samples, kinks: readonly Kink[]): ProfileKink[] {
  const { table } = fit, length = table.length, L0 = start.canon.scale;
  const origin = arcAt(table, samples.u[0], start.closed) - samples.s[0];
  const n = fit.u.length, reach = (k: Kink) => KINK_ZONE_WINDOWS * k.window;
  return kinks.map((k) => {
    let s = arcAt(table, fit.u[k.at], start.closed) - origin;
    if (start.closed) s = ((s % length) + length) % length;
    else s = Math.min(Math.max(s, 0), length);
    // The zone: the arc length over the points `reach` either side (clamped at open ends).
    const span = (j: number) => {
      const jj = start.closed ? ((j % n) + n) % n : Math.min(Math.max(j, 0), n - 1);
      let d = arcAt(table, fit.u[jj], start.closed) - arcAt(table, fit.u[k.at], start.closed);
      if (start.closed) d = j < k.at ? -(((-d) % length) + length) % length : ((d % length) + length) % length;
      return d;
    };
    const i = start.kept[k.at];
    const s0 = start.closed ? s + span(k.at - reach(k)) : Math.max(0, s + span(k.at - reach(k)));
    const s1 = start.closed ? s + span(k.at + reach(k)) : Math.min(length, s + span(k.at + reach(k)));
    return { s: s * L0, angle: k.angle, inputRow: trace.rows ? trace.rows[i] : i + 1, s0: s0 * L0, s1: s1 * L0 };
  }).sort((a, b) => a.s - b.s);
}

/** Where the profile is sampled: sorted foot points of the kept points, or a uniform step. */
export interface Samples {
  readonly u: Float64Array;
  /** Input row (trace index) of each sample; -1 for resampled samples. */
  readonly traceIndex: Int32Array;
  /** Arc length of each sample from the profile's origin (canonical units). */
  readonly s: Float64Array;
}

/** Stage 4: sample parameters, their arc length from 0, and the trace point each comes from. */
function sampleAt(trace: Trace, start: Start, fit: PassesResult, set: Settings): Samples {
  const { basis, coef, table, u } = fit;
  const length = table.length;
  const closed = start.closed;
  if (set.step !== undefined) {
    const step = set.step / start.canon.scale;
    // An open wire ends with a sample at its end (the last interval may be shorter than the step):
    // without it a 198 nm helix resampled every 20 nm ended at 180 nm in every output.
    const whole = Math.floor(length / step + 1e-9) + 1;
    const count = closed ? Math.max(1, Math.floor(length / step - 1e-9) + 1) : whole + (length - (whole - 1) * step > 1e-9 * step ? 1 : 0);
    if (count < 6) {
      const most = (length * start.canon.scale) / (closed ? 6 : 5);
      throw new ParameterError("profile", "step", `${describeLength(set.step, trace.source)} gives ${count} sample${count === 1 ? "" : "s"} along a wire ${describeLength(length * start.canon.scale, trace.source)} long; use at most ${describeLength(most, trace.source)} (6 samples or more)`);
    }
    if (count > 5_000_000) throw new ParameterError("profile", "step", `gives ${count} samples; use a larger step`);
    const su = new Float64Array(count), s = new Float64Array(count);
    for (let k = 0; k < count; ++k) { s[k] = Math.min(k * step, length); su[k] = uAtArc(basis, coef, table, s[k]); }
    return { u: su, traceIndex: new Int32Array(count).fill(-1), s };
  }
  const m = u.length;
  // Foot points of an ordered trace are nearly always in order already: sort only when they are not.
  const order = ascendingOrder(u);
  const su = new Float64Array(m), s = new Float64Array(m), traceIndex = new Int32Array(m);
  gatherSamples(u, start.kept, order, su, traceIndex);
  arcFromStart(table, su, closed, s);
  return { u: su, traceIndex, s };
}

/**
 * Indices 0..m-1 in ascending order of u (ties by index); no sort when u is in order already.
 * Foot-point parameters are nearly in order (noise swaps neighbours), so a stable insertion sort
 * (ties keep index order) costs O(m + moves); past 8 moves per index it hands over to the native
 * sort with the comparator (the order by (u, index) is unique: the same result either way), and
 * at a NaN the native sort does it all from the identity order, as before.
 */
function ascendingOrder(u: Float64Array): Uint32Array {
  const m = u.length;
  let sorted = true;
  for (let i = 1; i < m && sorted; ++i) sorted = u[i] >= u[i - 1];
  const order = new Uint32Array(m);
  for (let i = 0; i < m; ++i) order[i] = i;
  if (!sorted && !insertionOrder(u, order)) {
    for (let i = 0; i < m; ++i) order[i] = i;
    order.sort((a, b) => u[a] - u[b] || a - b);
  }
  return order;
}

/** Stable insertion sort of `order` (the identity on entry) by u; false, leaving `order`
 * unspecified, at a NaN or past 8 moves per index (see ascendingOrder). */
function insertionOrder(u: Float64Array, order: Uint32Array): boolean {
  const m = order.length;
  let budget = 8 * m;
  if (m > 0 && u[0] !== u[0]) return false;
  for (let i = 1; i < m; ++i) {
    const k = order[i], x = u[k];
    if (x !== x) return false;
    let j = i - 1;
    if (!(u[order[j]] > x)) continue;
    while (j >= 0 && u[order[j]] > x) { order[j + 1] = order[j]; --j; }
    order[j + 1] = k;
    budget -= i - j;
    if (budget < 0) return false;
  }
  return true;
}

/** su[j] = u[order[j]], traceIndex[j] = kept[order[j]]. */
function gatherSamples(u: Float64Array, kept: Int32Array, order: Uint32Array, su: Float64Array, traceIndex: Int32Array): void {
  for (let j = 0; j < order.length; ++j) { su[j] = u[order[j]]; traceIndex[j] = kept[order[j]]; }
}

/** s[j] = arc length of su[j] from su[0] (floored at 0). */
function arcFromStart(table: ArcTable, su: Float64Array, closed: boolean, s: Float64Array): void {
  const s0 = arcAt(table, su[0], closed);
  for (let j = 0; j < su.length; ++j) s[j] = Math.max(0, arcAt(table, su[j], closed) - s0);
}
