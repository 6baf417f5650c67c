import { PIECES, type SplineBasis } from "./bspline.js";
import { hypot3 } from "./hypot3.js";

/** Quintic: six active basis functions per interval (local copy: imported bindings are slow in hot loops). */
const ORDER = 6;

/**
 * Evaluates a spline space curve and its derivatives at u:
 * out[0..2] = r, out[3..5] = r', out[6..8] = r'', out[9..11] = r''' (derivatives in u).
 * `coef` holds x, y, z coefficient blocks of length K. No allocation; the scratch arguments are
 * optional (scratchT[0] receives the local coordinate in the knot interval).
 */
export function evalCurve(
  basis: SplineBasis,
  coef: Float64Array,
  u: number,
  nd: number,
  out: Float64Array,
  scratchT?: Float64Array,
  scratchB?: Float64Array,
): Float64Array {
  // locate() and basisAt() inlined with the same arithmetic (bit-identical), summing straight into
  // twelve locals; scratchB is no longer used (kept for callers).
  void scratchB;
  const K = basis.K, h = basis.h, nseg = basis.nseg;
  let x = (u - basis.u0) / h;
  let i: number;
  if (basis.periodic) {
    x -= Math.floor(x / nseg) * nseg;
    i = Math.floor(x);
    if (i >= nseg) i = nseg - 1;
  } else {
    i = Math.floor(x);
    if (i < 0) i = 0;
    else if (i >= nseg) i = nseg - 1;
  }
  const t = x - i;
  if (scratchT) scratchT[0] = t;
  const t2 = t * t, t3 = t2 * t, t4 = t3 * t, t5 = t4 * t;
  const ih = 1 / h;
  const wrap = basis.periodic && i + ORDER > K;
  const P = PIECES;
  let p0 = 0, p1 = 0, p2 = 0, a0 = 0, a1 = 0, a2 = 0, b0 = 0, b1 = 0, b2 = 0, c0 = 0, c1 = 0, c2 = 0;
  for (let j = 0; j < ORDER; ++j) {
    const m = wrap ? (i + j) % K : i + j;
    const cx = coef[m], cy = coef[K + m], cz = coef[2 * K + m];
    const q0 = P[j * 6], q1 = P[j * 6 + 1], q2 = P[j * 6 + 2], q3 = P[j * 6 + 3], q4 = P[j * 6 + 4], q5 = P[j * 6 + 5];
    const v0 = q0 + q1 * t + q2 * t2 + q3 * t3 + q4 * t4 + q5 * t5;
    p0 += v0 * cx; p1 += v0 * cy; p2 += v0 * cz;
    if (nd >= 1) {
      const v1 = (q1 + 2 * q2 * t + 3 * q3 * t2 + 4 * q4 * t3 + 5 * q5 * t4) * ih;
      a0 += v1 * cx; a1 += v1 * cy; a2 += v1 * cz;
      if (nd >= 2) {
        const v2 = (2 * q2 + 6 * q3 * t + 12 * q4 * t2 + 20 * q5 * t3) * ih * ih;
        b0 += v2 * cx; b1 += v2 * cy; b2 += v2 * cz;
        if (nd >= 3) {
          const v3 = (6 * q3 + 24 * q4 * t + 60 * q5 * t2) * ih * ih * ih;
          c0 += v3 * cx; c1 += v3 * cy; c2 += v3 * cz;
        }
      }
    }
  }
  out[0] = p0; out[1] = p1; out[2] = p2;
  if (nd >= 1) { out[3] = a0; out[4] = a1; out[5] = a2; }
  if (nd >= 2) { out[6] = b0; out[7] = b1; out[8] = b2; }
  if (nd >= 3) { out[9] = c0; out[10] = c1; out[11] = c2; }
  return out;
}

/**
 * Curvature and torsion from the first three derivatives at one point:
 * kappa = |r' x r''| / |r'|^3, tau = (r' x r'') . r''' / |r' x r''|^2 (do Carmo, "Differential Geometry of
 * Curves and Surfaces", 1976, sec. 1-5, exercise 12), with B' = -tau N so a right-handed helix has tau > 0.
 * Writes out[0] = kappa, out[1] = tau (NaN when r' x r'' = 0), out[2..4] = curvature vector
 * (the derivative of T in arc length, = kappa N). Units: 1 / (units of r).
 */
export function kappaTau(d: Float64Array, out: Float64Array): Float64Array {
  const ax = d[3], ay = d[4], az = d[5];
  const bx = d[6], by = d[7], bz = d[8];
  const cx = ay * bz - az * by, cy = az * bx - ax * bz, cz = ax * by - ay * bx;
  const c2 = cx * cx + cy * cy + cz * cz;
  const a2 = ax * ax + ay * ay + az * az;
  const a = Math.sqrt(a2);
  out[0] = Math.sqrt(c2) / (a2 * a);
  out[1] = c2 > 0 ? (cx * d[9] + cy * d[10] + cz * d[11]) / c2 : NaN;
  // kappa N = (r' x r'') x r' / |r'|^4
  const inv = 1 / (a2 * a2);
  out[2] = (cy * az - cz * ay) * inv;
  out[3] = (cz * ax - cx * az) * inv;
  out[4] = (cx * ay - cy * ax) * inv;
  return out;
}

/**
 * Arc-length table of the curve: s at `per` points per knot interval (plus the end), by 5-point
 * Gauss-Legendre quadrature of |r'| (Abramowitz & Stegun 25.4.29), and |r'| at the same points so that
 * s(u) can be interpolated by cubic Hermite pieces. Cost O(nseg * per).
 */
export interface ArcTable {
  readonly u: Float64Array;
  readonly s: Float64Array;
  readonly speed: Float64Array;
  readonly length: number;
}

const GL_X = [-0.906179845938664, -0.5384693101056831, 0, 0.5384693101056831, 0.906179845938664];
const GL_W = [0.2369268850561891, 0.4786286704993665, 0.5688888888888889, 0.4786286704993665, 0.2369268850561891];

export function arcTable(basis: SplineBasis, coef: Float64Array, per = 4): ArcTable {
  const m = basis.nseg * per;
  const u = new Float64Array(m + 1), s = new Float64Array(m + 1), speed = new Float64Array(m + 1);
  const du = basis.h / per;
  const out = new Float64Array(12);
  arcLoop(basis, coef, u, s, speed, du, out);
  return { u, s, speed, length: s[m] };
}

/** |r'(x)| (out: scratch of 12). A top-level function: a closure made per call defeated the JIT's
 * inlining on every later call (a new call target each time). */
function speedAt(basis: SplineBasis, coef: Float64Array, x: number, out: Float64Array): number {
  evalCurve(basis, coef, x, 1, out);
  return hypot3(out[3], out[4], out[5]);
}

/** The loop of {@link arcTable}. */
function arcLoop(basis: SplineBasis, coef: Float64Array, u: Float64Array, s: Float64Array, speed: Float64Array, du: number, out: Float64Array): void {
  const m = u.length - 1;
  for (let k = 0; k <= m; ++k) {
    u[k] = basis.u0 + k * du;
    // Stay inside the last interval at the far end of an open curve.
    speed[k] = speedAt(basis, coef, k === m && !basis.periodic ? u[k] - 1e-12 * basis.h : u[k], out);
    if (k > 0) {
      const mid = u[k - 1] + du / 2;
      let acc = 0;
      for (let g = 0; g < 5; ++g) acc += GL_W[g] * speedAt(basis, coef, mid + (du / 2) * GL_X[g], out);
      s[k] = s[k - 1] + (acc * du) / 2;
    }
  }
}

/** s(u) from an arc table by cubic Hermite interpolation (periodic tables wrap u). */
export function arcAt(t: ArcTable, x: number, periodic: boolean): number {
  const m = t.u.length - 1;
  const u0 = t.u[0], du = t.u[1] - t.u[0];
  const span = m * du;
  let wraps = 0;
  if (periodic) {
    wraps = Math.floor((x - u0) / span);
    x -= wraps * span;
  }
  let k = Math.floor((x - u0) / du);
  if (k < 0) k = 0;
  else if (k >= m) k = m - 1;
  const h = (x - t.u[k]) / du;
  const h2 = h * h, h3 = h2 * h;
  const s = (2 * h3 - 3 * h2 + 1) * t.s[k] + (h3 - 2 * h2 + h) * du * t.speed[k]
    + (-2 * h3 + 3 * h2) * t.s[k + 1] + (h3 - h2) * du * t.speed[k + 1];
  return s + (periodic ? wraps * t.length : 0);
}

/** Inverse of arcAt: u with s(u) = target, by bisection on the table then Newton steps. */
export function uAtArc(basis: SplineBasis, coef: Float64Array, t: ArcTable, target: number): number {
  const m = t.u.length - 1;
  let lo = 0, hi = m;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (t.s[mid] <= target) lo = mid;
    else hi = mid;
  }
  const span = t.s[hi] - t.s[lo];
  let x = t.u[lo] + (span > 0 ? (target - t.s[lo]) / span : 0) * (t.u[hi] - t.u[lo]);
  for (let it = 0; it < 3; ++it) {
    const sp = t.speed[lo] + ((x - t.u[lo]) / (t.u[hi] - t.u[lo])) * (t.speed[hi] - t.speed[lo]);
    if (!(sp > 0)) break;
    x -= (arcAt(t, x, basis.periodic) - target) / sp;
  }
  return x;
}
