import { symEigen3 } from "./symEigen3.js";

/**
 * A rotation that puts a point set in a canonical orientation: rows of Q are the principal axes of
 * the centred points (largest variance first), each first two axes signed so that the first point
 * has a non-negative coordinate along it, and the third axis e1 x e2 (a proper rotation, so torsion
 * keeps its sign). Fitting in this frame makes every later step, including the seeded random
 * draws of the bootstrap, equivariant under rigid motions of the input.
 * Eigenvectors from `symEigen3` (cyclic Jacobi).
 * Input: centred points, interleaved. Output: Q as 9 numbers, row-major. Cost O(n).
 */
export function canonicalFrame(y: Float64Array): Float64Array {
  const n = y.length / 3;
  const a = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  for (let i = 0; i < n; ++i) {
    for (let r = 0; r < 3; ++r) for (let c = 0; c < 3; ++c) a[3 * r + c] += y[3 * i + r] * y[3 * i + c];
  }
  const { values, vectors } = symEigen3(a);
  const Q = new Float64Array(9);
  for (let r = 0; r < 2; ++r) {
    const k = 2 - r; // eigenvalues ascend: the largest first
    let ex = vectors[3 * k], ey = vectors[3 * k + 1], ez = vectors[3 * k + 2];
    // Sign: the first point sits on the non-negative side (else the first point that is off the plane).
    let sgn = 0;
    for (let i = 0; i < n && sgn === 0; ++i) {
      const d = ex * y[3 * i] + ey * y[3 * i + 1] + ez * y[3 * i + 2];
      if (Math.abs(d) > 1e-9 * Math.sqrt(Math.max(values[k], 0) / Math.max(n, 1))) sgn = Math.sign(d);
    }
    if (sgn < 0) { ex = -ex; ey = -ey; ez = -ez; }
    Q[3 * r] = ex; Q[3 * r + 1] = ey; Q[3 * r + 2] = ez;
  }
  Q[6] = Q[1] * Q[5] - Q[2] * Q[4];
  Q[7] = Q[2] * Q[3] - Q[0] * Q[5];
  Q[8] = Q[0] * Q[4] - Q[1] * Q[3];
  return Q;
}
