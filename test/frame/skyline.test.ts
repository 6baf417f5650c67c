import { describe, expect, it } from "vitest";
import { Matrix, inverse, solve } from "ml-matrix";
import { envelope } from "../../src/frame/design.js";
import { factorLdl, makeSkyline, selectedInverse, skyAdd, skyGet, solveLdl } from "../../src/frame/skyline.js";
import { mulberry32 } from "../support/rng.js";

/** A random SPD matrix on the spline envelope: banded (open) or banded with wrapped corners (periodic). */
function randomSpd(K: number, band: number, periodic: boolean, seed: number) {
  const rnd = mulberry32(seed);
  const A = makeSkyline(envelope(K, band, periodic));
  const dense = Matrix.zeros(K, K);
  for (let i = 0; i < K; ++i) {
    for (let d = 1; d <= band; ++d) {
      const j = periodic ? (i + d) % K : i + d;
      if (j >= K) continue;
      const v = rnd() - 0.5;
      skyAdd(A, i, j, v);
      dense.set(i, j, dense.get(i, j) + v);
      dense.set(j, i, dense.get(j, i) + v);
    }
    const dv = 2 * band + rnd();
    skyAdd(A, i, i, dv);
    dense.set(i, i, dense.get(i, i) + dv);
  }
  return { A, dense };
}

describe("skyline L D L^T against a dense reference (ml-matrix, general-purpose npm library)", () => {
  for (const periodic of [false, true]) {
    it(`solves a ${periodic ? "periodic" : "banded"} SPD system like ml-matrix's dense solve`, () => {
      const K = 40, band = 5;
      const { A, dense } = randomSpd(K, band, periodic, 7);
      const rnd = mulberry32(3);
      const b = Float64Array.from({ length: K }, () => rnd() - 0.5);
      const ref = solve(dense, Matrix.columnVector(Array.from(b))).to1DArray();
      factorLdl(A);
      const x = solveLdl(A, b, new Float64Array(K));
      for (let i = 0; i < K; ++i) expect(Math.abs(x[i] - ref[i])).toBeLessThan(1e-12 * (1 + Math.abs(ref[i]))); // measured ~1e-16
    });

    it(`gives the ${periodic ? "periodic" : "banded"} inverse on its envelope (selected inverse) like a dense inverse`, () => {
      const K = 30, band = 5;
      const { A, dense } = randomSpd(K, band, periodic, 11);
      const inv = inverse(dense);
      factorLdl(A);
      const Z = selectedInverse(A);
      let worst = 0;
      for (let i = 0; i < K; ++i) {
        for (let j = Z.first[i]; j <= i; ++j) worst = Math.max(worst, Math.abs(skyGet(Z, i, j) - inv.get(i, j)));
      }
      expect(worst).toBeLessThan(1e-13); // measured ~1e-17
    });
  }

  it("solves in place when x aliases b", () => {
    const { A, dense } = randomSpd(20, 5, false, 5);
    const b = Float64Array.from({ length: 20 }, (_, i) => Math.sin(i));
    const ref = solve(dense, Matrix.columnVector(Array.from(b))).to1DArray();
    factorLdl(A);
    solveLdl(A, b, b);
    for (let i = 0; i < 20; ++i) expect(b[i]).toBeCloseTo(ref[i], 12);
  });

  it("clamps a zero pivot of a semi-definite matrix instead of dividing by zero", () => {
    const A = makeSkyline(envelope(3, 2, false));
    // rank-1 matrix v v^T, v = (1, 2, 3)
    const v = [1, 2, 3];
    for (let i = 0; i < 3; ++i) for (let j = 0; j <= i; ++j) skyAdd(A, i, j, v[i] * v[j]);
    expect(factorLdl(A)).toBe(2);
    const x = solveLdl(A, Float64Array.from(v), new Float64Array(3));
    for (const xi of x) expect(Number.isFinite(xi)).toBe(true);
  });
});
