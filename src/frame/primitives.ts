/**
 * Exact primitive fits of a stretch: a straight line, a circle in 3D (free plane) and a circular
 * helix (free axis, radius, pitch and handedness), by orthogonal-distance least squares on the
 * input points, with 95% intervals and a goodness-of-fit test against the noise level.
 *
 * Method. The line is the principal axis of the points (orthogonal regression, closed form). The
 * circle and the helix are fitted by Levenberg-Marquardt (Marquardt, J. SIAM 11, 431 (1963)) with
 * variable projection of the foot points: the residual of point i is the vector from its nearest
 * point on the primitive to the point, with the nearest point re-solved at every parameter value
 * (Newton in the curve parameter), so each point carries two residual components (the one along the
 * tangent is zero) and the fit has 2n - p degrees of freedom. The Jacobian is by central
 * differences. The points must be in order along the wire, less than half a turn apart (the foot
 * parameters are unwrapped from point to point). Everything is computed in a frame centred on the points and scaled by their RMS
 * spread, so the fits are unit-free and equivariant under rigid motions.
 * Intervals: covariance s^2 (J^T J)^-1 with s^2 = SSR / (2n - p) (the residual noise), derived
 * quantities by the delta method, 95% intervals with Student's t quantile on 2n - p degrees of
 * freedom (Seber & Wild, Nonlinear Regression (1989), ch. 5; cited from memory).
 * Helix: r(t) = C + R cos t u + R sin t v + c t a, (u, v, a) right-handed, R > 0; c > 0 is a
 * right-handed helix. kappa = R / (R^2 + c^2), tau = c / (R^2 + c^2) (B' = -tau N), pitch 2 pi |c|
 * (do Carmo, Differential Geometry of Curves and Surfaces (1976), sec. 1-5; from memory).
 * Lengths in metres, curvatures in 1/m.
 */
import { symEigen3 } from "./symEigen3.js";

export type PrimitiveKind = "line" | "circle" | "helix";

/** A value with its 95% interval. */
export interface Estimate {
  readonly value: number;
  readonly lo: number;
  readonly hi: number;
}

/** Result of a primitive fit; lengths in m, curvatures in 1/m, unit vectors dimensionless. */
export interface PrimitiveFit {
  readonly kind: PrimitiveKind;
  /** Number of points fitted. */
  readonly n: number;
  /** Residual degrees of freedom, 2n - p. */
  readonly dof: number;
  /** RMS of the orthogonal residual per coordinate direction, sqrt(SSR / dof) (m). */
  readonly rms: number;
  /** Sum of squared orthogonal distances (m^2). */
  readonly ssr: number;
  /** Axis (helix), plane normal (circle) or direction (line); unit vector. */
  readonly axis: readonly [number, number, number];
  /** 95% half-angle of the axis direction (rad). */
  readonly axisAngle95: number;
  /** A point on the axis (helix), the centre (circle) or the centroid (line) (m). */
  readonly centre: readonly [number, number, number];
  /** Radius (m): NaN for a line. */
  readonly radius: Estimate;
  /** Rise per radian c (m), signed (c > 0: right-handed); 0 for a circle, NaN for a line. */
  readonly rise: Estimate;
  /** Pitch 2 pi |c| (m). */
  readonly pitch: Estimate;
  /** +1 right-handed, -1 left-handed, 0 for a circle or line. */
  readonly handedness: -1 | 0 | 1;
  readonly kappa: Estimate;
  /** Torsion (1/m); NaN for a line (undefined). */
  readonly tau: Estimate;
  /** Curve parameter of each point's foot (helix/circle: angle in rad; line: distance along it in m). */
  readonly t: Float64Array;
}

/** Verdict of `checkFit`. */
export interface FitCheck {
  /** "confirmed": consistent with the noise; "rejected": the shape does not fit; "untested": no noise level. */
  readonly verdict: "confirmed" | "rejected" | "untested";
  /** chi-square SSR / sigma^2 and its degrees of freedom. */
  readonly chi2: number;
  readonly dof: number;
  /** RMS residual over the noise SD. */
  readonly ratio: number;
  /** One line saying why. */
  readonly reason: string;
}

const NAN_EST: Estimate = { value: NaN, lo: NaN, hi: NaN };

/**
 * Two-sided 95% quantile of Student's t with nu degrees of freedom (Cornish-Fisher expansion about
 * the normal quantile 1.959964; Abramowitz & Stegun 26.7.5, from memory). Accurate to ~1e-3 for
 * nu >= 3.
 */
export function t95(nu: number): number {
  const z = 1.959963984540054;
  if (!(nu > 0)) return NaN;
  const z3 = z ** 3, z5 = z ** 5, z7 = z ** 7;
  return z + (z3 + z) / (4 * nu) + (5 * z5 + 16 * z3 + 3 * z) / (96 * nu * nu) + (3 * z7 + 19 * z5 + 17 * z3 - 15 * z) / (384 * nu ** 3);
}

interface Normalised {
  readonly n: number;
  readonly p: Float64Array; // centred and scaled points
  readonly c: [number, number, number];
  readonly L: number;
}

function normalise(xyz: ArrayLike<number>, caller: string): Normalised {
  const n = Math.floor(xyz.length / 3);
  const c: [number, number, number] = [0, 0, 0];
  for (let i = 0; i < n; ++i) for (let k = 0; k < 3; ++k) c[k] += xyz[3 * i + k] / n;
  let ss = 0;
  for (let i = 0; i < n; ++i) for (let k = 0; k < 3; ++k) ss += (xyz[3 * i + k] - c[k]) ** 2;
  const L = Math.sqrt(ss / Math.max(1, n));
  const size = Math.max(Math.abs(c[0]), Math.abs(c[1]), Math.abs(c[2]));
  if (!(L > 1e-12 * size) || !Number.isFinite(L)) throw new RangeError(`${caller}: the points must be finite and not all equal`);
  const p = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) for (let k = 0; k < 3; ++k) p[3 * i + k] = (xyz[3 * i + k] - c[k]) / L;
  return { n, p, c, L };
}

/** Scatter matrix sum (p - mean)(p - mean)^T of n interleaved points (about 0 unless `centred`), row-major. */
export function scatter(p: Float64Array, n: number, centred: boolean): Float64Array {
  const m = new Float64Array(9);
  let mx = 0, my = 0, mz = 0;
  if (centred) {
    for (let i = 0; i < n; ++i) { mx += p[3 * i]; my += p[3 * i + 1]; mz += p[3 * i + 2]; }
    mx /= n; my /= n; mz /= n;
  }
  for (let i = 0; i < n; ++i) {
    const x = p[3 * i] - mx, y = p[3 * i + 1] - my, z = p[3 * i + 2] - mz;
    m[0] += x * x; m[1] += x * y; m[2] += x * z; m[4] += y * y; m[5] += y * z; m[8] += z * z;
  }
  m[3] = m[1]; m[6] = m[2]; m[7] = m[5];
  return m;
}

/**
 * Straight line through the points by orthogonal regression (principal axis of the scatter
 * matrix; Pearson 1901, closed form). Needs n >= 3.
 * @example fitLine(Float64Array.of(0,0,0, 1,0,0, 2,0,0)).axis // [1, 0, 0] (up to sign)
 */
export function fitLine(xyz: ArrayLike<number>): PrimitiveFit {
  const { n, p, c, L } = normalise(xyz, "fitLine");
  if (n < 3) throw new RangeError(`fitLine: needs at least 3 points (got ${n})`);
  const { values, vectors } = symEigen3(scatter(p, n, false));
  const d: [number, number, number] = [vectors[6], vectors[7], vectors[8]];
  const ssr = (values[0] + values[1]) * L * L;
  const dof = 2 * n - 4;
  const s2 = ssr / Math.max(1, dof);
  const t = new Float64Array(n);
  let stt = 0;
  for (let i = 0; i < n; ++i) { t[i] = (p[3 * i] * d[0] + p[3 * i + 1] * d[1] + p[3 * i + 2] * d[2]) * L; stt += t[i] * t[i]; }
  // direction: each transverse component has variance s^2 / sum t^2
  const angle = t95(dof) * Math.sqrt((2 * s2) / stt);
  return {
    kind: "line", n, dof, rms: Math.sqrt(s2), ssr, axis: d, axisAngle95: angle, centre: c,
    radius: NAN_EST, rise: NAN_EST, pitch: NAN_EST, handedness: 0, kappa: { value: 0, lo: 0, hi: 0 }, tau: NAN_EST, t,
  };
}

/** Orthonormal (e1, e2) perpendicular to unit a, continuous in a near a fixed reference. */
function perp(a: ArrayLike<number>): [number[], number[]] {
  const ax = Math.abs(a[0]), ay = Math.abs(a[1]), az = Math.abs(a[2]);
  const r = ax <= ay && ax <= az ? [1, 0, 0] : ay <= az ? [0, 1, 0] : [0, 0, 1];
  const d = r[0] * a[0] + r[1] * a[1] + r[2] * a[2];
  let e1 = [r[0] - d * a[0], r[1] - d * a[1], r[2] - d * a[2]];
  const l = Math.hypot(e1[0], e1[1], e1[2]);
  e1 = [e1[0] / l, e1[1] / l, e1[2] / l];
  const e2 = [a[1] * e1[2] - a[2] * e1[1], a[2] * e1[0] - a[0] * e1[2], a[0] * e1[1] - a[1] * e1[0]];
  return [e1, e2];
}

/** Current geometry of a helix/circle: base axis a0 with (e1, e2), base centre C0. */
interface Base { a: number[]; e1: number[]; e2: number[]; C: number[] }

/** theta = [w1, w2, q1, q2, q3, R, c]: axis a0 + w1 e1 + w2 e2 (normalised), centre C0 + q1 e1 + q2 e2 + q3 a0. */
function geometry(base: Base, th: Float64Array): { a: number[]; u: number[]; v: number[]; C: number[]; R: number; c: number } {
  const { a: a0, e1, e2, C: C0 } = base;
  let a = [a0[0] + th[0] * e1[0] + th[1] * e2[0], a0[1] + th[0] * e1[1] + th[1] * e2[1], a0[2] + th[0] * e1[2] + th[1] * e2[2]];
  const la = Math.hypot(a[0], a[1], a[2]);
  a = [a[0] / la, a[1] / la, a[2] / la];
  // u: e1 made perpendicular to a (smooth in theta); v = a x u
  const d = e1[0] * a[0] + e1[1] * a[1] + e1[2] * a[2];
  let u = [e1[0] - d * a[0], e1[1] - d * a[1], e1[2] - d * a[2]];
  const lu = Math.hypot(u[0], u[1], u[2]);
  u = [u[0] / lu, u[1] / lu, u[2] / lu];
  const v = [a[1] * u[2] - a[2] * u[1], a[2] * u[0] - a[0] * u[2], a[0] * u[1] - a[1] * u[0]];
  const C = [0, 1, 2].map((k) => C0[k] + th[2] * e1[k] + th[3] * e2[k] + th[4] * a0[k]);
  return { a, u, v, C, R: Math.abs(th[5]), c: th[6] };
}

/**
 * Foot points and residual vectors of the points on the helix (circle when c = 0).
 * `t` holds the foot parameters (in/out: previous values are not needed).
 */
function residuals(p: Float64Array, n: number, base: Base, th: Float64Array, out: Float64Array, t: Float64Array): number {
  const { a, u, v, C, R, c } = geometry(base, th);
  let ssr = 0;
  for (let i = 0; i < n; ++i) {
    const dx = p[3 * i] - C[0], dy = p[3 * i + 1] - C[1], dz = p[3 * i + 2] - C[2];
    const X = dx * u[0] + dy * u[1] + dz * u[2], Y = dx * v[0] + dy * v[1] + dz * v[2], Z = dx * a[0] + dy * a[1] + dz * a[2];
    const phi = Math.atan2(Y, X);
    // Branch of the angle: the first point's from its height, every later one continues from the
    // previous point's (the points are ordered along the wire, less than half a turn apart), so a
    // tightly wound helix cannot pose as a cylinder by sending each point to another winding.
    let s = phi;
    if (c !== 0) s = phi + 2 * Math.PI * Math.round(((i === 0 ? Z / c : t[i - 1]) - phi) / (2 * Math.PI));
    // Newton on g(s) = R X sin s - R Y cos s - c Z + c^2 s (half the derivative of the squared distance)
    for (let it = 0; it < 30 && c !== 0; ++it) {
      const sn = Math.sin(s), cs = Math.cos(s);
      const g = R * X * sn - R * Y * cs - c * Z + c * c * s;
      let h = R * X * cs + R * Y * sn + c * c;
      if (h <= 0.5 * c * c) h = Math.max(0.5 * c * c, R * Math.hypot(X, Y) + c * c);
      const step = g / h;
      s -= step;
      if (Math.abs(step) < 1e-15 * (1 + Math.abs(s))) break;
    }
    t[i] = s;
    const hx = R * Math.cos(s), hy = R * Math.sin(s), hz = c * s;
    const rx = X - hx, ry = Y - hy, rz = Z - hz;
    out[3 * i] = rx; out[3 * i + 1] = ry; out[3 * i + 2] = rz;
    ssr += rx * rx + ry * ry + rz * rz;
  }
  return ssr;
}

/** Solve the small dense system A x = b (Gaussian elimination with partial pivoting); null when singular. */
function solve(A: Float64Array, b: Float64Array, m: number): Float64Array | null {
  const M = Float64Array.from(A), x = Float64Array.from(b);
  for (let k = 0; k < m; ++k) {
    let piv = k;
    for (let i = k + 1; i < m; ++i) if (Math.abs(M[i * m + k]) > Math.abs(M[piv * m + k])) piv = i;
    if (!(Math.abs(M[piv * m + k]) > 0)) return null;
    if (piv !== k) {
      for (let j = 0; j < m; ++j) { const tmp = M[k * m + j]; M[k * m + j] = M[piv * m + j]; M[piv * m + j] = tmp; }
      const tmp = x[k]; x[k] = x[piv]; x[piv] = tmp;
    }
    for (let i = k + 1; i < m; ++i) {
      const f = M[i * m + k] / M[k * m + k];
      if (f === 0) continue;
      for (let j = k; j < m; ++j) M[i * m + j] -= f * M[k * m + j];
      x[i] -= f * x[k];
    }
  }
  for (let k = m - 1; k >= 0; --k) {
    let sum = x[k];
    for (let j = k + 1; j < m; ++j) sum -= M[k * m + j] * x[j];
    x[k] = sum / M[k * m + k];
  }
  return x;
}

/** Inverse of a small dense matrix (column by column); null when singular. */
export function inverseSmall(A: Float64Array, m: number): Float64Array | null {
  const inv = new Float64Array(m * m);
  for (let j = 0; j < m; ++j) {
    const e = new Float64Array(m);
    e[j] = 1;
    const x = solve(A, e, m);
    if (x === null) return null;
    for (let i = 0; i < m; ++i) inv[i * m + j] = x[i];
  }
  return inv;
}

/** Free parameters of the two models (indices into the 7-vector theta). */
// The reference direction u (hence the rotation about the axis) is pinned by e1; a screw motion is
// absorbed by the foot parameters, so the shift along the axis carries the helix's phase: 7 parameters.
const FREE_HELIX = [0, 1, 2, 3, 4, 5, 6];
const FREE_CIRCLE = [0, 1, 2, 3, 4, 5]; // c = 0: a rotation about the normal is absorbed by the phases

interface LmResult { base: Base; th: Float64Array; ssr: number; J: Float64Array; r: Float64Array; t: Float64Array }

/** Levenberg-Marquardt from a start; the base is re-centred on every accepted step. */
function levenberg(p: Float64Array, n: number, start: Base, th0: Float64Array, free: readonly number[], maxIter = 100): LmResult {
  const m = free.length, N = 3 * n;
  let base = start;
  const th = Float64Array.from(th0);
  const r = new Float64Array(N), rt = new Float64Array(N), t = new Float64Array(n), tt = new Float64Array(n);
  const J = new Float64Array(N * m), rp = new Float64Array(N), rm = new Float64Array(N);
  let ssr = residuals(p, n, base, th, r, t);
  let mu = 1e-3;
  const jacobian = () => {
    for (let k = 0; k < m; ++k) {
      const j = free[k];
      const h = 1e-6 * Math.max(1, Math.abs(th[j]));
      const save = th[j];
      th[j] = save + h; residuals(p, n, base, th, rp, tt);
      th[j] = save - h; residuals(p, n, base, th, rm, tt);
      th[j] = save;
      for (let i = 0; i < N; ++i) J[i * m + k] = (rp[i] - rm[i]) / (2 * h);
    }
  };
  for (let iter = 0; iter < maxIter; ++iter) {
    jacobian();
    const A = new Float64Array(m * m), g = new Float64Array(m);
    for (let i = 0; i < N; ++i) {
      const ri = r[i];
      for (let a = 0; a < m; ++a) {
        const ja = J[i * m + a];
        if (ja === 0) continue;
        g[a] -= ja * ri;
        for (let b = a; b < m; ++b) A[a * m + b] += ja * J[i * m + b];
      }
    }
    for (let a = 0; a < m; ++a) for (let b = 0; b < a; ++b) A[a * m + b] = A[b * m + a];
    let accepted = false;
    for (let tries = 0; tries < 30; ++tries) {
      const Ad = Float64Array.from(A);
      for (let a = 0; a < m; ++a) Ad[a * m + a] += mu * Math.max(A[a * m + a], 1e-12);
      const d = solve(Ad, g, m);
      if (d === null) { mu *= 10; continue; }
      const trial = Float64Array.from(th);
      for (let k = 0; k < m; ++k) trial[free[k]] += d[k];
      const sNew = residuals(p, n, base, trial, rt, tt);
      if (sNew <= ssr) {
        const gain = ssr - sNew;
        // re-centre the base on the new geometry (the angle and shift parameters back to 0)
        const gm = geometry(base, trial);
        base = { a: gm.a, e1: gm.u, e2: gm.v, C: gm.C };
        th.fill(0); th[5] = gm.R; th[6] = gm.c;
        ssr = residuals(p, n, base, th, r, t);
        mu = Math.max(1e-12, mu / 3);
        accepted = true;
        let dn = 0;
        for (let k = 0; k < m; ++k) dn += d[k] * d[k];
        if (gain <= 1e-14 * Math.max(ssr, 1e-300) + 1e-30 || Math.sqrt(dn) < 1e-12) iter = maxIter;
        break;
      }
      mu *= 10;
    }
    if (!accepted) break;
  }
  jacobian();
  return { base, th, ssr, J: Float64Array.from(J), r: Float64Array.from(r), t: Float64Array.from(t) };
}

/** Start of a helix/circle from lagged second differences (they point to the axis) and a circle fit in the plane. */
function startFrom(p: Float64Array, n: number, lag: number, helix: boolean): { base: Base; th: Float64Array } | null {
  let a: number[];
  if (helix) {
    const M = new Float64Array(9);
    for (let i = lag; i + lag < n; ++i) {
      const d = [0, 1, 2].map((k) => p[3 * (i + lag) + k] - 2 * p[3 * i + k] + p[3 * (i - lag) + k]);
      for (let x = 0; x < 3; ++x) for (let y = 0; y < 3; ++y) M[3 * x + y] += d[x] * d[y];
    }
    const e = symEigen3(M);
    a = [e.vectors[0], e.vectors[1], e.vectors[2]];
  } else {
    const e = symEigen3(scatter(p, n, true));
    a = [e.vectors[0], e.vectors[1], e.vectors[2]];
  }
  if (!a.every(Number.isFinite)) return null;
  const [e1, e2] = perp(a);
  // algebraic circle fit in the plane (Kasa 1976): x^2 + y^2 = 2 cx x + 2 cy y + k
  const A = new Float64Array(9), b = new Float64Array(3);
  const xs = new Float64Array(n), ys = new Float64Array(n), zs = new Float64Array(n);
  for (let i = 0; i < n; ++i) {
    const x = p[3 * i] * e1[0] + p[3 * i + 1] * e1[1] + p[3 * i + 2] * e1[2];
    const y = p[3 * i] * e2[0] + p[3 * i + 1] * e2[1] + p[3 * i + 2] * e2[2];
    xs[i] = x; ys[i] = y; zs[i] = p[3 * i] * a[0] + p[3 * i + 1] * a[1] + p[3 * i + 2] * a[2];
    const row = [2 * x, 2 * y, 1], rhs = x * x + y * y;
    for (let j = 0; j < 3; ++j) { b[j] += row[j] * rhs; for (let k = 0; k < 3; ++k) A[3 * j + k] += row[j] * row[k]; }
  }
  const sol = solve(A, b, 3);
  if (sol === null) return null;
  const [cx, cy, k] = sol;
  const R = Math.sqrt(Math.max(0, k + cx * cx + cy * cy));
  if (!(R > 0) || !Number.isFinite(R)) return null;
  // rise per radian: z against the unwrapped angle
  let c = 0;
  let zMean = 0;
  for (let i = 0; i < n; ++i) zMean += zs[i] / n;
  if (helix) {
    const ph = new Float64Array(n);
    let prev = 0;
    for (let i = 0; i < n; ++i) {
      let q = Math.atan2(ys[i] - cy, xs[i] - cx);
      if (i > 0) q += 2 * Math.PI * Math.round((prev - q) / (2 * Math.PI));
      ph[i] = q; prev = q;
    }
    let pm = 0;
    for (let i = 0; i < n; ++i) pm += ph[i] / n;
    let sxy = 0, sxx = 0;
    for (let i = 0; i < n; ++i) { sxy += (ph[i] - pm) * (zs[i] - zMean); sxx += (ph[i] - pm) ** 2; }
    c = sxx > 0 ? sxy / sxx : 0;
  }
  const C = [0, 1, 2].map((j) => cx * e1[j] + cy * e2[j] + (helix ? 0 : zMean) * a[j]);
  return { base: { a, e1, e2, C }, th: Float64Array.of(0, 0, 0, 0, 0, R, c) };
}

/** Options of `fitCircle` and `fitHelix`. */
export interface PrimitiveOptions {
  /** Iteration limit of Levenberg-Marquardt (default 100). */
  readonly maxIterations?: number;
}

/**
 * Circle in 3D with a free plane, by orthogonal-distance least squares (see the file comment).
 * Parameters: normal (2), centre (3), radius; kappa = 1/R, tau = 0. Needs n >= 4.
 * @example fitCircle(pointsOnCircleOfRadius(2e-7)).radius.value // 2e-7
 */
export function fitCircle(xyz: ArrayLike<number>, options: PrimitiveOptions = {}): PrimitiveFit {
  const nm = normalise(xyz, "fitCircle");
  if (nm.n < 4) throw new RangeError(`fitCircle: needs at least 4 points (got ${nm.n})`);
  const start = startFrom(nm.p, nm.n, 1, false);
  if (start === null) throw new RangeError("fitCircle: the points are collinear");
  const fit = levenberg(nm.p, nm.n, start.base, start.th, FREE_CIRCLE, options.maxIterations ?? 100);
  return summarise("circle", nm, fit, FREE_CIRCLE);
}

/**
 * Circular helix with free axis, radius, rise and handedness, by orthogonal-distance least squares
 * (see the file comment). Starts from lagged second differences (lags 1, 2, 3, 5, 8, ... up to n/3;
 * the start with the smallest residual after the fit wins). Needs n >= 6.
 * @example fitHelix(helixPoints).kappa.value // R / (R^2 + c^2)
 */
export function fitHelix(xyz: ArrayLike<number>, options: PrimitiveOptions = {}): PrimitiveFit {
  const nm = normalise(xyz, "fitHelix");
  const n = nm.n;
  if (n < 6) throw new RangeError(`fitHelix: needs at least 6 points (got ${n})`);
  const starts: { base: Base; th: Float64Array; ssr: number }[] = [];
  const r = new Float64Array(3 * n), t = new Float64Array(n);
  for (let lag = 1, prev = 0; lag <= Math.max(1, Math.floor((n - 1) / 3)); [lag, prev] = [lag + Math.max(1, prev), lag]) {
    const s = startFrom(nm.p, n, lag, true);
    if (s !== null) starts.push({ ...s, ssr: residuals(nm.p, n, s.base, s.th, r, t) });
  }
  const plane = startFrom(nm.p, n, 1, false);
  if (plane !== null) starts.push({ ...plane, ssr: residuals(nm.p, n, plane.base, plane.th, r, t) });
  if (starts.length === 0) throw new RangeError("fitHelix: no start (the points are collinear)");
  starts.sort((x, y) => x.ssr - y.ssr);
  // Large stretches: the starts compete on every k-th point (about 2000 points), and only the
  // winner is refined on all of them.
  const k = Math.max(1, Math.ceil(n / 2000));
  const sub = k === 1 ? nm.p : Float64Array.from({ length: 3 * Math.ceil(n / k) }, (_, j) => nm.p[3 * k * Math.floor(j / 3) + (j % 3)]);
  const nSub = sub.length / 3;
  let best: LmResult | null = null;
  for (const s of starts.slice(0, 3)) {
    // a circle start gets a small rise so that the screw gauge is well defined
    const th = Float64Array.from(s.th);
    if (th[6] === 0) th[6] = 1e-3 * th[5];
    const f = levenberg(sub, nSub, s.base, th, FREE_HELIX, options.maxIterations ?? 100);
    if (best === null || f.ssr < best.ssr) best = f;
  }
  if (k > 1) best = levenberg(nm.p, n, best!.base, best!.th, FREE_HELIX, options.maxIterations ?? 100);
  return summarise("helix", nm, best!, FREE_HELIX);
}

function summarise(kind: "circle" | "helix", nm: Normalised, fit: LmResult, free: readonly number[]): PrimitiveFit {
  const { n, L, c: centroid } = nm;
  const m = free.length;
  const dof = 2 * n - m;
  const N = 3 * n;
  const A = new Float64Array(m * m);
  for (let i = 0; i < N; ++i) for (let a = 0; a < m; ++a) for (let b = 0; b < m; ++b) A[a * m + b] += fit.J[i * m + a] * fit.J[i * m + b];
  const inv = inverseSmall(A, m);
  const s2 = fit.ssr / Math.max(1, dof); // normalised units
  const tq = t95(Math.max(1, dof));
  const cov = (j: number, k: number) => (inv === null ? NaN : s2 * inv[free.indexOf(j) * m + free.indexOf(k)]);
  const g = geometry(fit.base, fit.th);
  const R = g.R, c = kind === "helix" ? g.c : 0;
  const vR = cov(5, 5), vc = kind === "helix" ? cov(6, 6) : 0, vRc = kind === "helix" ? cov(5, 6) : 0;
  const est = (value: number, dR: number, dc: number, scale: number): Estimate => {
    const v = dR * dR * vR + dc * dc * vc + 2 * dR * dc * vRc;
    const h = tq * Math.sqrt(Math.max(0, v));
    return { value: value * scale, lo: (value - h) * scale, hi: (value + h) * scale };
  };
  const q = R * R + c * c;
  // kappa = R/q, tau = c/q: derivatives for the delta method
  const kR = (c * c - R * R) / (q * q), kc = (-2 * R * c) / (q * q);
  const tR = (-2 * R * c) / (q * q), tc = (R * R - c * c) / (q * q);
  const sign = Math.sign(fit.th[5]) || 1;
  const axis: [number, number, number] = [g.a[0], g.a[1], g.a[2]];
  const angle = tq * Math.sqrt(Math.max(0, cov(0, 0) + cov(1, 1)));
  const centre: [number, number, number] = [0, 1, 2].map((k) => centroid[k] + L * g.C[k]) as [number, number, number];
  const t = Float64Array.from(fit.t, (x) => (sign < 0 ? x + Math.PI : x));
  const pitchEst = est(2 * Math.PI * Math.abs(c), 2 * Math.PI * 0, 2 * Math.PI * Math.sign(c), L);
  return {
    kind, n, dof, rms: L * Math.sqrt(s2), ssr: fit.ssr * L * L, axis, axisAngle95: angle, centre,
    radius: est(R, 1, 0, L),
    rise: kind === "helix" ? est(c, 0, 1, L) : { value: 0, lo: 0, hi: 0 },
    pitch: kind === "helix" ? { value: pitchEst.value, lo: Math.max(0, Math.min(pitchEst.lo, pitchEst.hi)), hi: Math.max(pitchEst.lo, pitchEst.hi) } : { value: 0, lo: 0, hi: 0 },
    handedness: kind === "helix" ? (c > 0 ? 1 : c < 0 ? -1 : 0) : 0,
    kappa: est(R / q, kR, kc, 1 / L),
    tau: kind === "helix" ? est(c / q, tR, tc, 1 / L) : { value: 0, lo: 0, hi: 0 },
    t,
  };
}

/**
 * Goodness of fit against a known noise level sigma (per coordinate, m): chi^2 = SSR / sigma^2 on
 * 2n - p degrees of freedom, upper tail by the Wilson-Hilferty cube-root approximation (Wilson &
 * Hilferty, PNAS 17, 684 (1931); from memory). Rejected when the tail probability is below `alpha`
 * (default 0.001) AND the RMS residual exceeds `practical` (default 1.5) times sigma AND
 * `relative` (default 0.05) of the radius (a line: of its half-length), so that a significant but
 * small misfit (a slightly elliptic ring, a coil's smooth pitch change) keeps its label: the model
 * is first order in the curvature, and 5% is within its validity. sigma NaN or <= 0: untested.
 */
export function checkFit(fit: PrimitiveFit, sigma: number, options: { alpha?: number; practical?: number; relative?: number } = {}): FitCheck {
  const dof = fit.dof;
  if (!(sigma > 0) || !Number.isFinite(sigma) || dof < 1) {
    return { verdict: "untested", chi2: NaN, dof, ratio: NaN, reason: "noise level unknown: the shape is not tested" };
  }
  const chi2 = fit.ssr / (sigma * sigma);
  const ratio = fit.rms / sigma;
  const w = 2 / (9 * dof);
  const z = (Math.cbrt(chi2 / dof) - (1 - w)) / Math.sqrt(w);
  const alpha = options.alpha ?? 0.001, practical = options.practical ?? 1.5;
  const zCrit = normalUpperQuantile(alpha);
  // practical size of the misfit relative to the shape: the radius, or a line's extent
  let extent = fit.radius.value;
  if (fit.kind === "line") { extent = 0; for (let i = 0; i < fit.t.length; ++i) extent = Math.max(extent, Math.abs(fit.t[i])); }
  const relative = options.relative ?? 0.05;
  if (z > zCrit && ratio > practical && fit.rms > relative * extent) {
    return { verdict: "rejected", chi2, dof, ratio, reason: `${fit.kind} misfit: residual RMS ${ratio.toFixed(2)} x the noise (chi-square ${chi2.toFixed(1)} on ${dof} degrees of freedom)` };
  }
  return { verdict: "confirmed", chi2, dof, ratio, reason: `${fit.kind} fits to the noise: residual RMS ${ratio.toFixed(2)} x the noise` };
}

/** Upper-tail standard normal quantile (Acklam-free: bisection on erfc; used for a handful of alphas). */
function normalUpperQuantile(alpha: number): number {
  let lo = 0, hi = 10;
  for (let k = 0; k < 60; ++k) {
    const mid = 0.5 * (lo + hi);
    if (0.5 * erfc(mid / Math.SQRT2) > alpha) lo = mid; else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** Complementary error function (Numerical Recipes erfcc, relative error < 1.2e-7; from memory). */
function erfc(x: number): number {
  const z = Math.abs(x), t = 1 / (1 + 0.5 * z);
  const r = t * Math.exp(-z * z - 1.26551223 + t * (1.00002368 + t * (0.37409196 + t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))));
  return x >= 0 ? r : 2 - r;
}
