import { describe, expect, it } from "vitest";
import { ParameterError } from "../../src/errors.js";
import { resampleWire } from "../../src/export/resampleWire.js";
import { makeProfile, rotationMatrix } from "../support/profiles.js";
import { helixProfile } from "./helixProfile.js";

// Helix r(t) = (a cos t, a sin t, b t), arc length s = t sqrt(a^2 + b^2), kappa = a/(a^2+b^2),
// tau = b/(a^2+b^2). Source: https://en.wikipedia.org/wiki/Helix (arc length, curvature and torsion).
const a = 40e-9, b = 10e-9, w = Math.hypot(a, b);

/** Largest distance of the resampled sites from the exact helix point at the same arc length, relative to a. */
function helixError(n: number, spacing: number): number {
  const r = resampleWire(helixProfile(a, b, n), spacing);
  let worst = 0;
  for (let k = 0; k < r.n; ++k) {
    const t = r.s[k] / w;
    const d = Math.hypot(r.xyz[3 * k] - a * Math.cos(t), r.xyz[3 * k + 1] - a * Math.sin(t), r.xyz[3 * k + 2] - b * t);
    worst = Math.max(worst, d / a);
  }
  return worst;
}

describe("resampleWire(profile, spacing)", () => {
  it("puts the sites on the helix closed form, at the requested spacing adjusted to span the wire", () => {
    const p = helixProfile(a, b, 200);
    const r = resampleWire(p, 1e-9);
    expect(r.n).toBe(Math.round(p.length / 1e-9) + 1);
    expect(Math.abs(r.spacing / 1e-9 - 1)).toBeLessThan(1 / r.n); // adjusted by less than one site
    expect(r.s[0]).toBe(p.s[0]);
    expect(r.s[r.n - 1]).toBeCloseTo(p.s[p.n - 1], 20);
    expect(helixError(200, 1e-9)).toBeLessThan(2e-7); // measured 4.1e-8
  });

  it("converges at fourth order in the profile's sample spacing (cubic Hermite with exact tangents)", () => {
    const ratio = helixError(100, 0.7e-9) / helixError(200, 0.7e-9);
    expect(ratio).toBeGreaterThan(12); // 2^4 = 16 expected; measured 16.3
  });

  it("gives right-handed orthonormal frames, T along the exact tangent, and the constant kappa and tau", () => {
    const r = resampleWire(helixProfile(a, b, 150), 2e-9);
    for (let k = 0; k < r.n; ++k) {
      const T = r.T.subarray(3 * k, 3 * k + 3), N = r.N.subarray(3 * k, 3 * k + 3), B = r.B.subarray(3 * k, 3 * k + 3);
      const dot = (u: Float64Array, v: Float64Array) => u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
      expect(Math.abs(dot(T, T) - 1)).toBeLessThan(1e-12);
      expect(Math.abs(dot(N, N) - 1)).toBeLessThan(1e-12);
      expect(Math.abs(dot(T, N))).toBeLessThan(1e-12);
      // B = T x N and, for this right-handed helix, B . (0, 0, 1) = a / w > 0
      expect(Math.abs(dot(B, B) - 1)).toBeLessThan(1e-12);
      expect(B[2]).toBeGreaterThan(0);
      const t = r.s[k] / w;
      const exact = [(-a * Math.sin(t)) / w, (a * Math.cos(t)) / w, b / w];
      expect(Math.hypot(T[0] - exact[0], T[1] - exact[1], T[2] - exact[2])).toBeLessThan(1e-3); // measured 2.1e-4 (linear blend of T)
      expect(r.kappa[k]).toBeCloseTo(a / (w * w), 6);
      expect(r.tau[k]).toBeCloseTo(b / (w * w), 6);
    }
  });

  it("wraps a closed wire: sites cover [s0, s0 + length) and none repeats the first", () => {
    const R = 50e-9;
    const p = makeProfile({ n: 300, length: 2 * Math.PI * R, kappa: () => 1 / R, tau: () => 0, closed: true });
    const r = resampleWire(p, 1e-9);
    expect(r.closed).toBe(true);
    expect(r.n).toBe(Math.round(p.length / 1e-9));
    expect(r.s[r.n - 1]).toBeLessThan(p.length);
    // every site lies on the circle of radius R about the centre of the samples
    let cx = 0, cy = 0;
    for (let i = 0; i < p.n; ++i) { cx += p.x[i] / p.n; cy += p.y[i] / p.n; }
    for (let k = 0; k < r.n; ++k) {
      expect(Math.abs(Math.hypot(r.xyz[3 * k] - cx, r.xyz[3 * k + 1] - cy) / R - 1)).toBeLessThan(1e-4); // measured 3.7e-5 (the synthetic profile's own closure error)
    }
  });

  it("is unchanged by a rigid motion except for the positions and frames, which move with it", () => {
    const rot = rotationMatrix(1, 2, 3, 0.7);
    const p = makeProfile({ n: 200, length: 400e-9, kappa: (s) => 1e7 * (1 + 0.5 * Math.sin(s / 5e-8)), tau: () => 2e6 });
    const q = makeProfile({ n: 200, length: 400e-9, kappa: (s) => 1e7 * (1 + 0.5 * Math.sin(s / 5e-8)), tau: () => 2e6, rotation: rot, translation: [1e-6, -2e-6, 3e-6] });
    const rp = resampleWire(p, 1.3e-9), rq = resampleWire(q, 1.3e-9);
    expect(rq.n).toBe(rp.n);
    for (let k = 0; k < rp.n; k += 17) {
      expect(rq.kappa[k]).toBeCloseTo(rp.kappa[k], 12);
      const x = rp.xyz.subarray(3 * k, 3 * k + 3);
      const moved = [0, 1, 2].map((r) => rot[3 * r] * x[0] + rot[3 * r + 1] * x[1] + rot[3 * r + 2] * x[2] + [1e-6, -2e-6, 3e-6][r]);
      expect(Math.hypot(rq.xyz[3 * k] - moved[0], rq.xyz[3 * k + 1] - moved[1], rq.xyz[3 * k + 2] - moved[2])).toBeLessThan(1e-15); // rounding level for positions near 1e-6 m
    }
  });

  it("keeps undefined torsion undefined, and takes the nearer sample's N where the Frenet normal flips", () => {
    const p = makeProfile({ n: 101, length: 100e-9, kappa: (s) => (s < 50e-9 ? 0 : 1e7), tau: () => 0, straightBelow: 1 });
    const r = resampleWire(p, 0.5e-9);
    expect(Number.isNaN(r.tau[10])).toBe(true);
    const N = p.N.slice();
    for (let i = 51; i < p.n; ++i) for (let c = 0; c < 3; ++c) N[3 * i + c] = -N[3 * i + c];
    const flipped = resampleWire({ ...p, N }, 0.5e-9);
    for (let k = 0; k < flipped.n; ++k) expect(Math.hypot(flipped.N[3 * k], flipped.N[3 * k + 1], flipped.N[3 * k + 2])).toBeCloseTo(1, 12);
  });

  it("refuses a spacing that is not a positive length, or that gives absurdly many sites", () => {
    const p = helixProfile(a, b, 50);
    expect(() => resampleWire(p, 0)).toThrow(new ParameterError("resampleWire", "spacing", "must be a positive length (got 0)"));
    expect(() => resampleWire(p, Number.NaN)).toThrow(ParameterError);
    expect(() => resampleWire(p, 1e-16)).toThrow(/more than 2000000/);
  });

  it("gives both ends for a spacing longer than the wire", () => {
    const p = helixProfile(a, b, 50);
    const r = resampleWire(p, 1);
    expect(r.n).toBe(2);
    expect(r.xyz[0]).toBeCloseTo(p.x[0], 20);
    expect(r.xyz[3]).toBeCloseTo(p.x[p.n - 1], 20);
  });
});
