import { describe, expect, it } from "vitest";
import { EigenvalueDecomposition, Matrix } from "ml-matrix";
import { symEigen3 } from "../../src/frame/symEigen3.js";
import { canonicalFrame } from "../../src/frame/canonicalFrame.js";
import { mulberry32 } from "../support/rng.js";

describe("symEigen3(m)", () => {
  it("gives the eigenvalues of ml-matrix's decomposition (general-purpose npm library) for random symmetric matrices", () => {
    const rnd = mulberry32(17);
    for (let t = 0; t < 50; ++t) {
      const a = Array.from({ length: 6 }, () => rnd() - 0.5);
      const m = [a[0], a[1], a[2], a[1], a[3], a[4], a[2], a[4], a[5]];
      const ref = new EigenvalueDecomposition(new Matrix([m.slice(0, 3), m.slice(3, 6), m.slice(6, 9)])).realEigenvalues.sort((x, y) => x - y);
      const { values, vectors } = symEigen3(m);
      for (let k = 0; k < 3; ++k) {
        expect(Math.abs(values[k] - ref[k])).toBeLessThan(1e-13); // measured ~1e-16
        // M v = lambda v for the returned row vector
        for (let r = 0; r < 3; ++r) {
          const mv = m[3 * r] * vectors[3 * k] + m[3 * r + 1] * vectors[3 * k + 1] + m[3 * r + 2] * vectors[3 * k + 2];
          expect(Math.abs(mv - values[k] * vectors[3 * k + r])).toBeLessThan(1e-12);
        }
      }
    }
  });
});

describe("canonicalFrame(points)", () => {
  it("returns a proper rotation (orthonormal rows, determinant +1)", () => {
    const rnd = mulberry32(3);
    const y = Float64Array.from({ length: 300 }, () => rnd() - 0.5).map((v, i) => v * (1 + (i % 3)));
    const Q = canonicalFrame(y);
    const row = (r: number) => [Q[3 * r], Q[3 * r + 1], Q[3 * r + 2]];
    const dot = (a: number[], b: number[]) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
    for (let r = 0; r < 3; ++r) for (let c = 0; c < 3; ++c) expect(Math.abs(dot(row(r), row(c)) - (r === c ? 1 : 0))).toBeLessThan(1e-12);
    const [a, b, c] = [row(0), row(1), row(2)];
    const det = a[0] * (b[1] * c[2] - b[2] * c[1]) - a[1] * (b[0] * c[2] - b[2] * c[0]) + a[2] * (b[0] * c[1] - b[1] * c[0]);
    expect(det).toBeCloseTo(1, 12);
  });
});
