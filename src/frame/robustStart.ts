/**
 * The robust start of the geometry core (NUMERICS.md sec. 7, items 2 and 5): everything decided
 * before the first spline fit, from order statistics only, so one wild point cannot steer it.
 * Pure functions over interleaved xyz (any unit: every result is a ratio or in the input's unit).
 */
import { canonicalFrame } from "./canonicalFrame.js";
import { hypot3 } from "./hypot3.js";

/** k-th smallest of a[0..count) (0-based), reordering a in place so that a[0..k) <= a[k] <= a(k..count):
 * Hoare's selection (Hoare 1961, CACM 4:321, "Algorithm 65: find"), insertion sort below 16 values,
 * and above 600 values without NaN Floyd & Rivest's sampling bounds (1975, CACM 18:173, "Algorithm
 * 489: SELECT", from memory), about half the comparisons; the k-th smallest is the same value
 * whichever way it is found. O(count) expected. */
export function selectInPlace(a: Float64Array, count: number, k: number): number {
  if (count <= 16) {
    for (let i = 1; i < count; ++i) {
      const v = a[i];
      let j = i - 1;
      while (j >= 0 && a[j] > v) { a[j + 1] = a[j]; --j; }
      a[j + 1] = v;
    }
    return a[k];
  }
  if (count > 600 && !hasNaN(a, count)) {
    floydRivest(a, 0, count - 1, k);
    return a[k];
  }
  let lo = 0, hi = count - 1;
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1];
    let i = lo, j = hi;
    while (i <= j) {
      while (a[i] < pivot) ++i;
      while (a[j] > pivot) --j;
      if (i <= j) { const t = a[i]; a[i] = a[j]; a[j] = t; ++i; --j; }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else break;
  }
  return a[k];
}

function hasNaN(a: Float64Array, count: number): boolean {
  for (let i = 0; i < count; ++i) if (a[i] !== a[i]) return true;
  return false;
}

/** Floyd-Rivest selection of the k-th smallest in a[left..right] (no NaN), in place. */
function floydRivest(a: Float64Array, left: number, right: number, k: number): void {
  while (right > left) {
    if (right - left > 600) {
      // Recurse on a sample-sized range that holds the k-th smallest with high probability.
      const n = right - left + 1, m = k - left + 1;
      const z = Math.log(n), s = 0.5 * Math.exp((2 * z) / 3);
      const sd = 0.5 * Math.sqrt((z * s * (n - s)) / n) * (m - n / 2 < 0 ? -1 : 1);
      floydRivest(a, Math.max(left, Math.floor(k - (m * s) / n + sd)), Math.min(right, Math.floor(k + ((n - m) * s) / n + sd)), k);
    }
    const t = a[k];
    let i = left, j = right;
    let x = a[left]; a[left] = a[k]; a[k] = x;
    if (a[right] > t) { x = a[right]; a[right] = a[left]; a[left] = x; }
    while (i < j) {
      x = a[i]; a[i] = a[j]; a[j] = x;
      ++i; --j;
      while (a[i] < t) ++i;
      while (a[j] > t) --j;
    }
    if (a[left] === t) { x = a[left]; a[left] = a[j]; a[j] = x; }
    else { ++j; x = a[j]; a[j] = a[right]; a[right] = x; }
    if (j <= k) left = j + 1;
    if (k <= j) right = j - 1;
  }
}

/** Median of a[0..count), reordering a in place (the mean of the two middle values for an even count). */
export function medianInPlace(a: Float64Array, count = a.length): number {
  if (count === 0) return NaN;
  const hi = selectInPlace(a, count, count >> 1);
  if (count % 2) return hi;
  let lo = -Infinity;
  for (let i = 0; i < count >> 1; ++i) if (a[i] > lo) lo = a[i];
  return 0.5 * (lo + hi);
}

/**
 * Median of a[0..5) (not changed) by the 9-comparator sorting network for 5 inputs (Knuth, TAOCP
 * vol. 3, sec. 5.3.4, from memory; checked against a full sort in test/frame/speedInvariance.test.ts).
 * The same value as `medianInPlace(a, 5)`, without its insertion sort.
 */
export function median5(a: Float64Array): number {
  return median5Of(a[0], a[1], a[2], a[3], a[4]);
}

/** {@link median5} of five numbers. */
function median5Of(a0: number, a1: number, a2: number, a3: number, a4: number): number {
  let t: number;
  if (a0 > a1) { t = a0; a0 = a1; a1 = t; }
  if (a3 > a4) { t = a3; a3 = a4; a4 = t; }
  if (a2 > a4) { t = a2; a2 = a4; a4 = t; }
  if (a2 > a3) { t = a2; a2 = a3; a3 = t; }
  if (a0 > a3) { t = a0; a0 = a3; a3 = t; }
  if (a0 > a2) { t = a0; a0 = a2; a2 = t; }
  if (a1 > a4) { t = a1; a1 = a4; a4 = t; }
  if (a1 > a3) { t = a1; a1 = a3; a3 = t; }
  if (a1 > a2) { t = a1; a1 = a2; a2 = t; }
  return a2;
}

/**
 * Median of a[0..8) (not changed): the mean of the 4th and 5th smallest, as `medianInPlace(a, 8)`,
 * by Batcher's odd-even merge sorting network for 8 inputs (19 comparators; Batcher 1968, AFIPS
 * SJCC 32:307, from memory; checked against a full sort in test/frame/speedInvariance.test.ts).
 */
export function median8(a: Float64Array): number {
  let a0 = a[0], a1 = a[1], a2 = a[2], a3 = a[3], a4 = a[4], a5 = a[5], a6 = a[6], a7 = a[7], t: number;
  if (a0 > a1) { t = a0; a0 = a1; a1 = t; }
  if (a2 > a3) { t = a2; a2 = a3; a3 = t; }
  if (a4 > a5) { t = a4; a4 = a5; a5 = t; }
  if (a6 > a7) { t = a6; a6 = a7; a7 = t; }
  if (a0 > a2) { t = a0; a0 = a2; a2 = t; }
  if (a1 > a3) { t = a1; a1 = a3; a3 = t; }
  if (a4 > a6) { t = a4; a4 = a6; a6 = t; }
  if (a5 > a7) { t = a5; a5 = a7; a7 = t; }
  if (a1 > a2) { t = a1; a1 = a2; a2 = t; }
  if (a5 > a6) { t = a5; a5 = a6; a6 = t; }
  if (a0 > a4) { t = a0; a0 = a4; a4 = t; }
  if (a1 > a5) { t = a1; a1 = a5; a5 = t; }
  if (a2 > a6) { t = a2; a2 = a6; a6 = t; }
  if (a3 > a7) { t = a3; a3 = a7; a7 = t; }
  if (a2 > a4) { t = a2; a2 = a4; a4 = t; }
  if (a3 > a5) { t = a3; a3 = a5; a5 = t; }
  if (a1 > a2) { t = a1; a1 = a2; a2 = t; }
  if (a3 > a4) { t = a3; a3 = a4; a4 = t; }
  if (a5 > a6) { t = a5; a5 = a6; a6 = t; }
  return 0.5 * (a3 + a4);
}

/** Median of the first `count` values (the input is not changed; NaN for none). */
export function medianOf(values: ArrayLike<number>, count = values.length): number {
  if (count === 0) return NaN;
  const v = values instanceof Float64Array ? values.slice(0, count) : Float64Array.from({ length: count }, (_, i) => values[i]);
  return medianInPlace(v, count);
}

/** Distances between consecutive points (n - 1 values). */
export function stepLengths(y: Float64Array): Float64Array {
  const n = y.length / 3;
  const st = new Float64Array(Math.max(n - 1, 0));
  for (let i = 1; i < n; ++i) st[i - 1] = hypot3(y[3 * i] - y[3 * i - 3], y[3 * i + 1] - y[3 * i - 2], y[3 * i + 2] - y[3 * i - 1]);
  return st;
}

/** A trace moved to a canonical frame: centroid at 0, total chord length 1, principal axes. */
export interface CanonicalTrace {
  /** Points in the canonical frame (interleaved). */
  readonly y: Float64Array;
  /** Row-major rotation: canonical = Q (lab - centre) / scale. */
  readonly Q: Float64Array;
  readonly centre: readonly [number, number, number];
  /** Total chord length of the input (its unit), the length scale of the canonical frame. */
  readonly scale: number;
}

/**
 * Centres the points, scales them by the chord length and rotates them to principal axes (3D
 * only: planar traces keep their xy plane). Every later step is then equivariant under rigid
 * motions and independent of the input unit. Cost O(n).
 * Returns null when all points coincide (zero chord length).
 */
export function toCanonical(xyz: Float64Array, planar: boolean): CanonicalTrace | null {
  const n = xyz.length / 3;
  const [sx, sy, sz] = coordinateSums(xyz);
  const cx = sx / n, cy = sy / n, cz = sz / n;
  const chord = chordLength(xyz);
  if (!(chord > 0) || !Number.isFinite(chord)) return null;
  const y = centredScaled(xyz, cx, cy, cz, chord);
  const Q = planar ? Float64Array.of(1, 0, 0, 0, 1, 0, 0, 0, 1) : canonicalFrame(y);
  rotateInPlace(y, Q);
  return { y, Q, centre: [cx, cy, cz], scale: chord };
}

// The loops of toCanonical, one per function (the JIT compiles each alone); the same sums in the same order.
function coordinateSums(xyz: Float64Array): [number, number, number] {
  let cx = 0, cy = 0, cz = 0;
  for (let i = 0; i < xyz.length / 3; ++i) { cx += xyz[3 * i]; cy += xyz[3 * i + 1]; cz += xyz[3 * i + 2]; }
  return [cx, cy, cz];
}

function chordLength(xyz: Float64Array): number {
  let chord = 0;
  for (let i = 1; i < xyz.length / 3; ++i) chord += hypot3(xyz[3 * i] - xyz[3 * i - 3], xyz[3 * i + 1] - xyz[3 * i - 2], xyz[3 * i + 2] - xyz[3 * i - 1]);
  return chord;
}

function centredScaled(xyz: Float64Array, cx: number, cy: number, cz: number, chord: number): Float64Array {
  const y = new Float64Array(xyz.length);
  for (let i = 0; i < xyz.length / 3; ++i) {
    y[3 * i] = (xyz[3 * i] - cx) / chord;
    y[3 * i + 1] = (xyz[3 * i + 1] - cy) / chord;
    y[3 * i + 2] = (xyz[3 * i + 2] - cz) / chord;
  }
  return y;
}

function rotateInPlace(y: Float64Array, Q: Float64Array): void {
  for (let i = 0; i < y.length / 3; ++i) {
    const a = y[3 * i], b = y[3 * i + 1], c = y[3 * i + 2];
    y[3 * i] = Q[0] * a + Q[1] * b + Q[2] * c;
    y[3 * i + 1] = Q[3] * a + Q[4] * b + Q[5] * c;
    y[3 * i + 2] = Q[6] * a + Q[7] * b + Q[8] * c;
  }
}

/** Distance of each point to the coordinate-wise median of its +-4 neighbours (see grossOutliers). */
function neighbourhoodDistances(y: Float64Array, closed: boolean): Float64Array {
  const n = y.length / 3;
  const d = new Float64Array(n);
  const bx = new Float64Array(2 * OUTLIER_HALF), by = new Float64Array(2 * OUTLIER_HALF), bz = new Float64Array(2 * OUTLIER_HALF);
  for (let i = 0; i < n; ++i) {
    const half = closed ? Math.min(OUTLIER_HALF, (n - 1) >> 1) : Math.min(OUTLIER_HALF, i, n - 1 - i);
    let px: number, py: number, pz: number;
    if (half === 0) {
      const a = i === 0 ? 1 : n - 2, b = i === 0 ? 2 : n - 3;
      px = 2 * y[3 * a] - y[3 * b]; py = 2 * y[3 * a + 1] - y[3 * b + 1]; pz = 2 * y[3 * a + 2] - y[3 * b + 2];
    } else {
      let c = 0;
      if (half === OUTLIER_HALF && i >= OUTLIER_HALF && i + OUTLIER_HALF < n) {
        // Interior: the neighbours without wrapping, in the same order as below.
        for (let k = 1; k <= OUTLIER_HALF; ++k) {
          const a = 3 * (i - k), b = 3 * (i + k);
          bx[c] = y[a]; by[c] = y[a + 1]; bz[c] = y[a + 2]; ++c;
          bx[c] = y[b]; by[c] = y[b + 1]; bz[c] = y[b + 2]; ++c;
        }
      } else for (let k = 1; k <= half; ++k) {
        const a = closed ? (i - k + n) % n : i - k, b = closed ? (i + k) % n : i + k;
        bx[c] = y[3 * a]; by[c] = y[3 * a + 1]; bz[c] = y[3 * a + 2]; ++c;
        bx[c] = y[3 * b]; by[c] = y[3 * b + 1]; bz[c] = y[3 * b + 2]; ++c;
      }
      if (c === 8) { px = median8(bx); py = median8(by); pz = median8(bz); }
      else { px = medianInPlace(bx, c); py = medianInPlace(by, c); pz = medianInPlace(bz, c); }
    }
    d[i] = hypot3(y[3 * i] - px, y[3 * i + 1] - py, y[3 * i + 2] - pz);
  }
  return d;
}

/** Half-width of the neighbourhood used to judge each point. */
const OUTLIER_HALF = 4;
/** A point farther than this many robust scales from its neighbourhood's median is a gross outlier. */
const OUTLIER_CUT = 5;
/** Floor of the robust scale, as a fraction of the median step (NUMERICS.md sec. 7 item 2: 0.375). */
const OUTLIER_SCALE_FLOOR = 0.375;

/**
 * Gross outliers of an ordered trace, flagged before any parametrisation: the distance of each
 * point to the coordinate-wise median of its symmetric +-4 neighbours (truncated symmetrically at
 * open ends; the end points themselves are judged against the straight extrapolation of their two
 * neighbours), against a robust scale max(median distance, 0.375 x median step) (a Hampel-type
 * identifier: Hampel 1974, JASA 69:383; the running-median idea: Tukey 1977, "Exploratory Data
 * Analysis"). A point is flagged only when the detour it forces on the path agrees (see below), so
 * a long straight segment between exact points is not taken for outliers. Returns 1 for a kept
 * point, 0 for a gross outlier. Cost O(n). `medStep`: the median of `stepLengths(y)`, when the
 * caller has it (the same number).
 */
export function grossOutliers(y: Float64Array, closed: boolean, medStep?: number): Uint8Array {
  const n = y.length / 3;
  const keep = new Uint8Array(n).fill(1);
  if (n < 7) return keep;
  const d = neighbourhoodDistances(y, closed);
  const ms = medStep ?? medianOf(stepLengths(y));
  const scale = Math.max(medianInPlace(d.slice()), OUTLIER_SCALE_FLOOR * ms);
  if (!(scale > 0)) return keep;
  // Second opinion, from the path itself: the detour a point forces (see `detour`). A point on the
  // way (the start of a long straight segment, the far end of one) forces no detour and is kept
  // even where its neighbourhood median is far. Its scale comes from at most 20000 points spread
  // along the trace; only candidates are judged.
  const stride = Math.max(1, Math.ceil(n / 20_000));
  const sample = new Float64Array(Math.ceil(n / stride));
  sampleDetours(y, closed, stride, sample);
  const detourScale = Math.max(medianInPlace(sample), OUTLIER_SCALE_FLOOR * ms);
  flagOutliers(y, closed, d, OUTLIER_CUT * scale, detourScale, keep);
  return keep;
}

/** sample[c] = detour of point c * stride. */
function sampleDetours(y: Float64Array, closed: boolean, stride: number, sample: Float64Array): void {
  const n = y.length / 3;
  for (let i = 0, c = 0; i < n; i += stride) sample[c++] = detour(y, closed, i);
}

/** keep[i] = 0 for the candidates (d[i] above `cut`) whose detour confirms them (see grossOutliers). */
function flagOutliers(y: Float64Array, closed: boolean, d: Float64Array, cut: number, detourScale: number, keep: Uint8Array): void {
  const n = y.length / 3;
  const steps = new Float64Array(2 * OUTLIER_HALF);
  for (let i = 0; i < n; ++i) {
    if (!(d[i] > cut)) continue;
    const dt = detour(y, closed, i);
    // The detour is also judged against the local spacing: where the trace is sampled sparsely (a
    // coarse stretch after a dense one), every point's detour is large on the global scale, but a
    // point on the way of its neighbours forces a detour of a fraction of their step.
    if (dt > OUTLIER_CUT * detourScale && dt > OUTLIER_CUT * OUTLIER_SCALE_FLOOR * localStep(y, i, closed, steps)) keep[i] = 0;
  }
}

/** Distance between points a and b. */
function pointDistance(y: Float64Array, a: number, b: number): number {
  return hypot3(y[3 * a] - y[3 * b], y[3 * a + 1] - y[3 * b + 1], y[3 * a + 2] - y[3 * b + 2]);
}

/**
 * The detour point i forces on the path, |p_a p_i| + |p_i p_b| - |p_a p_b| with a, b its neighbours
 * (the smaller over +-1 and +-2, wrapped on a ring); an open end point's distance off the line
 * through its two neighbours (0 when it continues that line within 0.5 rad).
 */
function detour(y: Float64Array, closed: boolean, i: number): number {
  const n = y.length / 3;
  let best = Infinity;
  for (let k = 1; k <= 2; ++k) {
    const a = closed ? (i - k + n) % n : i - k, b = closed ? (i + k + n) % n : i + k;
    if (a < 0 || b >= n) continue;
    const v = pointDistance(y, a, i) + pointDistance(y, i, b) - pointDistance(y, a, b);
    if (v < best) best = v;
  }
  if (best !== Infinity) return best;
  const a = i === 0 ? 1 : n - 2, b = i === 0 ? 2 : n - 3;
  const ux = y[3 * a] - y[3 * b], uy = y[3 * a + 1] - y[3 * b + 1], uz = y[3 * a + 2] - y[3 * b + 2];
  const ul = hypot3(ux, uy, uz) || 1;
  const vx = y[3 * i] - y[3 * a], vy = y[3 * i + 1] - y[3 * a + 1], vz = y[3 * i + 2] - y[3 * a + 2];
  const perp = hypot3(vy * uz - vz * uy, vz * ux - vx * uz, vx * uy - vy * ux) / ul;
  // Along the line (within 0.5 rad) the end point continues the wire, however far it is.
  return perp > Math.sin(0.5) * hypot3(vx, vy, vz) ? perp : 0;
}

/**
 * Median step between consecutive neighbours of point i within +-4 (the two steps that touch i
 * left out, so a wild point does not set its own scale).
 */
function localStep(y: Float64Array, i: number, closed: boolean, buf: Float64Array): number {
  const n = y.length / 3;
  let c = 0;
  for (let k = -OUTLIER_HALF; k < OUTLIER_HALF; ++k) {
    if (k === -1 || k === 0) continue;
    let a = i + k, b = a + 1;
    if (closed) { a = (a + n) % n; b = (b + n) % n; } else if (a < 0 || b >= n) continue;
    buf[c++] = hypot3(y[3 * a] - y[3 * b], y[3 * a + 1] - y[3 * b + 1], y[3 * a + 2] - y[3 * b + 2]);
  }
  return c > 0 ? medianInPlace(buf, c) : 0;
}

/**
 * Running coordinate-wise median of +-half neighbours (truncated at open ends, wrapped on rings).
 * Cost O(n half log half).
 */
export function runningMedian(y: Float64Array, half: number, closed: boolean): Float64Array {
  const n = y.length / 3;
  if (half === 0) return y.slice();
  const out = new Float64Array(3 * n);
  const buf = new Float64Array(2 * half + 1);
  for (let i = 0; i < n; ++i) {
    const h = closed ? Math.min(half, (n - 1) >> 1) : Math.min(half, i, n - 1 - i);
    if (h === 2 && i >= 2 && i + 2 < n) {
      // Interior, +-2: the five values straight from y (the window needs no wrap here).
      for (let c = 0; c < 3; ++c) {
        const q = 3 * i + c;
        out[q] = median5Of(y[q - 6], y[q - 3], y[q], y[q + 3], y[q + 6]);
      }
      continue;
    }
    for (let c = 0; c < 3; ++c) {
      let m = 0;
      for (let k = -h; k <= h; ++k) {
        const j = closed ? (i + k + n) % n : i + k;
        buf[m++] = y[3 * j + c];
      }
      out[3 * i + c] = m === 5 ? median5(buf) : medianInPlace(buf, m);
    }
  }
  return out;
}

/**
 * Start parameter: cumulative chord length of the running median (+-2 points for 60 points or
 * more; raw points below, where a window would cut across the turns of a sparse trace). Chord
 * lengths of raw noisy points are mostly noise when the spacing is below the noise; a median,
 * unlike a mean, is not dragged by a wild point. Returns the parameters and the span (the ring's
 * closing chord included). Cost O(n).
 */
export function startParameter(y: Float64Array, closed: boolean): { u: Float64Array; span: number } {
  const n = y.length / 3;
  const sm = runningMedian(y, n >= 60 ? 2 : 0, closed);
  const u = new Float64Array(n);
  cumulativeChords(sm, u);
  const span = closed ? u[n - 1] + hypot3(sm[0] - sm[3 * n - 3], sm[1] - sm[3 * n - 2], sm[2] - sm[3 * n - 1]) : u[n - 1];
  return { u, span };
}

/** u[i] = u[i - 1] + |p_i - p_i-1| from u[0] (left as it is). */
function cumulativeChords(p: Float64Array, u: Float64Array): void {
  for (let i = 1; i < u.length; ++i) u[i] = u[i - 1] + hypot3(p[3 * i] - p[3 * i - 3], p[3 * i + 1] - p[3 * i - 2], p[3 * i + 2] - p[3 * i - 1]);
}

/**
 * A robust length of the wire for the divergence guard: the polyline through coordinate-wise
 * medians of consecutive blocks of b = max(1, floor(n / 100)) points (the block median averages
 * the noise away, the 100 blocks follow the shape). Cost O(n log b).
 */
export function referenceLength(y: Float64Array, closed: boolean): number {
  const n = y.length / 3;
  const b = Math.max(1, Math.floor(n / 100));
  const blocks = Math.floor(n / b);
  const pts = new Float64Array(3 * blocks);
  const buf = new Float64Array(b);
  for (let k = 0; k < blocks; ++k) {
    const end = k === blocks - 1 ? n : (k + 1) * b;
    for (let c = 0; c < 3; ++c) {
      let m = 0;
      const tmp = end - k * b > b ? new Float64Array(end - k * b) : buf;
      for (let i = k * b; i < end; ++i) tmp[m++] = y[3 * i + c];
      pts[3 * k + c] = medianInPlace(tmp, m);
    }
  }
  let len = 0;
  for (let k = 1; k < blocks; ++k) len += hypot3(pts[3 * k] - pts[3 * k - 3], pts[3 * k + 1] - pts[3 * k - 2], pts[3 * k + 2] - pts[3 * k - 1]);
  if (closed && blocks > 1) len += hypot3(pts[0] - pts[3 * blocks - 3], pts[1] - pts[3 * blocks - 2], pts[2] - pts[3 * blocks - 1]);
  return len;
}

/**
 * Noise level of an ordered trace without a fit: pseudo-residuals of a local cubic through the two
 * neighbours on each side, at parameters `u` (arc length: sampling-independent, uneven steps
 * allowed), projected on the plane normal to the local chord (the tangential part is absorbed by
 * the parametrisation), normalised by their variance factor 1 + sum w_k^2, and summarised by the
 * median of their squared norms (chi-square median: 1.386 for 2 normal directions, 0.455 for 1).
 * Difference-based noise estimation: Gasser, Sroka & Jennen-Steinmetz 1986, Biometrika 73:625;
 * Hall, Kay & Titterington 1990, Biometrika 77:521 (from memory). The cubic's bias is O(h^4 r'''')
 * (small unless the trace is sparse, where the shape misfit is counted as noise: an upper bound).
 * Returns sigma per coordinate, in the unit of y. Cost O(n).
 */
export function differenceNoise(y: Float64Array, u: Float64Array, normalDims: 1 | 2): number {
  const n = y.length / 3;
  if (n < 7) return NaN;
  const r2 = new Float64Array(n);
  const m = pseudoResiduals(y, u, r2);
  if (m < 5) return NaN;
  return Math.sqrt(medianInPlace(r2, m) / (normalDims === 2 ? 1.3863 : 0.4549));
}

/** The normalised squared pseudo-residuals of {@link differenceNoise} into r2; returns their count. */
function pseudoResiduals(y: Float64Array, u: Float64Array, r2: Float64Array): number {
  const n = y.length / 3;
  let m = 0;
  for (let i = 2; i < n - 2; ++i) {
    const t0 = u[i - 2], t1 = u[i - 1], t2 = u[i + 1], t3 = u[i + 2], x = u[i];
    if (!(t0 < t1 && t1 < x && x < t2 && t2 < t3)) continue;
    // Lagrange weights of the cubic through the four neighbours, evaluated at u_i (each a product
    // of three factors, left to right).
    const w0 = ((x - t1) / (t0 - t1)) * ((x - t2) / (t0 - t2)) * ((x - t3) / (t0 - t3));
    const w1 = ((x - t0) / (t1 - t0)) * ((x - t2) / (t1 - t2)) * ((x - t3) / (t1 - t3));
    const w2 = ((x - t0) / (t2 - t0)) * ((x - t1) / (t2 - t1)) * ((x - t3) / (t2 - t3));
    const w3 = ((x - t0) / (t3 - t0)) * ((x - t1) / (t3 - t1)) * ((x - t2) / (t3 - t2));
    const ia = 3 * (i - 2), ib = 3 * (i - 1), ic = 3 * (i + 1), id = 3 * (i + 2), ii = 3 * i;
    const e0 = -y[ii] + w0 * y[ia] + w1 * y[ib] + w2 * y[ic] + w3 * y[id];
    const e1 = -y[ii + 1] + w0 * y[ia + 1] + w1 * y[ib + 1] + w2 * y[ic + 1] + w3 * y[id + 1];
    const e2 = -y[ii + 2] + w0 * y[ia + 2] + w1 * y[ib + 2] + w2 * y[ic + 2] + w3 * y[id + 2];
    // Normal-plane part: remove the component along the chord through the neighbours.
    let tx = y[ic] - y[ib], ty = y[ic + 1] - y[ib + 1], tz = y[ic + 2] - y[ib + 2];
    const tl = hypot3(tx, ty, tz);
    if (!(tl > 0)) continue;
    tx /= tl; ty /= tl; tz /= tl;
    const along = e0 * tx + e1 * ty + e2 * tz;
    const f = 1 + w0 * w0 + w1 * w1 + w2 * w2 + w3 * w3;
    r2[m++] = (e0 * e0 + e1 * e1 + e2 * e2 - along * along) / f;
  }
  return m;
}

/** Where an ordered trace turns back along its own path. */
export interface Retrace {
  /** Index of the turning point. */
  readonly at: number;
  /** Points after it that run back over the path before it. */
  readonly count: number;
  /** The distance within which they lie on the earlier path (canonical units). */
  readonly within: number;
}

/**
 * The first place where the trace turns back along its own path (a traced skeleton walked out to a
 * dead end and back, or one file holding both directions of a wire), or null. A wire cannot
 * retrace itself: a fit would fold the path into a cusp and count the stretch twice.
 * With the tolerance `within`, the net progress per point and the k points of `selfWindow`: the
 * screen asks at each point i that the path goes somewhere on both sides (|p_i - p_i-k| and
 * |p_i+k - p_i| over half of k progresses) and comes back (|p_i+k - p_i-k| under half the shorter
 * of the two). Confirmation: of the points p_i+j (j <= k) farther than 2 tolerances from p_i (at
 * least 3 of them), 80% lie within the tolerance of an earlier point p_m (m < i) that is itself at
 * least half as far from p_i: on the way back, not merely near the turn; the turn is then placed
 * where p_i-k and p_i+k come closest. A real hairpin whose legs are farther apart than the
 * tolerance is kept. Cost O(n) for the screen, O(k^2) per candidate.
 */
export function findRetrace(y: Float64Array, closed: boolean, sigma: number, step: number, win = selfWindow(y, closed, sigma, step)): Retrace | null {
  if (!win) return null;
  const n = y.length / 3;
  const dist = (a: number, b: number) => wrappedDistance(y, closed, a, b);
  const { progress, within, k } = win;
  const first = closed ? 0 : k, last = closed ? n : n - k;
  for (let i = retraceScreen(y, closed, k, progress, first, last); i < last; i = retraceScreen(y, closed, k, progress, i + 1, last)) {
    let eligible = 0, hits = 0;
    for (let j = 1; j <= k; ++j) {
      const r = dist(i + j, i);
      if (r <= 2 * within) continue;
      ++eligible;
      const lo = closed ? i - 2 * k : Math.max(0, i - 2 * k);
      for (let m = lo; m < i; ++m) {
        if (dist(i + j, m) <= within && dist(m, i) >= 0.5 * r) { ++hits; break; }
      }
    }
    if (eligible < 3 || hits < 0.8 * eligible) continue;
    // The turn: where the points k before and k after come closest, within the next k points.
    for (let t = i + 1, stop = Math.min(i + k, last), best = dist(i + k, i - k); t < stop; ++t) {
      const e = dist(t + k, t - k);
      if (e < best) { best = e; i = t; }
    }
    // How far the path runs back: p_i+j near p_i-j (within k points of it), j = k + 1, ...
    let count = k;
    const near = (j: number) => {
      for (let m = i - j - k; m <= i - j + k; ++m) if ((closed || m >= 0) && dist(i + j, m) <= within) return true;
      return false;
    };
    while ((closed ? count < n / 2 : i + count + 1 < n && i - count - 1 >= 0) && near(count + 1)) ++count;
    return { at: i, count, within };
  }
  return null;
}

/** Window of the self-overlap checks (`selfWindow`). */
export interface SelfWindow { readonly progress: number; readonly within: number; readonly k: number }

/**
 * The window of the self-overlap checks: tolerance within = 4 noise SDs + 0.6 median steps; net
 * progress per point (the median chord over k0 points over k0, k0 doubled from 4 until that chord
 * exceeds 8 noise SDs: noise comparable to the step inflates the step); k points advancing 2
 * tolerances and 4 more points. Null when the trace cannot be judged: k above 200 (noise far above the progress per point), fewer than 2k + 1
 * points, or a tolerance above a quarter of the points' RMS distance from their centroid (wild
 * points: everything would be "near"; the fit's guards refuse such traces).
 */
export function selfWindow(y: Float64Array, closed: boolean, sigma: number, step: number): SelfWindow | null {
  const n = y.length / 3;
  if (!(step > 0)) return null;
  const sd = sigma > 0 ? sigma : 0;
  // Chords over k0 points, k0 doubled until the median chord stands above the noise (8 SDs).
  let k0 = 4, chord = 0;
  const chords = new Float64Array(n);
  for (;;) {
    const count = closed ? n : Math.max(0, n - k0);
    if (count < 5) return null;
    chordsOver(y, closed, k0, chords.subarray(0, count));
    chord = medianInPlace(chords, count);
    if (chord >= 8 * sd) break;
    if (4 * k0 > n) return null;
    k0 *= 2;
  }
  const progress = Math.min(step, chord / k0);
  if (!(progress > 0)) return null;
  const within = 4 * sd + 0.6 * step;
  const k = Math.max(4, Math.ceil((2 * within) / progress) + 4);
  return k > 200 || n < 2 * k + 1 || within > 0.25 * rmsRadius(y) ? null : { progress, within, k };
}

/** Where a 3D trace runs a second time along a stretch of its own path. */
export interface Overlap {
  /** Index where the second pass was found. */
  readonly at: number;
  /** Index of the nearest point of the first pass. */
  readonly other: number;
  /** Points from `at` on that lie on the other pass. */
  readonly count: number;
  /** Index of the last point of the other pass they were matched to. */
  readonly otherEnd: number;
  /** The distance within which they lie on it (canonical units). */
  readonly within: number;
}

/**
 * The first stretch where an ordered 3D trace runs along its own path a second time (a loop traced
 * twice, a file holding the same wire twice), in either direction, or null. Candidates: points
 * within the tolerance of `selfWindow` of a point more than 3k points away along the trace (a
 * spatial hash of cell size `within`, so O(n) for the search). Confirmation over the 2k + 1 points
 * around the candidate: 80% have a point of the other pass within the tolerance, and their offsets
 * from it, normal to the local tangent, have a mean under 3 sqrt(2) sigma / sqrt(count) + 0.05
 * steps (no systematic offset: the neighbouring turn of a coil is offset by its pitch) and an RMS
 * spread about that mean under 3 sqrt(2) sigma + 0.3 steps (runs together, does not cross), and
 * at least k points from the candidate on follow the other pass (`followPass`). Turns
 * of a coil closer than the noise can tell apart are taken for an overlap: refused, not misread.
 * The scan visits every k-th point: O(n k) at worst (a candidate at every visited point).
 */
export function findOverlap(y: Float64Array, closed: boolean, sigma: number, step: number, win = selfWindow(y, closed, sigma, step)): Overlap | null {
  const n = y.length / 3;
  if (!win) return null;
  const { within, k } = win;
  const sd = sigma > 0 ? sigma : 0;
  // A second pass is far along the trace and the path went away in between: where the sampling is
  // much denser than the median (30:1), 3k points advance less than the tolerance, and one dense
  // stretch was taken for two passes (rings, coils, knots sampled 30:1 were refused as overlaps).
  const far = (a: number, b: number) => indexGap(n, closed, a, b) > 3 * k && pathLeaves(y, closed, a, b, 4 * within, Math.max(1, k >> 1));
  const hash = spatialHash(y, within);
  // Confirmation needs the 2k + 1 points around a candidate on the repeated stretch: visiting every
  // k-th point finds any such stretch of 3k + 1 points or more.
  for (let i = closed ? 0 : k; i < (closed ? n : n - k); i += k) {
    const m = hash.nearest(i, within, (j) => far(i, j));
    if (m < 0) continue;
    const c = overlapStats(y, closed, i, m, k, within);
    const meanLimit = (3 * Math.SQRT2 * sd) / Math.sqrt(Math.max(1, c.count)) + 0.05 * step;
    const spreadLimit = 3 * Math.SQRT2 * sd + 0.3 * step;
    if (c.count >= 2 * k && c.hits >= 0.8 * c.count && c.meanOffset <= meanLimit && c.spread <= spreadLimit) {
      const f = followPass(y, closed, i, m, k, within);
      // ... and runs together beyond the tolerance ball: two strands crossing share only that ball
      // (Viviani's curve sampled 30:1, dense at its double point, was refused as an overlap).
      if (f.count >= k && wrappedDistance(y, closed, i, i + f.count - 1) > 4 * within) return { at: i, other: m, count: f.count, otherEnd: f.last, within };
    }
  }
  return null;
}

/**
 * How many points from `a` on follow the other pass (each within `within` of a point within 2k
 * indices of the previous partner, which then becomes the partner; up to k misses in a row), and
 * the last partner.
 */
function followPass(y: Float64Array, closed: boolean, a: number, m: number, k: number, within: number): { count: number; last: number } {
  const n = y.length / 3;
  let q = m, count = 0, misses = 0;
  for (let t = a; misses <= k && count + misses < n && (closed || t < n); ++t) {
    const b = nearestInRange(y, closed, t, q - 2 * k, q + 2 * k);
    if (b >= 0 && wrappedDistance(y, closed, t, b) <= within && indexGap(n, closed, b, t) > 2 * k) { count += misses + 1; misses = 0; q = b; }
    else ++misses;
  }
  return { count, last: q };
}

/** Index in [lo, hi] (wrapped on a ring, clamped otherwise) of the point nearest p_a, or -1. */
function nearestInRange(y: Float64Array, closed: boolean, a: number, lo: number, hi: number): number {
  const n = y.length / 3;
  if (!closed) { lo = Math.max(0, lo); hi = Math.min(n - 1, hi); }
  let best = -1, bestD = Infinity;
  for (let b = lo; b <= hi; ++b) {
    const d = wrappedDistance(y, closed, a, b);
    if (d < bestD) { bestD = d; best = closed ? ((b % n) + n) % n : b; }
  }
  return best;
}

/**
 * Offsets of the points i - k .. i + k from their nearest points of the other pass (searched within
 * 3k indices of m): how many were judged, how many lie within `within`, the length of the mean
 * offset normal to the local tangent, and the RMS spread of those offsets about their mean.
 */
function overlapStats(y: Float64Array, closed: boolean, i: number, m: number, k: number, within: number): { count: number; hits: number; meanOffset: number; spread: number } {
  const n = y.length / 3;
  const h = Math.max(1, Math.round(k / 4));
  let count = 0, hits = 0, mx = 0, my = 0, mz = 0, s2 = 0;
  const at = (j: number) => 3 * (closed ? ((j % n) + n) % n : j);
  for (let a = i - k; a <= i + k; ++a) {
    if (!closed && (a - h < 0 || a + h >= n)) continue;
    const b = nearestInRange(y, closed, a, m - 3 * k, m + 3 * k);
    if (b < 0) continue;
    const pa = at(a), pb = 3 * b, p1 = at(a + h), p0 = at(a - h);
    let tx = y[p1] - y[p0], ty = y[p1 + 1] - y[p0 + 1], tz = y[p1 + 2] - y[p0 + 2];
    const tl = hypot3(tx, ty, tz);
    if (!(tl > 0)) continue;
    tx /= tl; ty /= tl; tz /= tl;
    let ox = y[pa] - y[pb], oy = y[pa + 1] - y[pb + 1], oz = y[pa + 2] - y[pb + 2];
    if (hypot3(ox, oy, oz) <= within) ++hits;
    const along = ox * tx + oy * ty + oz * tz;
    ox -= along * tx; oy -= along * ty; oz -= along * tz;
    mx += ox; my += oy; mz += oz; s2 += ox * ox + oy * oy + oz * oz;
    ++count;
  }
  if (count === 0) return { count, hits, meanOffset: Infinity, spread: Infinity };
  mx /= count; my /= count; mz /= count;
  return { count, hits, meanOffset: hypot3(mx, my, mz), spread: Math.sqrt(Math.max(0, s2 / count - (mx * mx + my * my + mz * mz))) };
}

/**
 * A uniform grid of cell size h over the points, for nearest-point queries within h: cells hashed
 * into a power-of-two table with chains in typed arrays (no per-cell allocation).
 */
function spatialHash(y: Float64Array, h: number): { nearest(i: number, r: number, ok: (j: number) => boolean): number } {
  const n = y.length / 3, inv = 1 / h;
  let size = 1;
  while (size < 2 * n) size *= 2;
  const mask = size - 1;
  const head = new Int32Array(size).fill(-1), next = new Int32Array(n), cellOf = new Int32Array(3 * n);
  const slot = (cx: number, cy: number, cz: number) => (Math.imul(cx, 73856093) ^ Math.imul(cy, 19349663) ^ Math.imul(cz, 83492791)) & mask;
  for (let i = 0; i < n; ++i) {
    const cx = Math.floor(y[3 * i] * inv), cy = Math.floor(y[3 * i + 1] * inv), cz = Math.floor(y[3 * i + 2] * inv);
    cellOf[3 * i] = cx; cellOf[3 * i + 1] = cy; cellOf[3 * i + 2] = cz;
    const b = slot(cx, cy, cz);
    next[i] = head[b]; head[b] = i;
  }
  return {
    nearest(i, r, ok) {
      let best = -1, bestD = r;
      const cx = cellOf[3 * i], cy = cellOf[3 * i + 1], cz = cellOf[3 * i + 2];
      for (let dx = -1; dx <= 1; ++dx) for (let dy = -1; dy <= 1; ++dy) for (let dz = -1; dz <= 1; ++dz) {
        const ax = cx + dx, ay = cy + dy, az = cz + dz;
        for (let j = head[slot(ax, ay, az)]; j >= 0; j = next[j]) {
          if (cellOf[3 * j] !== ax || cellOf[3 * j + 1] !== ay || cellOf[3 * j + 2] !== az || !ok(j)) continue;
          const d = hypot3(y[3 * j] - y[3 * i], y[3 * j + 1] - y[3 * i + 1], y[3 * j + 2] - y[3 * i + 2]);
          if (d <= bestD) { bestD = d; best = j; }
        }
      }
      return best;
    },
  };
}

/** RMS distance of the points from their centroid. */
function rmsRadius(y: Float64Array): number {
  const n = y.length / 3;
  let cx = 0, cy = 0, cz = 0;
  for (let i = 0; i < n; ++i) { cx += y[3 * i]; cy += y[3 * i + 1]; cz += y[3 * i + 2]; }
  cx /= n; cy /= n; cz /= n;
  let s2 = 0;
  for (let i = 0; i < n; ++i) s2 += (y[3 * i] - cx) ** 2 + (y[3 * i + 1] - cy) ** 2 + (y[3 * i + 2] - cz) ** 2;
  return Math.sqrt(s2 / n);
}

/**
 * Whether the trace between points a and b (the shorter way round on a ring) goes farther than
 * `away` from p_a, looking at every `stride`-th point.
 */
function pathLeaves(y: Float64Array, closed: boolean, a: number, b: number, away: number, stride: number): boolean {
  const n = y.length / 3;
  let d = b - a;
  if (closed) { d = ((d % n) + n) % n; if (d > n / 2) d -= n; }
  const sign = d < 0 ? -1 : 1, len = Math.abs(d);
  for (let t = stride; t < len; t += stride) if (wrappedDistance(y, closed, a, a + sign * t) > away) return true;
  return false;
}

/** Number of steps between indices a and b (the shorter way round on a ring). */
function indexGap(n: number, closed: boolean, a: number, b: number): number {
  const d = Math.abs(a - b);
  return closed ? Math.min(d, n - d) : d;
}

/** Distance between points a and b, indices taken modulo n on a ring. */
function wrappedDistance(y: Float64Array, closed: boolean, a: number, b: number): number {
  const n = y.length / 3;
  const p = 3 * (closed ? ((a % n) + n) % n : a), q = 3 * (closed ? ((b % n) + n) % n : b);
  return hypot3(y[p] - y[q], y[p + 1] - y[q + 1], y[p + 2] - y[q + 2]);
}

/** chords[i] = |p_i+k0 - p_i| (wrapped on a ring). */
function chordsOver(y: Float64Array, closed: boolean, k0: number, chords: Float64Array): void {
  const n = y.length / 3;
  for (let i = 0; i < chords.length; ++i) {
    const p = 3 * i, q = 3 * (closed && i + k0 >= n ? i + k0 - n : i + k0);
    chords[i] = hypot3(y[q] - y[p], y[q + 1] - y[p + 1], y[q + 2] - y[p + 2]);
  }
}

/**
 * The first i in [from, last) that passes the screen of `findRetrace` (the path goes somewhere on
 * both sides of p_i over k points and comes back), or `last`.
 */
function retraceScreen(y: Float64Array, closed: boolean, k: number, progress: number, from: number, last: number): number {
  for (let i = from; i < last; ++i) {
    const a = wrappedDistance(y, closed, i, i - k), b = wrappedDistance(y, closed, i + k, i);
    if (a < 0.5 * k * progress || b < 0.5 * k * progress || wrappedDistance(y, closed, i + k, i - k) > 0.5 * Math.min(a, b)) continue;
    return i;
  }
  return last;
}
