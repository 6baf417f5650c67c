/**
 * Stage 2 of the geometry core: the foot-point passes. Each pass fits the penalised spline at the
 * automatic level, projects every point on the curve (Newton foot points), maps parameters to the
 * fit's arc length, updates the robust weights, and matches the knots to the smoothing scale; the
 * divergence guard checks every pass.
 */
import type { Trace } from "../types.js";
import { makeBasis, type SplineBasis } from "./bspline.js";
import { differencePenalty } from "./design.js";
import { arcAt, arcTable, evalCurve, kappaTau, type ArcTable } from "./curve.js";
import { checkPass, describeLength, LENGTH_RATIO_LIMIT } from "./fitGuard.js";
import { InputError } from "../errors.js";
import { hypot2, hypot3 } from "./hypot3.js";
import { medianOf, stepLengths } from "./robustStart.js";
import { lambdaForWavelength, makeSmoother, selectSmoothing, wavelengthForLambda, type Selection, type Smoother } from "./smoother.js";
import type { Start } from "./profile.js";
import type { Kink } from "./kinks.js";
import { continuedFit, CONTINUED_MAX_POINTS } from "./endContinuation.js";

const MAX_SEGMENTS = 5_000;
const KNOTS_PER_WAVELENGTH = 12;
const INITIAL_SEGMENTS_CAP = 1500;
/** Median turning angle between samples (rad) above which a trace counts as sparse. */
export const SPARSE_TURN = 0.35;
/**
 * ... and median turning angle between consecutive chords of the points (rad) above which it does.
 * Helices traced at 3.6-6 points per turn (chord turn 0.97-1.6 rad) are better near-interpolated;
 * from 7 points per turn (0.83 rad) on, smoothing with the estimated noise is: on 30-point helices
 * at 1% and 4% noise, near-interpolated curvature was off by 6-120% RMS at 7-15 points per turn
 * (torsion 20-1200%), with no noise estimate and no bands; smoothed, 1.3-5.6% (torsion 4-20%),
 * bands covering 0.87-0.93. The fit's turn alone (above) cannot tell them apart: its first pass
 * under-fits a short trace (a 10-atom alpha helix measured 0.49-1.46 rad).
 */
export const SPARSE_CHORD_TURN = 0.95;
/**
 * Dihedral concentration (`dihedralConcentration`) above which a trace whose chords turn by more
 * than SPARSE_CHORD_TURN is sparse even when the first fit does not turn: helices traced at 3-4
 * points per turn give 0.988-1.000 at 2-10% noise; noisy dense traces whose chords turn by more
 * than 0.95 rad (noise above the step) gave 0.01-0.49 (six families, 200-2000 points).
 */
export const SPARSE_DIHEDRAL_CONCENTRATION = 0.8;
/**
 * Chord turn (rad) at and above which points that twist alike are not a helix but a trace that runs
 * back and forth (two wires interleaved point by point: 3.14 rad, dihedral concentration 0.92);
 * helices of 2.5 or more points per turn stay below (a 3-10 helix, 3 per turn: 1.66).
 */
export const MAX_HELICAL_CHORD_TURN = 2.5;
/**
 * Longest step of a sparse trace, relative to the median of the (up to) 8 steps around it, beyond
 * which it is a gap (a chain break: missing atoms). Near-interpolation invents the wire across a
 * gap: two 20-atom helices 30 A apart came out 1.8x the polyline's length, exit 0. Measured steps
 * of sparse helices (alpha, 3-10, pi, polyproline, DNA-like, 10-60 atoms, up to 0.3 A of noise)
 * stay within 1.6x of their neighbours'.
 */
export const SPARSE_GAP_LIMIT = 3;
/**
 * The same for the closing chord of a closed sparse trace: the ends of an open 8-atom alpha helix
 * forced closed are 2.75 steps apart (within the 5 median steps a dense trace's seam may miss) and
 * were joined by an invented arc, torsion -0.33/A at the ends for 0.14/A, unflagged.
 */
export const SPARSE_CLOSING_LIMIT = 2;

/** Lengths of the chords between consecutive points (with the closing chord when closed). */
function chordSteps(y: Float64Array, closed: boolean): Float64Array {
  const n = y.length / 3;
  const step = closed ? new Float64Array(n) : stepLengths(y);
  if (closed) for (let i = 0; i < n; ++i) { const j = (i + 1) % n; step[i] = hypot3(y[3 * j] - y[3 * i], y[3 * j + 1] - y[3 * i + 1], y[3 * j + 2] - y[3 * i + 2]); }
  return step;
}

/**
 * Refuses a sparse trace with a gap: a step more than SPARSE_GAP_LIMIT times the median of the
 * steps around it (4 on each side, wrapping on a closed wire), naming the points on either side;
 * on a closed wire, a closing chord more than SPARSE_CLOSING_LIMIT times the steps around it.
 */
export function checkSparseGaps(y: Float64Array, closed: boolean, file: string, name: (i: number) => string, say: (d: number) => string): void {
  const n = y.length / 3, step = chordSteps(y, closed), m = step.length;
  if (m < 3) return;
  let worst = -1, worstRatio = 0;
  const around: number[] = [];
  for (let i = 0; i < m; ++i) {
    around.length = 0;
    for (let d = -4; d <= 4; ++d) {
      if (d === 0) continue;
      const k = closed ? (((i + d) % m) + m) % m : i + d;
      if (k >= 0 && k < m && k !== i) around.push(step[k]);
    }
    around.sort((a, b) => a - b);
    const med = around.length % 2 ? around[around.length >> 1] : 0.5 * (around[around.length / 2 - 1] + around[around.length / 2]);
    const r = med > 0 ? step[i] / med : 0;
    if (closed && i === m - 1 && r > SPARSE_CLOSING_LIMIT) {
      throw new InputError(file, null, "closed",
        `the wire was declared closed but its ends are ${say(step[i])} apart, ${r.toFixed(1)}x the steps around them: a sparse trace's closing chord must be a step like the others (near-interpolation would invent the wire between its ends); fit it open (--open), or give a trace whose ends meet`);
    }
    if (r > worstRatio) { worstRatio = r; worst = i; }
  }
  if (worstRatio > SPARSE_GAP_LIMIT) {
    throw new InputError(file, null, "points",
      `gap in a sparse trace: ${say(step[worst])} between ${name(worst)} and ${name((worst + 1) % n)}, ${worstRatio.toFixed(1)}x the steps around it (missing points?): near-interpolation would invent the wire there; split the trace at the gap`);
  }
}

/**
 * Largest length of a near-interpolated sparse fit over the polyline through its points. An arc
 * over its chord is (t/2) / sin(t/2) for a turn t per step: 1.11 at 4 points per turn, 1.21 at 3,
 * 1.57 at 2 (where the sampling cannot tell the turn's sense); measured on sparse helices (alpha,
 * 3-10, pi, polyproline, 10-60 atoms, up to 0.3 A of noise) 1.09-1.18.
 */
export const SPARSE_LENGTH_LIMIT = 1.6;

/**
 * Refuses a near-interpolated sparse fit whose length is more than SPARSE_LENGTH_LIMIT times the
 * polyline through its points (or under a third of it): the curve loops between the points.
 * Against the polyline through the points themselves: the robust reference's block medians would
 * cut across the turns of a long sparse helix.
 */
export function checkSparseLength(length: number, polyline: number, file: string, say: (d: number) => string): void {
  const ratio = length / polyline;
  if (!(ratio <= SPARSE_LENGTH_LIMIT && ratio > 1 / LENGTH_RATIO_LIMIT)) {
    throw new InputError(file, null, "points", `the fit of this sparse trace diverged: its length is ${ratio.toPrecision(2)}x the polyline through the points (${say(polyline)}); the points are too few or too noisy for the turns of this wire (the curve loops between them)`);
  }
}

/** Most points a sparse trace may have (four knot intervals per point). */
export const MAX_SPARSE_POINTS = 2000;
/** Fewest residual degrees of freedom (over the normal directions) a noise estimate may rest on. */
export const MIN_NOISE_DOF = 20;

/** Number of knot intervals: rich enough for sparse traces, capped for long ones. */
export function segmentCount(n: number, closed: boolean): number {
  const target = n <= 400 ? n : Math.max(400, Math.round(n / 4));
  return Math.min(MAX_SEGMENTS, Math.max(closed ? 12 : 8, target));
}

/** Chord-length parameter of the points into `u`; returns the span (closing chord included for a ring). */
export function chordLength(y: Float64Array, closed: boolean, u: Float64Array): number {
  const n = y.length / 3;
  u[0] = 0;
  for (let i = 1; i < n; ++i) u[i] = u[i - 1] + hypot3(y[3 * i] - y[3 * i - 3], y[3 * i + 1] - y[3 * i - 2], y[3 * i + 2] - y[3 * i - 1]);
  return closed ? u[n - 1] + Math.hypot(y[0] - y[3 * n - 3], y[1] - y[3 * n - 2], y[2] - y[3 * n - 1]) : u[n - 1];
}

/** Hampel-style redescending weight of a normal-plane residual e with robust scale sc. */
export function robustWeight(e: number, sc: number): number {
  const r = e / sc;
  if (r <= 4) return 1;
  if (r >= 8) return 0;
  const q = (r - 4) / 4;
  return (1 - q * q) * (1 - q * q);
}

/**
 * Foot points: Newton on |r(u) - p_i|^2 from u[i] (steps limited to one knot interval, at most 4,
 * clamped to an open domain), u[i] and the distance resid[i] updated in place; `turns` (when given)
 * gets the turning angle per median step at each foot point. A function of its own so that the JIT
 * optimises this loop alone, whatever the rest of the pass does.
 */
function projectFootPoints(
  basis: SplineBasis, coef: Float64Array, y: Float64Array, u: Float64Array, resid: Float64Array, turns: Float64Array | null, medianStep: number, closed: boolean,
): void {
  const n = u.length;
  const d12 = new Float64Array(12), st = new Float64Array(1), sb = new Float64Array(24), kt = new Float64Array(5);
  for (let i = 0; i < n; ++i) {
    let ui = u[i];
    for (let it = 0; it < 4; ++it) {
      evalCurve(basis, coef, ui, 2, d12, st, sb);
      const ex = d12[0] - y[3 * i], ey = d12[1] - y[3 * i + 1], ez = d12[2] - y[3 * i + 2];
      const g = ex * d12[3] + ey * d12[4] + ez * d12[5];
      const sp2 = d12[3] * d12[3] + d12[4] * d12[4] + d12[5] * d12[5];
      const hss = sp2 + ex * d12[6] + ey * d12[7] + ez * d12[8];
      let du = -g / (hss > 0.1 * sp2 ? hss : sp2);
      if (du > basis.h) du = basis.h;
      else if (du < -basis.h) du = -basis.h;
      ui += du;
      if (!closed) ui = Math.min(Math.max(ui, basis.u0), basis.u0 + basis.nseg * basis.h);
      if (Math.abs(du) < 1e-7 * basis.h) break;
    }
    u[i] = ui;
    evalCurve(basis, coef, ui, turns ? 3 : 0, d12, st, sb);
    resid[i] = hypot3(d12[0] - y[3 * i], d12[1] - y[3 * i + 1], d12[2] - y[3 * i + 2]);
    if (turns) turns[i] = kappaTau(d12, kt)[0] * medianStep;
  }
}

/**
 * Knot intervals either side of a kink over which the smoothness penalty is lifted (a hinge): the
 * spline may bend there as sharply as its basis allows, following the points, and the level is set
 * by the rest of the wire. Measured (`npx tsx bench/kinks.ts 1-3`, its arc of radius 500 nm and its
 * helix, kinks of 20-135 degrees at 0.05-0.3 steps of noise, 96 cases): curvature and torsion beyond 40 points of
 * a kink within 1.5x of the unkinked twin's error or 2% in all 62 cases where the kink was found
 * (the worst 2.9% for the arc, 4.1% torsion for the helix) with 3 intervals; with 2 intervals 49
 * of 96, 4: 65, 5: 55. Leaving the 16 points either side out of the fit instead (a bridge the
 * spline spans smoothly): 13 of 96, the arc 10-35% off beyond 90 degrees, as the smooth bridge cut
 * the corner beyond the points left out and those beside it pulled the level down.
 */
export const KINK_HINGE = 3;

/**
 * Least opening (`Kink.opening`, chord over length two windows either side) of a kink that gets a
 * hinge: below it the wire turns back along itself, its legs run side by side, and a free hinge let
 * the fit fold between them (a hairpin of radius 1.5 nm traced every 2 nm, legs 3 nm apart, turn
 * measured 148-158 degrees, opening ~0.1: noise 1.15 nm for 0.15, length 15% short; without the
 * hinge 2% short). Kinks of 135 degrees open by cos(67.5 degrees) = 0.38.
 */
export const KINK_HINGE_MIN_OPENING = 0.15;

/** Penalty row weights: 0 for rows within KINK_HINGE knot intervals of a hinged kink's parameter (opening at least KINK_HINGE_MIN_OPENING), else 1. */
function kinkPenaltyWeights(basis: SplineBasis, u: Float64Array, kinks: readonly Kink[]): Float64Array {
  const rows = basis.periodic ? basis.K : basis.K - 4;
  const weights = new Float64Array(rows).fill(1);
  const span = basis.nseg * basis.h;
  for (let r = 0; r < rows; ++r) {
    const p = basis.u0 + (r - 0.5) * basis.h;
    for (const k of kinks) {
      if (!(k.opening >= KINK_HINGE_MIN_OPENING)) continue;
      let d = Math.abs(p - u[k.at]);
      if (basis.periodic) d = Math.min(d, span - d);
      if (d <= KINK_HINGE * basis.h) weights[r] = 0;
    }
  }
  return weights;
}

/**
 * Knot spacing of a fit with a hinged kink, at most, in kink windows (the narrowest): the passes
 * coarsen the knots to the smoothing scale, which cut the turn. A 90 degree bend of radius 3 nm
 * between straight legs (1 nm steps, 0.1 nm of noise), which the wider kink windows take for a
 * kink, got knots 22 nm apart, its points were taken for outliers: noise 0.36-0.62 nm, length
 * 1.8-2.4% short (now 0.10 nm, within 0.04%). Measured on `bench/kinks.ts 1-3` (cases within target
 * of 144): no bound 95, 1 window 92, 1/2: 99, 1/4: 102, 1/8: 105.
 */
export const KINK_KNOT_WINDOWS = 1 / 8;

/** Least knot count with a hinged kink (KINK_KNOT_WINDOWS; at most MAX_SEGMENTS), 0 without. */
function kinkSegments(start: Start, span: number): number {
  let m = Infinity;
  for (const k of start.kinks) if (k.opening >= KINK_HINGE_MIN_OPENING) m = Math.min(m, k.window);
  return Number.isFinite(m) ? Math.min(MAX_SEGMENTS, Math.ceil(span / (KINK_KNOT_WINDOWS * m * start.medianStep))) : 0;
}

/** w[i] = robustWeight(resid[i], sc) (one loop per function: see projectFootPoints). */
function robustWeights(resid: Float64Array, sc: number, w: Float64Array): void {
  for (let i = 0; i < resid.length; ++i) w[i] = robustWeight(resid[i], sc);
}

/** u[i] = s(u[i]), the arc length of the table's curve. */
function toArcLength(table: ArcTable, u: Float64Array, closed: boolean): void {
  for (let i = 0; i < u.length; ++i) u[i] = arcAt(table, u[i], closed);
}

/** u[i] reduced to [0, length) on a ring. */
function wrapInto(u: Float64Array, length: number): void {
  for (let i = 0; i < u.length; ++i) u[i] -= Math.floor(u[i] / length) * length;
}

/** u[i] = min(max(u[i] - a0, 0), span). */
function shiftClamp(u: Float64Array, a0: number, span: number): void {
  for (let i = 0; i < u.length; ++i) u[i] = Math.min(Math.max(u[i] - a0, 0), span);
}

/** The settings the passes read. */
export interface PassSettings {
  readonly passes: number;
  readonly segments?: number;
  readonly lambda?: number;
  readonly coordinateError?: number;
  /** Fit as a sparse trace (near-interpolation) whatever its chords; the text says why. */
  readonly forceSparse?: string;
}

/** Where a refit at a fixed level starts: the parameters, weights and noise of earlier passes. */
export interface PassResume {
  readonly u: Float64Array;
  readonly w: Float64Array;
  readonly span: number;
  /** Noise SD (canonical units), kept (not re-estimated at the fixed level). */
  readonly sigma: number;
}

/** What the passes leave for the later stages (canonical units). */
export interface PassesResult {
  readonly basis: SplineBasis;
  readonly smoother: Smoother;
  readonly sel: Selection;
  readonly coef: Float64Array;
  readonly table: ArcTable;
  /** Parameter (arc length of the final fit) of each kept point. */
  readonly u: Float64Array;
  /** Robust weight of each kept point. */
  readonly w: Float64Array;
  readonly sparse: boolean;
  /** Level whose half-power wavelength is one knot interval (sparse traces use it). */
  readonly nearInterpolation: number;
}

/**
 * Runs the passes on the kept points of `start`. Sparse traces (the fit turns by more than 0.35 rad
 * between samples at the median: a few points per turn, e.g. a molecule's atoms) get four knot
 * intervals per point and are near-interpolated (the level whose half-power wavelength is one knot
 * interval), unless the user gave the coordinate error; the noise is never estimated from fewer than
 * 20 residual degrees of freedom (then the difference-based estimate stands in: an upper bound).
 */
export function runPasses(trace: Trace, start: Start, set: PassSettings, diagnostics: string[], resume?: PassResume): PassesResult {
  const file = trace.source.file;
  const y = start.canon.y;
  const n = y.length / 3;
  const closed = start.closed;
  const normalDims: 1 | 2 = trace.dims === 2 ? 1 : 2;
  const scale = start.canon.scale;
  const say = (d: number) => describeLength(d * scale, trace.source);
  // the cloud orderer's figures (Trace.cloudOrder) in canonical units, for the guard's message
  const cloudOrder = trace.cloudOrder && { across: trace.cloudOrder.across / scale, spacing: trace.cloudOrder.spacing / scale };
  const name = (i: number) => (trace.rows ? `row ${trace.rows[start.kept[i]]}` : `point ${start.kept[i] + 1}`);
  const u = resume ? resume.u.slice() : start.u.slice();
  let span = resume ? resume.span : start.span;
  const w = resume ? resume.w.slice() : new Float64Array(n).fill(1);
  const fullSegments = segmentCount(n, closed);
  let nseg = set.segments ?? Math.min(fullSegments, INITIAL_SEGMENTS_CAP);
  let basis: SplineBasis = makeBasis(0, span, nseg, closed);
  let sparse = false;
  let sel: Selection | undefined;
  let sm: Smoother | undefined;
  let nearInterpolation = NaN;
  const sigmaKnown = resume ? resume.sigma : set.coordinateError !== undefined ? set.coordinateError / scale : undefined;
  const resid = new Float64Array(n);
  for (let pass = 0; pass <= set.passes; ++pass) {
    sm = makeSmoother(basis, u, y, w);
    // A hinge at each kink (KINK_HINGE); not on sparse traces, near-interpolated anyway.
    if (start.kinks.length > 0 && !sparse) sm = { ...sm, P: differencePenalty(basis, kinkPenaltyWeights(basis, u, start.kinks)) };
    const rho = sm.normal.wSum / (basis.nseg * basis.h);
    // Near-interpolation: the level whose half-power wavelength is one sample spacing (shorter waves
    // are aliased by the sampling anyway; a shorter one lets the curve loop between the points).
    nearInterpolation = lambdaForWavelength(Math.max(basis.h, (basis.nseg * basis.h) / n), rho, basis.h);
    const hint = sel && sel.basisSegments === nseg && sel.rule !== "fixed" ? Math.log10(sel.lambdaGcv) : undefined;
    sel = selectLevel(sm, normalDims, { sparse, nearInterpolation, start, ...(set.lambda !== undefined ? { fixedLambda: set.lambda } : {}), ...(sigmaKnown !== undefined ? { sigmaKnown } : {}), ...(hint !== undefined ? { hint } : {}) });
    if (pass === set.passes) break;
    if (sparse) {
      // Sparse traces keep the chord-length parameter of their points: with a few points per turn a
      // foot point is ill-defined (the near-interpolating curve may pass close to a point twice), and
      // chord length is the standard parameter for interpolation (Ahlberg, Nilson & Walsh 1967, from memory).
      basis = makeBasis(0, span, nseg, closed);
      continue;
    }
    // Foot-point projection: Newton on |r(u) - p|^2, steps limited to one knot interval.
    const coef = sel.fit.coef;
    const checkSparse = pass === 0 && !sparse && n <= MAX_SPARSE_POINTS && set.segments === undefined;
    if (pass === 0 && n > MAX_SPARSE_POINTS && set.segments === undefined) refuseLongSparse(y, closed, n, file, name);
    const turns = new Float64Array(checkSparse ? n : 0);
    projectFootPoints(basis, coef, y, u, resid, checkSparse ? turns : null, start.medianStep, closed);
    // Robust weights from the residual norms (Rayleigh median in 3D: 1.1774 sigma; half-normal in
    // 2D: 0.6745 sigma), the scale floored at 10% of the median step so clean points where the fit
    // is biased (a tight bend, a clamped end) keep their weight (NUMERICS.md sec. 7 item 5).
    const sc = Math.max(medianOf(resid) / (normalDims === 2 ? 1.1774 : 0.6745), 0.1 * start.medianStep);
    if (sc > 0) robustWeights(resid, sc, w);
    // Map parameters to the arc length of the current fit; pin an open wire's end points to the
    // ends of the domain (else the open ends drift from pass to pass).
    const table = arcTable(basis, coef);
    toArcLength(table, u, closed);
    if (closed) {
      wrapInto(u, table.length);
      span = table.length;
    } else {
      // The domain of the next pass runs from the first point's foot point to the last one's.
      const a0 = u[0], a1 = u[n - 1];
      span = a1 - a0;
      if (!(span > 0)) span = NaN;
      shiftClamp(u, a0, span);
      u[0] = 0; u[n - 1] = span;
    }
    const wl = wavelengthForLambda(sel.fit.lambda, sm.normal.wSum / (basis.nseg * basis.h), basis.h);
    // The first fit of a sparse helix may be straight (a 60-atom pi helix: length 0.29x the
    // polyline), which the guard takes for a divergence: then the trace is sparse if its points
    // twist like a helix (not on the first fit's turn: wild or interleaved points keep the guard's word).
    let guard: unknown = null;
    try {
      checkPass({ length: span, u, resid, sigma: sel.sigmaFrom === "unknown" ? 0 : sel.sigma, closed, knotInterval: span / basis.nseg }, start.referenceLength, file, name, say, cloudOrder);
    } catch (err) {
      if (!checkSparse) throw err;
      guard = err;
    }
    if (checkSparse) {
      const shape = chordShape(y, closed), turn = medianOf(turns), chords = shape.turn.length > 0 ? medianOf(shape.turn) : 0;
      // A few points per turn: the chords turn by large angles, and either the first fit follows
      // them or it straightened them while every quadruple of points twists the same way (a helix
      // of 3 points per turn looks like noise about a straight axis to that fit: a 60-atom
      // polyproline helix came out straight, curvature ~0 for 0.34/A, with 1.2 A of "noise"); or
      // some 16 consecutive points are such a helix on their own (a trace sparse only in part).
      const whole = helicalWhole(chords, () => concentration(shape.dihedralCos, shape.dihedralSin, 0, shape.dihedralCos.length));
      const window = whole ? -1 : sparseHelicalWindow(y, shape);
      const helical = whole || window >= 0;
      if (guard !== null && !helical) throw guard;
      if (helical) checkMixedSampling(y, closed, window, file, name, say);
      // Chords that turn back and forth (a pixel chain's steps) are not a coarse curve: smoothed.
      if (helical || (chords > SPARSE_CHORD_TURN && turn > SPARSE_TURN && !zigzags(y)) || set.forceSparse !== undefined) {
        sparse = true;
        nseg = Math.min(MAX_SEGMENTS, 4 * n);
        // The plain chord length of the points: the running median of the start parameter pulls a
        // few points per turn toward the axis (a 60-atom helix read back with +-30% curvature waves).
        span = chordLength(y, closed, u);
        w.fill(1);
        checkSparseGaps(y, closed, file, name, say);
        const why = set.forceSparse ?? `the chords between points turn by ${chords.toFixed(2)} rad (median)`;
        diagnostics.push(`sparse trace: ${why}; fitted with ${nseg} knot intervals, near-interpolating the points (${sigmaKnown === undefined ? "give the coordinate error to get bands" : "the coordinate error given sets the bands"})`);
      }
    }
    if (set.lambda === undefined && set.segments === undefined && !sparse) {
      const want = Math.ceil((KNOTS_PER_WAVELENGTH * span) / wl);
      // Shrink when the basis is much richer than the smoothing scale; grow back (up to the
      // point-count rule) when the basis is too coarse, but not after the first pass, whose
      // parameters are still noisy and whose level is too low.
      if (wl > 2 * KNOTS_PER_WAVELENGTH * basis.h) nseg = Math.max(closed ? 12 : 8, want, kinkSegments(start, span));
      else if (pass > 0 && wl < (KNOTS_PER_WAVELENGTH * basis.h) / 2) nseg = Math.min(fullSegments, Math.max(nseg, want));
    }
    basis = makeBasis(0, span, nseg, closed);
  }
  if (!sel || !sm) throw new Error("unreachable: no pass ran");
  if (sparse && !closed && n <= CONTINUED_MAX_POINTS) {
    // So short a trace that the spline's end effects meet in the middle: each end continued by a helix.
    const continued = continuedFit(basis, u, y, w, sel.fit.lambda);
    if (continued) {
      sel = { ...sel, fit: { ...sel.fit, coef: continued } };
      diagnostics.push(`sparse trace of ${n} points: each end continued by the least-squares helix through its last points before near-interpolating (else the spline's end effect reaches the middle)`);
    }
  }
  const coef = sel.fit.coef;
  const table = arcTable(basis, coef);
  if (sparse) {
    checkSparseLength(table.length, span, file, say);
  }
  if (sel.rule === "gcv-x3") diagnostics.push("smoothing: the discrepancy level could not be bracketed (noise-free data?); used 3x the GCV level");
  return { basis, smoother: sm, sel, coef, table, u, w, sparse, nearInterpolation };
}

/**
 * The level of one pass: near-interpolation for a sparse trace (with the user's coordinate error,
 * when given, as its noise), else GCV -> noise -> discrepancy with
 * the noise floor. The noise comes from the GCV residuals only with at least 20 residual degrees of
 * freedom; otherwise from the difference-based estimate (an upper bound: shape misfit counts).
 */
function selectLevel(
  sm: Smoother, normalDims: 1 | 2,
  o: { sparse: boolean; nearInterpolation: number; start: Start; fixedLambda?: number; sigmaKnown?: number; hint?: number },
): Selection {
  const { start } = o;
  const floor = start.sigmaFloor;
  if (o.fixedLambda !== undefined) return selectSmoothing(sm, normalDims, { fixedLambda: o.fixedLambda, sigmaFloor: floor, ...(o.sigmaKnown !== undefined ? { sigmaKnown: o.sigmaKnown } : {}) });
  if (o.sparse) {
    // Near-interpolated whether or not the coordinate error is known: smoothed to the error given
    // (the discrepancy level), a helix with 3.6 points per turn came out shrunk toward its axis,
    // curvature +10% and torsion +35% at 0.2 A on a 2.3 A radius, whatever its length (10-60 atoms;
    // per-sample RMS error 16% / 36% against 14% / 16% near-interpolated). A known error sets the
    // noise of the bands only.
    if (o.sigmaKnown !== undefined) return selectSmoothing(sm, normalDims, { fixedLambda: o.nearInterpolation, sigmaKnown: o.sigmaKnown });
    // The noise of a sparse trace is not estimated: its shape, a few points per turn, fills the band
    // the sampling resolves. The fit whose half-power wavelength is two sample spacings (the probe
    // used until 2026-12-03) passes the shape but also ~94% of the degrees of freedom: on alpha
    // helices of 120-300 atoms its residuals kept 2-5 (n - 2 tr H + tr H^2, tr H^2 by Hutchinson
    // probes), not the 16-40 that n - tr H counts, and its noise came out 0.45x the truth at 0.2 A
    // (curvature bands holding the truth at 0.69-0.71, unflagged) and 1.2x at 0.05 A (shape misfit).
    const s = selectSmoothing(sm, normalDims, { fixedLambda: o.nearInterpolation });
    return { ...s, sigma: NaN, sigmaFrom: "unknown" };
  }
  // A mesh centre line: no wavelength shorter than four facets (the tessellation is not the wire).
  const minLambda = start.minWavelength > 0 ? lambdaForWavelength(start.minWavelength, sm.normal.wSum / (sm.basis.nseg * sm.basis.h), sm.basis.h) : undefined;
  const sel = selectSmoothing(sm, normalDims, { sigmaFloor: floor, ...(minLambda !== undefined ? { minLambda } : {}), ...(o.sigmaKnown !== undefined ? { sigmaKnown: o.sigmaKnown } : {}), ...(o.hint !== undefined ? { hintLogGcv: o.hint } : {}) });
  const dof = normalDims * (sm.normal.wSum - sel.edfGcv);
  if (o.sigmaKnown === undefined && dof < MIN_NOISE_DOF && Number.isFinite(start.sigmaDiff)) {
    return selectSmoothing(sm, normalDims, { sigmaKnown: Math.max(start.sigmaDiff, floor), ...(minLambda !== undefined ? { minLambda } : {}), ...(o.hint !== undefined ? { hintLogGcv: o.hint } : {}) });
  }
  return sel;
}

/** The chords between consecutive points of a trace, as the sparse tests see them. */
export interface ChordShape {
  /** Turning angle (rad) between chords k and k+1 (points k, k+1, k+2; wrapping when closed). */
  readonly turn: Float64Array;
  /** Unit (cos, sin) of the dihedral of points k..k+3 (open quadruples only); NaN where undefined. */
  readonly dihedralCos: Float64Array;
  readonly dihedralSin: Float64Array;
}

/** Turning angles and dihedrals of the chords of the points (interleaved xyz). Cost O(n). */
export function chordShape(y: Float64Array, closed: boolean): ChordShape {
  return { turn: chordTurns(y, closed), ...chordDihedrals(y) };
}

/** Turning angle (rad) between chords k and k+1 of the points, wrapping when closed. */
function chordTurns(y: Float64Array, closed: boolean): Float64Array {
  const n = y.length / 3;
  const m = n < 3 ? 0 : closed ? n : n - 2, turn = new Float64Array(m);
  for (let k = 0; k < m; ++k) {
    const i0 = k, i1 = (k + 1) % n, i2 = (k + 2) % n;
    const ux = y[3 * i1] - y[3 * i0], uy = y[3 * i1 + 1] - y[3 * i0 + 1], uz = y[3 * i1 + 2] - y[3 * i0 + 2];
    const vx = y[3 * i2] - y[3 * i1], vy = y[3 * i2 + 1] - y[3 * i1 + 1], vz = y[3 * i2 + 2] - y[3 * i1 + 2];
    turn[k] = Math.atan2(hypot3(uy * vz - uz * vy, uz * vx - ux * vz, ux * vy - uy * vx), ux * vx + uy * vy + uz * vz);
  }
  return turn;
}

/** Unit (cos, sin) of the dihedral of points i..i+3 (open quadruples); NaN where undefined. */
function chordDihedrals(y: Float64Array): { dihedralCos: Float64Array; dihedralSin: Float64Array } {
  const q = Math.max(0, y.length / 3 - 3), dihedralCos = new Float64Array(q), dihedralSin = new Float64Array(q);
  for (let i = 0; i < q; ++i) {
    const b1x = y[3 * i + 3] - y[3 * i], b1y = y[3 * i + 4] - y[3 * i + 1], b1z = y[3 * i + 5] - y[3 * i + 2];
    const b2x = y[3 * i + 6] - y[3 * i + 3], b2y = y[3 * i + 7] - y[3 * i + 4], b2z = y[3 * i + 8] - y[3 * i + 5];
    const b3x = y[3 * i + 9] - y[3 * i + 6], b3y = y[3 * i + 10] - y[3 * i + 7], b3z = y[3 * i + 11] - y[3 * i + 8];
    const n1x = b1y * b2z - b1z * b2y, n1y = b1z * b2x - b1x * b2z, n1z = b1x * b2y - b1y * b2x;
    const n2x = b2y * b3z - b2z * b3y, n2y = b2z * b3x - b2x * b3z, n2z = b2x * b3y - b2y * b3x;
    const x = n1x * n2x + n1y * n2y + n1z * n2z;
    const yy = hypot3(b2x, b2y, b2z) * (b1x * n2x + b1y * n2y + b1z * n2z);
    const r = hypot2(x, yy);
    dihedralCos[i] = r > 0 ? x / r : NaN;
    dihedralSin[i] = r > 0 ? yy / r : NaN;
  }
  return { dihedralCos, dihedralSin };
}

/** Median of the chords' turning angles (rad); 0 for fewer than 3 points. */
export function chordTurn(y: Float64Array, closed: boolean): number {
  const turn = chordTurns(y, closed);
  return turn.length > 0 ? medianOf(turn) : 0;
}

/**
 * Concentration of the dihedral angles of consecutive point quadruples (interleaved xyz): the length
 * of the mean unit vector (cos, sin) of the angles, 1 when every dihedral is the same (a helix traced
 * point by point, noisy or not), well below it when they are random (noise larger than the step:
 * ~0.26 for independent Gaussian points, whose dihedral cosine has a nonzero mean); 0 for fewer
 * than 4 points or when no dihedral is defined.
 */
export function dihedralConcentration(y: Float64Array): number {
  const { dihedralCos, dihedralSin } = chordDihedrals(y);
  return concentration(dihedralCos, dihedralSin, 0, dihedralCos.length);
}

/**
 * Length of the mean of the defined unit vectors i0..i1-1 (0 when none is defined, and 0 when the
 * mean points into a zigzag: its cosine below ZIGZAG_DIHEDRAL_COS, see there).
 */
function concentration(c: Float64Array, s: Float64Array, i0: number, i1: number): number {
  let sc = 0, ss = 0, cnt = 0;
  for (let i = i0; i < i1; ++i) {
    if (!(c[i] === c[i])) continue;
    sc += c[i]; ss += s[i]; ++cnt;
  }
  if (cnt === 0 || sc < ZIGZAG_DIHEDRAL_COS * cnt) return 0;
  return Math.hypot(sc, ss) / cnt;
}

/**
 * Mean cosine of the defined dihedrals of consecutive point quadruples below which the points
 * zigzag: consecutive turns reverse, as the steps of a pixel or voxel chain do (a 4-connected
 * digitised arc or line: every turn 90 degrees, the next one back, dihedral 180 degrees, cosine -1).
 * Such a trace is dense, its lattice steps are noise: near-interpolated as a sparse trace, a
 * 4-connected arc of radius 150 px came out with curvature 2/px for 0.0067/px and 1.34x its length,
 * exit 0; smoothed, within 0.34%. Helices of a few points per turn twist one way: alpha 50 degrees
 * (cosine 0.64), 3-10 84 (0.11), pi 30 (0.86), polyproline II -105 (-0.25) (ideal helices with the
 * textbook geometries of bench/molecules.ts); a sparse planar ring, 0 (cosine 1). A helix of two
 * points per turn cannot be told from a zigzag.
 */
export const ZIGZAG_DIHEDRAL_COS = -0.7;

/** The points zigzag (`ZIGZAG_DIHEDRAL_COS`): the mean cosine of their defined dihedrals is below it. */
export function zigzags(y: Float64Array): boolean {
  const { dihedralCos } = chordDihedrals(y);
  let sc = 0, cnt = 0;
  for (let i = 0; i < dihedralCos.length; ++i) {
    if (!(dihedralCos[i] === dihedralCos[i])) continue;
    sc += dihedralCos[i]; ++cnt;
  }
  return cnt > 0 && sc < ZIGZAG_DIHEDRAL_COS * cnt;
}

/**
 * A few points per turn that twist alike over the whole trace: chords turning by more than
 * SPARSE_CHORD_TURN and less than MAX_HELICAL_CHORD_TURN at the median (`chords`), dihedral
 * concentration (asked for only then) above SPARSE_DIHEDRAL_CONCENTRATION.
 */
function helicalWhole(chords: number, concentrationOf: () => number): boolean {
  return chords > SPARSE_CHORD_TURN && chords < MAX_HELICAL_CHORD_TURN && concentrationOf() > SPARSE_DIHEDRAL_CONCENTRATION;
}

/**
 * Refuses a trace of more than MAX_SPARSE_POINTS points that is sparse by its chords and dihedrals
 * (a few points per turn, every quadruple twisting the same way): the smoothing path takes such a
 * helix for noise about a straight axis (3000 atoms of a polyproline helix: straight, 1.1 A of
 * "noise", exit 0), and the sparse path stops at MAX_SPARSE_POINTS.
 */
function refuseLongSparse(y: Float64Array, closed: boolean, n: number, file: string, name: (i: number) => string): void {
  // Dihedrals only when the chords turn enough (this runs on traces of up to millions of points).
  const turn = chordTurns(y, closed);
  const chords = turn.length > 0 ? medianOf(turn) : 0;
  let dihedrals: ReturnType<typeof chordDihedrals> | null = null;
  const dihedralsOf = () => (dihedrals ??= chordDihedrals(y));
  if (helicalWhole(chords, () => { const d = dihedralsOf(); return concentration(d.dihedralCos, d.dihedralSin, 0, d.dihedralCos.length); })) {
    throw new InputError(file, null, "points", `a sparse trace (the chords between points turn by ${chords.toFixed(2)} rad at the median, a few points per turn) of ${n} points: sparse traces are fitted up to ${MAX_SPARSE_POINTS} points; split the file into pieces`);
  }
  // A long trace sparse only in part (a sparse helix inside): smoothing flattens that helix. The
  // dihedrals only when some window's chords turn enough (a smooth dense trace: none).
  const at = helicalWindow(n, turn, dihedralsOf);
  if (at >= 0) {
    throw new InputError(file, null, "points", `${name(at)} to ${name(at + HELICAL_WINDOW - 1)} are a sparse helix (a few points per turn) inside a trace of ${n} points: smoothing would flatten it, and sparse traces are fitted up to ${MAX_SPARSE_POINTS} points; split the file into pieces`);
  }
}

/**
 * Largest ratio between a sparse helix's step and the 10th percentile of the trace's steps: beyond
 * it the trace mixes a sparse helix with densely sampled stretches, and one near-interpolating fit
 * leaves the dense stretches' noise unsmoothed (500 points 1 A apart with 0.05 A of noise either
 * side of a 20-atom alpha helix: curvature 0.2/A for a true 0.0003/A there, unflagged, exit 0).
 * Sparse helices alone (alpha, 10-60 atoms, up to 0.3 A of noise) stay under 1.3.
 */
export const MIXED_SAMPLING_LIMIT = 2;

/**
 * Refuses a trace whose sparse helix (the window from `sparseHelicalWindow` at `window`, or the
 * whole trace when `window` < 0) has a median step more than MIXED_SAMPLING_LIMIT times the 10th
 * percentile of all the trace's steps.
 */
export function checkMixedSampling(y: Float64Array, closed: boolean, window: number, file: string, name: (i: number) => string, say: (d: number) => string): void {
  const step = chordSteps(y, closed), m = step.length;
  if (m < 4) return;
  const helixStep = window >= 0 ? medianOf(step.slice(window, Math.min(m, window + HELICAL_WINDOW - 1))) : medianOf(step);
  const sorted = step.slice().sort();
  const low = sorted[Math.floor(0.1 * (m - 1))];
  if (helixStep > MIXED_SAMPLING_LIMIT * low) {
    const where = window >= 0 ? `${name(window)} to ${name(window + HELICAL_WINDOW - 1)} are a sparse helix` : "the trace is a sparse helix at its median step";
    throw new InputError(file, null, "points",
      `${where} (a few points per turn, ${say(helixStep)} apart), but a tenth of the trace's steps are ${say(low)} or shorter: one fit cannot near-interpolate the helix and smooth the densely sampled rest; split the file where the sampling changes`);
  }
}

/**
 * The fit's mean residual along its principal normal, over the noise estimate (points of weight
 * at least 0.5): about 0 for noise (sign-symmetric), negative when the fit runs inside the points,
 * as a curve smoothed to a noise level that holds shape does. Measured at the passes' level: eight
 * noisy dense families (N 200 and 1000, 0.2% and 1% noise) -0.24 to +0.01; noise-free coils traced
 * at 7-8 points per turn -1.18 to -1.31 (their "noise", 2.5 nm on a 20 nm coil, was the local
 * cubic's misfit: curvature +22-50%, torsion 30x the curvature, exit 0); at 10-16 points per turn
 * or with 1-4% noise -0.12 to -1.00.
 */
export function normalMisfit(fit: PassesResult, y: Float64Array): number {
  const { basis, u, w, sel } = fit;
  const d12 = new Float64Array(12), kt = new Float64Array(5), st = new Float64Array(1), sb = new Float64Array(24);
  let sum = 0, count = 0;
  for (let i = 0; i < u.length; ++i) {
    if (!(w[i] >= 0.5)) continue;
    evalCurve(basis, sel.fit.coef, u[i], 3, d12, st, sb);
    kappaTau(d12, kt);
    const k = hypot3(kt[2], kt[3], kt[4]);
    if (!(k > 0)) continue;
    sum += ((y[3 * i] - d12[0]) * kt[2] + (y[3 * i + 1] - d12[1]) * kt[3] + (y[3 * i + 2] - d12[2]) * kt[4]) / k;
    ++count;
  }
  return count > 0 && sel.sigma > 0 ? sum / count / sel.sigma : 0;
}

/** `normalMisfit` below which a coarse trace's noise estimate is taken for shape. */
export const NORMAL_MISFIT_LIMIT = -1.1;
/** Median chord turn (rad) from which a trace is coarse enough to be near-interpolated instead (about 10 points per turn). */
export const COARSE_CHORD_TURN = 0.6;

/** Points in the window of `sparseHelicalWindow`. */
const HELICAL_WINDOW = 16;

/**
 * First point of a window of HELICAL_WINDOW consecutive points (interleaved xyz) that is a sparse
 * helix on its own: its chords turn by more than SPARSE_CHORD_TURN (and less than
 * MAX_HELICAL_CHORD_TURN) at the median, by nearly the same angle (interquartile range under 0.3
 * rad) and with their dihedrals in agreement (concentration above 0.97); -1 when there is none. A
 * trace that is sparse only in part (a straight lead of 10 points, then a 20-atom alpha helix)
 * passed neither test of the whole and came out nearly straight (curvature 0.03/A for 0.38/A in the
 * helix, exit 0). Measured: alpha, 3-10 and polyproline helices of 20 atoms pass at 2-15% noise (of
 * the radius) in 99-100% of draws, pi helices 70-100%; windows of eight noisy dense families
 * (100-2000 points, 0.2-10% noise, 6400 traces) never did (with 12-point windows and looser limits,
 * up to 1 trace in 50 did). `shape` from `chordShape` of the same points (open or closed: the
 * windows never wrap).
 */
export function sparseHelicalWindow(y: Float64Array, shape: ChordShape = chordShape(y, false)): number {
  return helicalWindow(y.length / 3, shape.turn, () => shape);
}

/**
 * `sparseHelicalWindow` on n points from their turning angles, the dihedrals asked for only when a
 * window's chords turn enough.
 */
function helicalWindow(n: number, turn: Float64Array, dihedralsOf: () => { dihedralCos: Float64Array; dihedralSin: Float64Array }): number {
  const turns = HELICAL_WINDOW - 2, quads = HELICAL_WINDOW - 3;
  const sorted = new Float64Array(turns);
  let dihedrals: { dihedralCos: Float64Array; dihedralSin: Float64Array } | null = null;
  // Windows with at least half their turns above SPARSE_CHORD_TURN (else the median is not), by a
  // running count; then the dihedrals, which noise fails (1e6 noisy points: 0.95 s -> 0.05 s).
  let above = 0;
  for (let k = 0; k < turns - 1 && k < turn.length; ++k) if (turn[k] > SPARSE_CHORD_TURN) ++above;
  for (let i = 0; i + HELICAL_WINDOW <= n; ++i) {
    if (turn[i + turns - 1] > SPARSE_CHORD_TURN) ++above;
    if (i > 0 && turn[i - 1] > SPARSE_CHORD_TURN) --above;
    if (2 * above < turns) continue;
    // The dihedrals next (noise fails here), then the median turn.
    dihedrals ??= dihedralsOf();
    if (!(concentration(dihedrals.dihedralCos, dihedrals.dihedralSin, i, i + quads) > 0.97)) continue;
    const w = turn.subarray(i, i + turns);
    const t = medianOf(w);
    if (!(t > SPARSE_CHORD_TURN && t < MAX_HELICAL_CHORD_TURN)) continue;
    sorted.set(w);
    sorted.sort();
    // Interquartile range (lower order statistics at 25% and 75%).
    if (sorted[Math.floor(0.75 * (turns - 1))] - sorted[Math.floor(0.25 * (turns - 1))] < 0.3) return i;
  }
  return -1;
}
