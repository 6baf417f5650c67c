/**
 * A rotation that puts a point set in a canonical orientation: rows of Q are the principal axes of
 * the centred points (largest variance first), each first two axes signed so that the first point
 * has a non-negative coordinate along it, and the third axis e1 x e2 (a proper rotation, so torsion
 * keeps its sign). Fitting in this frame makes every later step, including the seeded random
 * draws of the bootstrap, equivariant under rigid motions of the input.
 * Eigenvectors by cyclic Jacobi rotations (Golub & Van Loan, Matrix Computations, sec. 8.5).
 * Input: centred points, interleaved. Output: Q as 9 numbers, row-major. Cost O(n).
 */
export function canonicalFrame(y: Float64Array): Float64Array {
  const n = y.length / 3;
  const a = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  for (let i = 0; i < n; ++i) {
    for (let r = 0; r < 3; ++r) for (let c = 0; c < 3; ++c) a[3 * r + c] += y[3 * i + r] * y[3 * i + c];
  }
  const v = [1, 0, 0, 0, 1, 0, 0, 0, 1];
  for (let sweep = 0; sweep < 50; ++sweep) {
    const off = a[1] * a[1] + a[2] * a[2] + a[5] * a[5];
    if (off <= 1e-30 * (a[0] * a[0] + a[4] * a[4] + a[8] * a[8])) break;
    for (const [p, q] of [[0, 1], [0, 2], [1, 2]] as const) {
      const apq = a[3 * p + q];
      if (apq === 0) continue;
      const theta = (a[3 * q + q] - a[3 * p + p]) / (2 * apq);
      const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1), s = t * c;
      for (let k = 0; k < 3; ++k) {
        const akp = a[3 * k + p], akq = a[3 * k + q];
        a[3 * k + p] = c * akp - s * akq;
        a[3 * k + q] = s * akp + c * akq;
      }
      for (let k = 0; k < 3; ++k) {
        const apk = a[3 * p + k], aqk = a[3 * q + k];
        a[3 * p + k] = c * apk - s * aqk;
        a[3 * q + k] = s * apk + c * aqk;
      }
      for (let k = 0; k < 3; ++k) {
        const vkp = v[3 * k + p], vkq = v[3 * k + q];
        v[3 * k + p] = c * vkp - s * vkq;
        v[3 * k + q] = s * vkp + c * vkq;
      }
    }
  }
  const order = [0, 1, 2].sort((i, j) => a[4 * j] - a[4 * i]);
  const Q = new Float64Array(9);
  for (let r = 0; r < 2; ++r) {
    const col = order[r];
    let ex = v[col], ey = v[3 + col], ez = v[6 + col];
    // Sign: the first point sits on the non-negative side (else the first point that is off the plane).
    let sgn = 0;
    for (let i = 0; i < n && sgn === 0; ++i) {
      const d = ex * y[3 * i] + ey * y[3 * i + 1] + ez * y[3 * i + 2];
      if (Math.abs(d) > 1e-9 * Math.sqrt(a[4 * col] / Math.max(n, 1))) sgn = Math.sign(d);
    }
    if (sgn < 0) { ex = -ex; ey = -ey; ez = -ez; }
    Q[3 * r] = ex; Q[3 * r + 1] = ey; Q[3 * r + 2] = ez;
  }
  Q[6] = Q[1] * Q[5] - Q[2] * Q[4];
  Q[7] = Q[2] * Q[3] - Q[0] * Q[5];
  Q[8] = Q[0] * Q[4] - Q[1] * Q[3];
  return Q;
}
