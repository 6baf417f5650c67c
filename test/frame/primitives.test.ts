import { describe, expect, it } from "vitest";
import { Matrix, SingularValueDecomposition, inverse, solve } from "ml-matrix";
import { checkFit, fitCircle, fitHelix, fitLine, inverseSmall, t95 } from "../../src/frame/primitives.js";
import { rigidMotion } from "../support/curves.js";
import { normalStream } from "../support/rng.js";

/** Points of r(t) = (R cos t, R sin t, c t) at t = t0 + i dt, with isotropic noise (absolute). */
function helixPoints(n: number, R: number, c: number, dt: number, noise: number, seed: number, t0 = 0): Float64Array {
  const g = normalStream(seed);
  const x = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    const t = t0 + i * dt;
    x[3 * i] = R * Math.cos(t) + noise * g();
    x[3 * i + 1] = R * Math.sin(t) + noise * g();
    x[3 * i + 2] = c * t + noise * g();
  }
  return x;
}

const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe("fitHelix (orthogonal-distance least squares)", () => {
  it("recovers radius, rise, kappa = R/(R^2+c^2) and tau = c/(R^2+c^2) exactly on noise-free points", () => {
    // closed forms of the circular helix: do Carmo (1976), sec. 1-5 (from memory)
    const R = 60e-9, c = 157e-9 / (2 * Math.PI); // invented coil: radius 60 nm, pitch 157 nm
    const f = fitHelix(helixPoints(80, R, c, 0.2, 0, 1));
    expect(rel(f.radius.value, R)).toBeLessThan(1e-9);
    expect(rel(f.rise.value, c)).toBeLessThan(1e-9);
    expect(rel(f.pitch.value, 157e-9)).toBeLessThan(1e-9);
    expect(rel(f.kappa.value, R / (R * R + c * c))).toBeLessThan(1e-9);
    expect(rel(f.tau.value, c / (R * R + c * c))).toBeLessThan(1e-9);
    expect(f.handedness).toBe(1);
    expect(Math.abs(Math.abs(f.axis[2]) - 1)).toBeLessThan(1e-12);
    expect(f.rms / R).toBeLessThan(1e-9);
  });
  it("a mirror image (z -> -z) flips the handedness and the sign of tau, keeping R and |c|", () => {
    const x = helixPoints(40, 1, 0.4, 0.3, 0.01, 2);
    const m = Float64Array.from(x, (v, i) => (i % 3 === 2 ? -v : v));
    const a = fitHelix(x), b = fitHelix(m);
    expect(a.handedness).toBe(1);
    expect(b.handedness).toBe(-1);
    expect(rel(b.radius.value, a.radius.value)).toBeLessThan(1e-7);
    expect(rel(b.tau.value, -a.tau.value)).toBeLessThan(1e-7);
    expect(b.tau.lo).toBeLessThan(b.tau.hi);
  });
  it("is invariant under rigid motions and equivariant under a change of unit", () => {
    const x = helixPoints(50, 2, -0.5, 0.25, 0.02, 3);
    const a = fitHelix(x);
    const b = fitHelix(rigidMotion(x, [0.3, -0.7, 0.2, 0.5], [40, -7, 13]));
    const c = fitHelix(Float64Array.from(x, (v) => v * 1e-9));
    for (const [u, v, k] of [[a, b, 1], [a, c, 1e-9]] as const) {
      expect(rel(v.radius.value, u.radius.value * k)).toBeLessThan(1e-6);
      expect(rel(v.rise.value, u.rise.value * k)).toBeLessThan(1e-6);
      expect(rel(v.kappa.hi, u.kappa.hi / k)).toBeLessThan(1e-6);
      expect(rel(v.tau.lo, u.tau.lo / k)).toBeLessThan(1e-6);
      expect(v.handedness).toBe(-1);
    }
  });
  it("95% intervals of R, kappa and tau cover the truth in 90-98% of 300 seeded replicates", () => {
    // coverage is the mean over replicates (NUMERICS.md sec. 7: one draw says little)
    const R = 1, c = 0.35;
    const k0 = R / (R * R + c * c), t0 = c / (R * R + c * c);
    let cr = 0, ck = 0, ct = 0;
    const reps = 300;
    for (let s = 1; s <= reps; ++s) {
      const f = fitHelix(helixPoints(60, R, c, 0.2, 0.01 + 0.02 * (s % 3), 100 + s, 0.1 * s));
      if (f.radius.lo <= R && R <= f.radius.hi) cr++;
      if (f.kappa.lo <= k0 && k0 <= f.kappa.hi) ck++;
      if (f.tau.lo <= t0 && t0 <= f.tau.hi) ct++;
    }
    for (const k of [cr, ck, ct]) {
      expect(k / reps).toBeGreaterThan(0.9);
      expect(k / reps).toBeLessThan(0.98);
    }
  });
  it("short sparse alpha-helix-like traces: kappa within 3% and tau within 10% of the ideal helix in >= 95% of cases", () => {
    // alpha helix: radius 2.3 A, rise 1.5 A per residue, 100 degrees per residue (Pauling, Corey &
    // Branson, PNAS 37, 205 (1951); textbook values, from memory). 10-60 points, noise 0.05-0.2 A.
    const R = 2.3, dt = (100 * Math.PI) / 180, c = 1.5 / dt;
    const k0 = R / (R * R + c * c), t0 = c / (R * R + c * c);
    let okK = 0, okT = 0;
    const reps = 200;
    for (let s = 0; s < reps; ++s) {
      const n = 10 + (s % 51), noise = 0.05 + (0.15 * (s % 7)) / 6;
      const f = fitHelix(helixPoints(n, R, c, dt, noise, 1000 + s, s));
      if (rel(f.kappa.value, k0) < 0.03) okK++;
      if (rel(f.tau.value, t0) < 0.1) okT++;
    }
    // measured: 197/200 and 198/200
    expect(okK / reps).toBeGreaterThanOrEqual(0.95);
    expect(okT / reps).toBeGreaterThanOrEqual(0.95);
  });
  it("edge cases: fewer than 6 points or all points equal throw a RangeError", () => {
    expect(() => fitHelix(helixPoints(5, 1, 0.3, 0.5, 0, 1))).toThrow(RangeError);
    expect(() => fitHelix(new Float64Array(30).fill(2))).toThrow(/not all equal/);
  });
});

describe("fitCircle (3D circle with free plane)", () => {
  it("recovers centre, radius and plane of a tilted circle exactly on noise-free points", () => {
    const n = 30, R = 150e-9;
    const flat = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) { flat[3 * i] = R * Math.cos(0.1 * i); flat[3 * i + 1] = R * Math.sin(0.1 * i); }
    const x = rigidMotion(flat, [0.9, 0.2, -0.3, 0.1], [1e-6, 2e-6, -5e-7]);
    const f = fitCircle(x);
    expect(rel(f.radius.value, R)).toBeLessThan(1e-9);
    expect(rel(f.kappa.value, 1 / R)).toBeLessThan(1e-9);
    expect(Math.hypot(f.centre[0] - 1e-6, f.centre[1] - 2e-6, f.centre[2] + 5e-7) / R).toBeLessThan(1e-9);
    expect(f.tau.value).toBe(0);
  });
  it("the geometric fit has a smaller orthogonal SSR than the algebraic (Kasa) circle solved by ml-matrix", () => {
    // reference: linear least squares for x^2 + y^2 = 2 a x + 2 b y + k by ml-matrix's solve (QR)
    const g = normalStream(9);
    const n = 40, R = 3;
    const rows: number[][] = [], rhs: number[][] = [], xyz = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) {
      const t = 0.04 * i; // a 90 degree arc: the algebraic fit is biased, the geometric one is not
      const x = R * Math.cos(t) + 0.05 * g(), y = R * Math.sin(t) + 0.05 * g();
      xyz[3 * i] = x; xyz[3 * i + 1] = y;
      rows.push([2 * x, 2 * y, 1]); rhs.push([x * x + y * y]);
    }
    const sol = solve(new Matrix(rows), new Matrix(rhs));
    const a = sol.get(0, 0), b = sol.get(1, 0), Rk = Math.sqrt(sol.get(2, 0) + a * a + b * b);
    let ssrK = 0;
    for (let i = 0; i < n; ++i) ssrK += (Math.hypot(xyz[3 * i] - a, xyz[3 * i + 1] - b) - Rk) ** 2;
    const f = fitCircle(xyz);
    expect(f.ssr).toBeLessThanOrEqual(ssrK * (1 + 1e-9));
    expect(rel(f.radius.value, Rk)).toBeLessThan(0.05);
  });
  it("95% radius intervals cover the truth in 90-98% of 300 seeded replicates (arcs of 60-180 degrees)", () => {
    let cover = 0;
    for (let s = 1; s <= 300; ++s) {
      const n = 40, span = (Math.PI / 3) * (1 + (s % 3));
      const f = fitCircle(helixPoints(n, 2, 0, span / n, 0.01, 500 + s, s));
      if (f.radius.lo <= 2 && 2 <= f.radius.hi) cover++;
    }
    expect(cover / 300).toBeGreaterThan(0.9);
    expect(cover / 300).toBeLessThan(0.98);
  });
  it("edge case: collinear points are refused", () => {
    expect(() => fitCircle(Float64Array.of(0, 0, 0, 1, 0, 0, 2, 0, 0, 3, 0, 0, 4, 0, 0))).toThrow(RangeError);
  });
});

describe("fitLine (orthogonal regression)", () => {
  it("gives the principal direction of ml-matrix's SVD of the centred points", () => {
    const g = normalStream(4);
    const n = 50, x = new Float64Array(3 * n), rows: number[][] = [];
    for (let i = 0; i < n; ++i) {
      x[3 * i] = 1 + 0.3 * i + 0.02 * g(); x[3 * i + 1] = -2 + 0.1 * i + 0.02 * g(); x[3 * i + 2] = 0.05 * i + 0.02 * g();
    }
    const f = fitLine(x);
    for (let i = 0; i < n; ++i) rows.push([x[3 * i] - f.centre[0], x[3 * i + 1] - f.centre[1], x[3 * i + 2] - f.centre[2]]);
    const v = new SingularValueDecomposition(new Matrix(rows)).rightSingularVectors.getColumn(0);
    expect(Math.abs(v[0] * f.axis[0] + v[1] * f.axis[1] + v[2] * f.axis[2])).toBeCloseTo(1, 12);
    expect(f.kappa.value).toBe(0);
    expect(Number.isNaN(f.tau.value)).toBe(true);
  });
  it("edge case: two points are refused", () => {
    expect(() => fitLine(Float64Array.of(0, 0, 0, 1, 1, 1))).toThrow(RangeError);
  });
});

describe("checkFit (chi-square against the noise)", () => {
  it("confirms a helix fitted to helix points and rejects a circle fitted to them, with the reason", () => {
    const x = helixPoints(100, 1, 0.2, 0.1, 0.01, 5);
    expect(checkFit(fitHelix(x), 0.01).verdict).toBe("confirmed");
    const bad = checkFit(fitCircle(x), 0.01);
    expect(bad.verdict).toBe("rejected");
    expect(bad.reason).toMatch(/^circle misfit: residual RMS \d+\.\d\d x the noise/);
  });
  it("over 200 seeded replicates of a true helix, the test rejects at most ~1% (alpha 0.001)", () => {
    let rejected = 0;
    for (let s = 1; s <= 200; ++s) if (checkFit(fitHelix(helixPoints(30, 1, 0.3, 0.3, 0.02, 700 + s)), 0.02, { practical: 0 }).verdict === "rejected") rejected++;
    expect(rejected).toBeLessThanOrEqual(3);
  });
  it("without a noise level the shape is untested", () => {
    expect(checkFit(fitLine(Float64Array.of(0, 0, 0, 1, 0, 0, 2, 0, 0)), NaN).verdict).toBe("untested");
  });
});

describe("helpers", () => {
  it("t95 matches Student's t table values (t_0.975: 12.706 at 1, 2.228 at 10, 2.042 at 30; NIST handbook table)", () => {
    expect(t95(10)).toBeCloseTo(2.228, 2);
    expect(t95(30)).toBeCloseTo(2.042, 3);
    expect(t95(1e6)).toBeCloseTo(1.96, 3);
  });
  it("inverseSmall agrees with ml-matrix's inverse", () => {
    const A = [[4, 1, 0.5], [1, 3, 0.2], [0.5, 0.2, 2]];
    const inv = inverseSmall(Float64Array.from(A.flat()), 3)!;
    const ref = inverse(new Matrix(A));
    for (let i = 0; i < 3; ++i) for (let j = 0; j < 3; ++j) expect(inv[3 * i + j]).toBeCloseTo(ref.get(i, j), 12);
  });
});
