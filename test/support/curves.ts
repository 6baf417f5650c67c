/**
 * Analytic test curves with their curvature and torsion, seeded noisy samplers, and rigid motions.
 * Closed forms (torsion with B' = -tau N, right-handed helix tau > 0):
 * - helix (R cos t, R sin t, c t): kappa = R / (R^2 + c^2), tau = c / (R^2 + c^2)
 *   (https://en.wikipedia.org/wiki/Helix, "Arc length, curvature and torsion");
 * - circle: kappa = 1/R, tau = 0; ellipse (a cos t, b sin t): kappa = ab / (a^2 sin^2 t + b^2 cos^2 t)^{3/2}
 *   (https://en.wikipedia.org/wiki/Ellipse, "Curvature");
 * - Viviani's curve a(1 + cos t, sin t, 2 sin(t/2)): kappa = sqrt(13 + 3 cos t) / (a (3 + cos t)^{3/2}),
 *   tau = 6 cos(t/2) / (a (13 + 3 cos t)) (https://mathworld.wolfram.com/VivianisCurve.html);
 * - Euler (Cornu) spiral: kappa(s) = s / a^2 in arc length s (https://en.wikipedia.org/wiki/Euler_spiral).
 * Other curves (trefoil, conical helix, bump, bend) get kappa and tau from exact derivatives
 * evaluated numerically by 7-point central differences of r(t) (error ~1e-9 relative).
 */
import { normalStream } from "./rng.js";

export interface TestCurve {
  readonly name: string;
  readonly r: (t: number) => [number, number, number];
  readonly t0: number;
  readonly t1: number;
  readonly closed: boolean;
  /** Exact curvature and torsion at parameter t, when a closed form is known. */
  readonly kappa?: (t: number) => number;
  readonly tau?: (t: number) => number;
  /** Smallest radius of curvature (sets the noise scale). */
  readonly radius: number;
}

export function helixCurve(R: number, c: number, turns: number): TestCurve {
  const k = R / (R * R + c * c), ta = c / (R * R + c * c);
  return {
    name: "helix", r: (t) => [R * Math.cos(t), R * Math.sin(t), c * t], t0: 0, t1: 2 * Math.PI * turns,
    closed: false, kappa: () => k, tau: () => ta, radius: 1 / k,
  };
}

export function circleCurve(R: number): TestCurve {
  return { name: "circle", r: (t) => [R * Math.cos(t), R * Math.sin(t), 0], t0: 0, t1: 2 * Math.PI, closed: true, kappa: () => 1 / R, tau: () => 0, radius: R };
}

export function ellipseCurve(a: number, b: number): TestCurve {
  return {
    name: "ellipse", r: (t) => [a * Math.cos(t), b * Math.sin(t), 0], t0: 0, t1: 2 * Math.PI, closed: true,
    kappa: (t) => (a * b) / Math.pow(a * a * Math.sin(t) ** 2 + b * b * Math.cos(t) ** 2, 1.5), tau: () => 0,
    radius: (b * b) / a,
  };
}

export function vivianiCurve(a: number): TestCurve {
  return {
    name: "viviani", r: (t) => [a * (1 + Math.cos(t)), a * Math.sin(t), 2 * a * Math.sin(t / 2)], t0: 0, t1: 4 * Math.PI, closed: true,
    kappa: (t) => Math.sqrt(13 + 3 * Math.cos(t)) / (a * Math.pow(3 + Math.cos(t), 1.5)),
    tau: (t) => (6 * Math.cos(t / 2)) / (a * (13 + 3 * Math.cos(t))),
    radius: a / Math.sqrt(2) / 1.0,
  };
}

export function trefoilCurve(a: number): TestCurve {
  return {
    name: "trefoil", r: (t) => [a * (Math.sin(t) + 2 * Math.sin(2 * t)), a * (Math.cos(t) - 2 * Math.cos(2 * t)), -a * Math.sin(3 * t)],
    t0: 0, t1: 2 * Math.PI, closed: true, radius: a * 0.9,
  };
}

export function conicalHelixCurve(a: number, turns: number): TestCurve {
  // Radius grows linearly from a to 3a with pitch a/2 per turn.
  const T = 2 * Math.PI * turns;
  return {
    name: "conical-helix",
    r: (t) => { const rr = a * (1 + (2 * t) / T); return [rr * Math.cos(t), rr * Math.sin(t), (a / (4 * Math.PI)) * t]; },
    t0: 0, t1: T, closed: false, radius: a,
  };
}

/** Planar wire along x with a Gaussian bump in y: curvature peaks at the bump. */
export function bumpCurve(L: number, height: number, width: number): TestCurve {
  return { name: "bump", r: (t) => [t, height * Math.exp(-(t * t) / (width * width)), 0], t0: -L / 2, t1: L / 2, closed: false, radius: (width * width) / (2 * height) };
}

/** A planar sharp bend: two straight arms joined by a 90-degree arc of radius rb. */
export function bendCurve(arm: number, rb: number): TestCurve {
  const q = (Math.PI / 2) * rb;
  return {
    name: "sharp-bend",
    r: (t) => {
      if (t < 0) return [t, 0, 0];
      if (t > q) return [rb, rb + (t - q), 0];
      const a = t / rb;
      return [rb * Math.sin(a), rb * (1 - Math.cos(a)), 0];
    },
    t0: -arm, t1: q + arm, closed: false, kappa: (t) => (t < 0 || t > q ? 0 : 1 / rb), tau: () => 0, radius: rb,
  };
}

/** Euler spiral with kappa = s / a^2, by Simpson integration of (cos(s^2/2a^2), sin(s^2/2a^2)). */
export function cornuCurve(a: number, s1: number): TestCurve {
  const table = 20000, ds = s1 / table;
  const xs = new Float64Array(table + 1), ys = new Float64Array(table + 1);
  const f = (s: number) => (s * s) / (2 * a * a);
  for (let k = 1; k <= table; ++k) {
    const s0 = (k - 1) * ds, sm = s0 + ds / 2, se = s0 + ds;
    xs[k] = xs[k - 1] + (ds / 6) * (Math.cos(f(s0)) + 4 * Math.cos(f(sm)) + Math.cos(f(se)));
    ys[k] = ys[k - 1] + (ds / 6) * (Math.sin(f(s0)) + 4 * Math.sin(f(sm)) + Math.sin(f(se)));
  }
  const r = (s: number): [number, number, number] => {
    const x = Math.min(Math.max(s / ds, 0), table - 1e-9), k = Math.floor(x), fr = x - k;
    // Exact local step from the table point by one more Simpson step.
    const sa = k * ds, h = (x - k) * ds;
    const sm = sa + h / 2, se = sa + h;
    void fr;
    return [
      xs[k] + (h / 6) * (Math.cos(f(sa)) + 4 * Math.cos(f(sm)) + Math.cos(f(se))),
      ys[k] + (h / 6) * (Math.sin(f(sa)) + 4 * Math.sin(f(sm)) + Math.sin(f(se))),
      0,
    ];
  };
  return { name: "cornu", r, t0: 0, t1: s1, closed: false, kappa: (s) => s / (a * a), tau: () => 0, radius: (a * a) / s1 };
}

/** Curvature and torsion of any curve at t from 7-point central differences (truth for benchmarks). */
export function numericKappaTau(curve: TestCurve, t: number): [number, number] {
  if (curve.kappa && curve.tau) return [curve.kappa(t), curve.tau(t)];
  const h = (curve.t1 - curve.t0) * 2e-4;
  const p = [-3, -2, -1, 0, 1, 2, 3].map((k) => curve.r(t + k * h));
  const d = (w: number[], scale: number) => [0, 1, 2].map((c) => w.reduce((acc, wk, k) => acc + wk * p[k][c], 0) / scale);
  const d1 = d([-1, 9, -45, 0, 45, -9, 1], 60 * h);
  const d2 = d([2, -27, 270, -490, 270, -27, 2], 180 * h * h);
  const d3 = d([1, -8, 13, 0, -13, 8, -1], 8 * h * h * h);
  const cx = d1[1] * d2[2] - d1[2] * d2[1], cy = d1[2] * d2[0] - d1[0] * d2[2], cz = d1[0] * d2[1] - d1[1] * d2[0];
  const c2 = cx * cx + cy * cy + cz * cz, a = Math.hypot(d1[0], d1[1], d1[2]);
  return [Math.sqrt(c2) / a ** 3, c2 > 0 ? (cx * d3[0] + cy * d3[1] + cz * d3[2]) / c2 : NaN];
}

/** n points at uniform parameter steps (closed curves: the end point is not repeated), with isotropic
 * Gaussian noise of standard deviation `noise` (absolute length) per coordinate. */
export function sampleCurve(curve: TestCurve, n: number, noise: number, seed: number): { xyz: Float64Array; t: Float64Array } {
  const g = normalStream(seed);
  const xyz = new Float64Array(3 * n), t = new Float64Array(n);
  const span = curve.t1 - curve.t0;
  for (let i = 0; i < n; ++i) {
    t[i] = curve.t0 + (span * i) / (curve.closed ? n : n - 1);
    const p = curve.r(t[i]);
    for (let c = 0; c < 3; ++c) xyz[3 * i + c] = p[c] + noise * g();
  }
  return { xyz, t };
}

/** Dense truth: points and kappa, tau at `m` parameters, for nearest-point comparisons. */
export function denseTruth(curve: TestCurve, m: number): { xyz: Float64Array; kappa: Float64Array; tau: Float64Array } {
  const xyz = new Float64Array(3 * m), kappa = new Float64Array(m), tau = new Float64Array(m);
  const span = curve.t1 - curve.t0;
  for (let i = 0; i < m; ++i) {
    const t = curve.t0 + (span * i) / (curve.closed ? m : m - 1);
    const p = curve.r(t);
    xyz.set(p, 3 * i);
    [kappa[i], tau[i]] = numericKappaTau(curve, t);
  }
  return { xyz, kappa, tau };
}

/** Index of the nearest dense-truth point to each fitted sample: the first sample is matched to
 * each of the (up to 4) nearest local minima of the distance, the rest follow in a window around the
 * previous match (samples are ordered along the curve), and the start whose track lies closest to
 * the samples wins (a curve that crosses itself, such as Viviani's, has two branches at the crossing). */
export function matchTruth(truth: { xyz: Float64Array }, x: Float64Array, y: Float64Array, z: Float64Array, closed = false): Int32Array {
  const m = truth.xyz.length / 3, n = x.length;
  const win = Math.ceil((8 * m) / Math.max(n, 1)) + 20;
  const d2 = (i: number, j: number) => (truth.xyz[3 * i] - x[j]) ** 2 + (truth.xyz[3 * i + 1] - y[j]) ** 2 + (truth.xyz[3 * i + 2] - z[j]) ** 2;
  const first = new Float64Array(m);
  for (let i = 0; i < m; ++i) first[i] = d2(i, 0);
  const minima: number[] = [];
  for (let i = 0; i < m; ++i) {
    const a = closed ? first[(i - 1 + m) % m] : i > 0 ? first[i - 1] : Infinity;
    const b = closed ? first[(i + 1) % m] : i < m - 1 ? first[i + 1] : Infinity;
    if (first[i] <= a && first[i] <= b) minima.push(i);
  }
  minima.sort((p, q) => first[p] - first[q]);
  let bestTrack = new Int32Array(n), bestCost = Infinity;
  for (const start of minima.slice(0, 4)) {
    const out = new Int32Array(n);
    out[0] = start;
    let prev = start, cost = first[start];
    for (let j = 1; j < n; ++j) {
      let best = -1, bd = Infinity;
      for (let k = -win; k <= win; ++k) {
        let i = prev + k;
        if (closed) i = ((i % m) + m) % m;
        else if (i < 0 || i >= m) continue;
        const d = d2(i, j);
        if (d < bd) { bd = d; best = i; }
      }
      out[j] = best;
      prev = best;
      cost += bd;
    }
    if (cost < bestCost) { bestCost = cost; bestTrack = out; }
  }
  return bestTrack;
}

/** Applies x -> Q x + t with Q a rotation from a unit quaternion (qw, qx, qy, qz). */
export function rigidMotion(xyz: Float64Array, q: [number, number, number, number], t: [number, number, number]): Float64Array {
  const [w, a, b, c] = q;
  const l = Math.hypot(w, a, b, c);
  const qw = w / l, qx = a / l, qy = b / l, qz = c / l;
  const Q = [
    1 - 2 * (qy * qy + qz * qz), 2 * (qx * qy - qz * qw), 2 * (qx * qz + qy * qw),
    2 * (qx * qy + qz * qw), 1 - 2 * (qx * qx + qz * qz), 2 * (qy * qz - qx * qw),
    2 * (qx * qz - qy * qw), 2 * (qy * qz + qx * qw), 1 - 2 * (qx * qx + qy * qy),
  ];
  const out = new Float64Array(xyz.length);
  for (let i = 0; i < xyz.length / 3; ++i) {
    const x = xyz[3 * i], y = xyz[3 * i + 1], z = xyz[3 * i + 2];
    out[3 * i] = Q[0] * x + Q[1] * y + Q[2] * z + t[0];
    out[3 * i + 1] = Q[3] * x + Q[4] * y + Q[5] * z + t[1];
    out[3 * i + 2] = Q[6] * x + Q[7] * y + Q[8] * z + t[2];
  }
  return out;
}

/** A 3D coil whose radius and pitch both vary along it: curvature and torsion change continuously. */
export function wavyCoilCurve(a: number, turns: number): TestCurve {
  const T = 2 * Math.PI * turns;
  return {
    name: "wavy-coil",
    r: (t) => {
      const rr = a * (1 + 0.35 * Math.sin(t / 2.3)), c = a * (0.25 + 0.15 * Math.cos(t / 3.1));
      return [rr * Math.cos(t), rr * Math.sin(t), c * t];
    },
    t0: 0, t1: T, closed: false, radius: 0.5 * a,
  };
}

/**
 * n points whose density along the parameter varies `ratio`:1 (a smooth, seeded warp of a uniform
 * grid, two density cycles along the wire), with isotropic Gaussian noise `noise` per coordinate.
 */
export function sampleCurveUneven(curve: TestCurve, n: number, noise: number, seed: number, ratio = 3): { xyz: Float64Array; t: Float64Array } {
  const g = normalStream(seed);
  const xyz = new Float64Array(3 * n), t = new Float64Array(n);
  const span = curve.t1 - curve.t0;
  // Warp x -> x + A sin(2 pi k x + phase) / (2 pi k): derivative 1 + A cos(...), ratio (1 + A) / (1 - A).
  const A = (ratio - 1) / (ratio + 1), k = 2, phase = (seed % 7) * 0.9;
  const warp = (x: number) => x + (A * (Math.sin(2 * Math.PI * k * x + phase) - Math.sin(phase))) / (2 * Math.PI * k);
  for (let i = 0; i < n; ++i) {
    const x = i / (curve.closed ? n : n - 1);
    t[i] = curve.t0 + span * (curve.closed ? x + (A * (Math.sin(2 * Math.PI * k * x + phase) - Math.sin(phase))) / (2 * Math.PI * k) : warp(x) / warp(1));
    const p = curve.r(t[i]);
    for (let c = 0; c < 3; ++c) xyz[3 * i + c] = p[c] + noise * g();
  }
  return { xyz, t };
}

/**
 * A planar curve of length L from its curvature kappa(s) (units of 1/L), as flat x, y, 0 triples at
 * s = 0, 1, ..., L (one point per unit length): the tangent angle integrated at 0.01-unit steps, each
 * step along the chord of its arc (midpoint angle), so positions are exact to ~1e-6 for smooth kappa.
 */
export function planarFromCurvature(kappa: (s: number) => number, L: number): number[] {
  const pts: number[] = [];
  let x = 0, y = 0, th = 0;
  const h = 0.01;
  for (let i = 0; i <= L / h; i++) {
    const s = i * h;
    if (Math.abs(s - Math.round(s)) < h / 2) pts.push(x, y, 0);
    const k = kappa(s + h / 2);
    x += Math.cos(th + (k * h) / 2) * h;
    y += Math.sin(th + (k * h) / 2) * h;
    th += k * h;
  }
  return pts;
}
