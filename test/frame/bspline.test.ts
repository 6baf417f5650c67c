import { describe, expect, it } from "vitest";
import { basisAt, makeBasis } from "../../src/frame/bspline.js";

describe("uniform quintic B-spline basis", () => {
  it("has the cardinal knot values 1/120, 26/120, 66/120, 26/120, 1/120 at t = 0", () => {
    // Source: values of the cardinal quintic B-spline at the integers (de Boor, A Practical Guide to
    // Splines, 1978; also Schoenberg's Euler-Frobenius numbers 1, 26, 66, 26, 1).
    const out = new Float64Array(24);
    basisAt(0, 1, 0, out);
    expect(Array.from(out.subarray(0, 6)).map((v) => v * 120)).toEqual([1, 26, 66, 26, 1, 0].map((v) => expect.closeTo(v, 12)));
  });

  it("sums to one and its derivatives sum to zero (partition of unity)", () => {
    const out = new Float64Array(24);
    for (const t of [0, 0.13, 0.5, 0.77, 0.999]) {
      basisAt(t, 0.3, 3, out);
      for (let d = 0; d < 4; ++d) {
        let s = 0;
        for (let j = 0; j < 6; ++j) s += out[d * 6 + j];
        expect(Math.abs(s - (d === 0 ? 1 : 0))).toBeLessThan(1e-9);
      }
    }
  });

  it("derivatives match central differences of the values", () => {
    const h = 0.7, t = 0.41, e = 1e-5;
    const a = new Float64Array(24), b = new Float64Array(24), c = new Float64Array(24);
    basisAt(t, h, 3, a);
    basisAt(t + e, h, 3, b);
    basisAt(t - e, h, 3, c);
    for (let d = 0; d < 3; ++d) {
      for (let j = 0; j < 6; ++j) {
        const fd = (b[d * 6 + j] - c[d * 6 + j]) / (2 * e * h);
        expect(Math.abs(fd - a[(d + 1) * 6 + j])).toBeLessThan(1e-6 * Math.pow(h, -d - 1) * 10);
      }
    }
  });

  it("makes nseg + 5 coefficients for open and nseg for periodic bases", () => {
    expect(makeBasis(0, 1, 20, false).K).toBe(25);
    expect(makeBasis(0, 1, 20, true).K).toBe(20);
  });
});
