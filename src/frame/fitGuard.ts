/**
 * The divergence guard of the geometry core: checks after every pass and on the final profile, so a
 * fit that went wrong stops with one line saying what and where instead of returning numbers
 * (NUMERICS.md sec. 7 item 2). Pure functions; they throw `InputError`.
 */
import { InputError } from "../errors.js";
import { PER_METRE, type Source, type Trace } from "../types.js";
import { medianInPlace, medianOf } from "./robustStart.js";
import { hypot3 } from "./hypot3.js";

/** A length in metres written in the unit of the source file (pixels: in pixels). */
export function describeLength(metres: number, source: Source): string {
  const [value, unit] = source.unit === "px"
    ? [metres / (source.pixelSize ?? 1), "px"]
    : [metres * PER_METRE[source.unit], source.unit];
  const v = Number(value.toPrecision(3));
  // Exponent form from a million on (1e17 nm, not 100000000000000000 nm).
  return `${Math.abs(v) >= 1e6 ? v.toExponential(2).replace(/\.?0+e/, "e") : v} ${unit}`;
}

/**
 * A wire declared closed must have ends that meet: the gap between the last and first kept points
 * may be at most 5 median steps or 2% of the polyline length. Refuses otherwise, naming the gap.
 * `say` turns a canonical length into words.
 */
export function checkClosable(y: Float64Array, medianStep: number, file: string, say: (d: number) => string): void {
  const n = y.length / 3;
  const gap = Math.hypot(y[3 * n - 3] - y[0], y[3 * n - 2] - y[1], y[3 * n - 1] - y[2]);
  let total = 0;
  for (let i = 1; i < n; ++i) total += hypot3(y[3 * i] - y[3 * i - 3], y[3 * i + 1] - y[3 * i - 2], y[3 * i + 2] - y[3 * i - 1]);
  if (gap <= Math.max(5 * medianStep, 0.02 * total)) return;
  throw new InputError(file, null, "closed",
    `the wire was declared closed but its ends are ${say(gap)} apart (${(gap / medianStep).toFixed(0)} sample steps, ${((100 * gap) / total).toFixed(0)}% of its length): fit it open (--open), or give a trace whose ends meet`);
}

/**
 * Ascending copy of v. Foot-point parameters are nearly in order (noise swaps neighbours only), so
 * an insertion sort costs O(n + swaps); past 8 moves per value (or at a NaN) it hands over to the
 * native sort. The same values as `v.slice().sort()` (a sorted array of numbers is unique).
 */
export function sortedCopy(v: Float64Array): Float64Array {
  const a = v.slice();
  const n = a.length;
  let budget = 8 * n;
  for (let i = 1; i < n; ++i) {
    const x = a[i];
    if (x !== x) return v.slice().sort(); // NaN: the native order (last)
    let j = i - 1;
    if (!(a[j] > x)) continue;
    while (j >= 0 && a[j] > x) { a[j + 1] = a[j]; --j; }
    a[j + 1] = x;
    budget -= i - j;
    if (budget < 0) return a.sort();
  }
  return a;
}

/**
 * The gaps between consecutive sorted parameters su (and the closing gap su[0] + length - su[n-1]
 * when closed), in one loop: found[0] = index of the first widest gap (NaN never wins), and the
 * positive gaps compacted in order into gaps[0 .. found[1]). One loop in a function of its own: a
 * loop the JIT compiles on the stack is not thrown away by a later loop of the same function.
 */
function positiveGaps(su: Float64Array, closed: boolean, length: number, gaps: Float64Array, found: Int32Array): void {
  const n = su.length, m = closed ? n : n - 1;
  let big = 0, bigGap = 0, pos = 0;
  for (let k = 0; k < m; ++k) {
    const g = k < n - 1 ? su[k + 1] - su[k] : length - su[n - 1] + su[0];
    if (k === 0) bigGap = g;
    else if (g > bigGap) { big = k; bigGap = g; }
    if (g > 0) gaps[pos++] = g;
  }
  found[0] = big; found[1] = pos;
}

/** What one pass produced, as the guard needs it (canonical units). */
export interface PassState {
  /** Fitted curve length. */
  readonly length: number;
  /** Parameter of each kept point (arc length of the fit). */
  readonly u: Float64Array;
  /** Distance of each kept point to the curve. */
  readonly resid: Float64Array;
  readonly sigma: number;
  readonly closed: boolean;
  readonly knotInterval: number;
}

/** Largest length ratio between the fit and the robust polyline before the fit counts as diverged. */
export const LENGTH_RATIO_LIMIT = 3;
/** Largest parameter gap, in median gaps, before the trace counts as broken. */
export const GAP_LIMIT = 25;

/**
 * Checks one pass: finite noise and length, fitted length within a factor 3 of the robust polyline
 * length, and no parameter gap longer than 25 median gaps (a stretch with no data the fit would
 * invent). `name(i)` names kept point i for the message ("row 12"). Throws on the first failure.
 * `cloudOrder` (Trace.cloudOrder, in the canonical units of `say`): the points were ordered from a cloud; a divergence then names
 * the cloud's thickness against its spacing instead of advising --format cloud.
 */
export function checkPass(state: PassState, referenceLength: number, file: string, name: (i: number) => string, say: (d: number) => string, cloudOrder?: Trace["cloudOrder"]): void {
  const { u, resid } = state;
  const n = u.length;
  const worst = () => {
    const idx = Array.from({ length: n }, (_, i) => i).sort((a, b) => resid[b] - resid[a]).slice(0, 3);
    return idx.map(name).join(", ");
  };
  if (!Number.isFinite(state.length) || !Number.isFinite(state.sigma) || !(state.length > 0)) {
    throw new InputError(file, null, "points", `the fit diverged (non-finite length or noise); the points farthest from it are ${worst()}`);
  }
  const ratio = state.length / referenceLength;
  if ((ratio > LENGTH_RATIO_LIMIT || ratio < 1 / LENGTH_RATIO_LIMIT) && cloudOrder !== undefined) {
    // the order came from the cloud orderer: "use --format cloud" would be no advice
    const { across, spacing } = cloudOrder;
    const thick = across > spacing
      ? `the cloud is thicker across the wire (median distance of the points from the orderer's path ${say(across)}) than its point spacing along it (median nearest-neighbour spacing ${say(spacing)}), so the ordered points zigzag across it: a tube or volume of points, not points along a centre line; reduce it to a centre-line trace, or give the tube surface as a mesh`
      : `the points lie a median ${say(across)} from the orderer's path (median nearest-neighbour spacing ${say(spacing)}); the points farthest from the fit are ${worst()}: check for stray points or a second wire in the cloud`;
    throw new InputError(file, null, "points",
      `the fit of the points ordered from the cloud diverged: its length is ${ratio.toPrecision(2)}x a robust polyline length of the trace (${say(referenceLength)}); ${thick}`);
  }
  if (ratio > LENGTH_RATIO_LIMIT || ratio < 1 / LENGTH_RATIO_LIMIT) {
    throw new InputError(file, null, "points",
      `the fit diverged: its length is ${ratio.toPrecision(2)}x a robust polyline length of the trace (${say(referenceLength)}); the points farthest from it are ${worst()}: check for stray points, or for unordered points use --format cloud`);
  }
  // Gaps between consecutive parameters (sorted copy: native typed-array sort), then the indices
  // of the widest gap only if it fails.
  const su = sortedCopy(u);
  const gaps = new Float64Array(state.closed ? n : n - 1);
  const found = new Int32Array(2);
  positiveGaps(su, state.closed, state.length, gaps, found);
  const big = found[0], pos = found[1];
  const widest = big < n - 1 ? su[big + 1] - su[big] : state.length - su[n - 1] + su[0];
  const med = medianInPlace(gaps, pos);
  if (med > 0 && widest > GAP_LIMIT * med && widest > 2 * state.knotInterval) {
    const ua = su[big], ub = su[(big + 1) % n];
    const a = u.indexOf(ua), b = u.indexOf(ub);
    throw new InputError(file, null, "points",
      `no points over ${say(widest)} of the wire between ${name(a)} and ${name(b)} (${(widest / med).toFixed(0)}x the median spacing): the fit would invent the wire there; trace it more evenly or split it at the gap`);
  }
}
