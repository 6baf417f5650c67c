/**
 * Eigen-decomposition of a symmetric 3x3 matrix by cyclic Jacobi rotations.
 * Returns eigenvalues ascending and the eigenvectors as rows of `vectors` (vectors[3k..3k+2]
 * belongs to values[k]). Accurate to a few ulps of the largest |eigenvalue|.
 * @example symEigen3(Float64Array.of(2,0,0, 0,1,0, 0,0,3)).values // [1, 2, 3]
 */
export function symEigen3(m: ArrayLike<number>): { values: Float64Array; vectors: Float64Array } {
  const a = Float64Array.from({ length: 9 }, (_, i) => m[i]);
  // symmetrise (callers pass symmetric matrices; this guards against round-off)
  a[1] = a[3] = 0.5 * (a[1] + a[3]);
  a[2] = a[6] = 0.5 * (a[2] + a[6]);
  a[5] = a[7] = 0.5 * (a[5] + a[7]);
  const v = Float64Array.of(1, 0, 0, 0, 1, 0, 0, 0, 1);
  for (let sweep = 0; sweep < 50; ++sweep) {
    const off = a[1] * a[1] + a[2] * a[2] + a[5] * a[5];
    const scale = a[0] * a[0] + a[4] * a[4] + a[8] * a[8] + off;
    if (off <= 1e-32 * scale || off === 0) break;
    for (const [p, q] of [[0, 1], [0, 2], [1, 2]] as const) {
      const apq = a[3 * p + q];
      if (apq === 0) continue;
      const app = a[3 * p + p], aqq = a[3 * q + q];
      const theta = (aqq - app) / (2 * apq);
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
        const vpk = v[3 * p + k], vqk = v[3 * q + k];
        v[3 * p + k] = c * vpk - s * vqk;
        v[3 * q + k] = s * vpk + c * vqk;
      }
    }
  }
  const order = [0, 1, 2].sort((i, j) => a[4 * i] - a[4 * j]);
  const values = new Float64Array(3), vectors = new Float64Array(9);
  order.forEach((src, k) => {
    values[k] = a[4 * src];
    for (let c = 0; c < 3; ++c) vectors[3 * k + c] = v[3 * src + c];
  });
  return { values, vectors };
}
