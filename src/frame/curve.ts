import { basisAt, locate, type SplineBasis } from "./bspline.js";

/** Quintic: six active basis functions per interval (local copy: imported bindings are slow in hot loops). */
const ORDER = 6;
const coefIndex = (basis: SplineBasis, i: number, j: number): number => (basis.periodic ? (i + j) % basis.K : i + j);

/**
 * Evaluates a spline space curve and its derivatives at u:
 * out[0..2] = r, out[3..5] = r', out[6..8] = r'', out[9..11] = r''' (derivatives in u).
 * `coef` holds x, y, z coefficient blocks of length K. No allocation: pass scratch arrays.
 */
export function evalCurve(
  basis: SplineBasis,
  coef: Float64Array,
  u: number,
  nd: number,
  out: Float64Array,
  scratchT: Float64Array = new Float64Array(1),
  scratchB: Float64Array = new Float64Array(24),
): Float64Array {
  const K = basis.K;
  const i = locate(basis, u, scratchT);
  basisAt(scratchT[0], basis.h, nd, scratchB);
  out.fill(0, 0, 3 * (nd + 1));
  for (let j = 0; j < ORDER; ++j) {
    const m = coefIndex(basis, i, j);
    const cx = coef[m], cy = coef[K + m], cz = coef[2 * K + m];
    for (let d = 0; d <= nd; ++d) {
      const b = scratchB[d * 6 + j];
      out[3 * d] += b * cx;
      out[3 * d + 1] += b * cy;
      out[3 * d + 2] += b * cz;
    }
  }
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
  const out = new Float64Array(12), st = new Float64Array(1), sb = new Float64Array(24);
  const sp = (x: number) => {
    evalCurve(basis, coef, x, 1, out, st, sb);
    return Math.hypot(out[3], out[4], out[5]);
  };
  for (let k = 0; k <= m; ++k) {
    u[k] = basis.u0 + k * du;
    // Stay inside the last interval at the far end of an open curve.
    speed[k] = sp(k === m && !basis.periodic ? u[k] - 1e-12 * basis.h : u[k]);
    if (k > 0) {
      const mid = u[k - 1] + du / 2;
      let acc = 0;
      for (let g = 0; g < 5; ++g) acc += GL_W[g] * sp(mid + (du / 2) * GL_X[g]);
      s[k] = s[k - 1] + (acc * du) / 2;
    }
  }
  return { u, s, speed, length: s[m] };
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
