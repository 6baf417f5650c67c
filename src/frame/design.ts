import { basisValues, locate, type SplineBasis } from "./bspline.js";

/** Quintic: six active basis functions per interval (local copy: imported bindings are slow in hot loops). */
const ORDER = 6;
const coefIndex = (basis: SplineBasis, i: number, j: number): number => (basis.periodic ? (i + j) % basis.K : i + j);
import { makeSkyline, skyAdd, type Skyline } from "./skyline.js";

/** Lower-envelope first columns for a matrix coupling coefficients within `band` (wrapping when periodic). */
export function envelope(K: number, band: number, periodic: boolean, block = 1): Int32Array {
  const n = K * block;
  const first = new Int32Array(n);
  for (let r = 0; r < n; ++r) {
    const m = Math.floor(r / block);
    first[r] = periodic && m >= K - band ? 0 : Math.max(0, (m - band) * block);
  }
  return first;
}

/**
 * Normal equations of a weighted least-squares spline fit to points p_i at parameters u_i:
 * G = B^T W B (K x K skyline), rhs = B^T W y for x, y, z (3 blocks of K), yWy = sum_i w_i |p_i|^2.
 * Cost O(n) with 21 + 18 multiply-adds per point; no allocation per point.
 */
export interface Normal {
  readonly G: Skyline;
  readonly rhs: Float64Array;
  readonly yWy: number;
  /** Sum of the weights. */
  readonly wSum: number;
}

export function normalEquations(
  basis: SplineBasis,
  u: Float64Array,
  xyz: Float64Array,
  w: Float64Array,
): Normal {
  const K = basis.K;
  const G = makeSkyline(envelope(K, ORDER - 1, basis.periodic));
  const rhs = new Float64Array(3 * K);
  const rowBase = new Int32Array(K);
  for (let r = 0; r < K; ++r) rowBase[r] = G.offset[r] - G.first[r];
  const sums = new Float64Array(2);
  // The loop over the points is a function of its own that returns nothing: code the JIT compiles
  // on the stack mid-loop then covers the rest of it (no deoptimisation at a later statement).
  accumulateNormal(basis, u, xyz, w, G.data, rowBase, rhs, sums);
  return { G, rhs, yWy: sums[0], wSum: sums[1] };
}

/** The per-point sums of {@link normalEquations}; sums[0] = yWy, sums[1] = sum of weights. */
function accumulateNormal(
  basis: SplineBasis, u: Float64Array, xyz: Float64Array, w: Float64Array, gd: Float64Array, rowBase: Int32Array, rhs: Float64Array, sums: Float64Array,
): void {
  const K = basis.K;
  const tOut = new Float64Array(1), b = new Float64Array(ORDER), idx = new Int32Array(ORDER);
  let yWy = 0, wSum = 0;
  const n = u.length;
  for (let p = 0; p < n; ++p) {
    const wp = w[p];
    if (wp === 0) continue;
    const i = locate(basis, u[p], tOut);
    basisValues(tOut[0], b);
    const x = xyz[3 * p], y = xyz[3 * p + 1], z = xyz[3 * p + 2];
    yWy += wp * (x * x + y * y + z * z);
    wSum += wp;
    // Each entry of G gets one term per point (distinct coefficient pairs), so the sums run in point
    // order whatever the order within a point; rowBase[m] + q addresses entry (m, q), m >= q.
    if (i + ORDER <= K) {
      // No wrap: coefficients i .. i + 5, the lower triangle of the 6 x 6 block at (i, i).
      for (let j = 0; j < ORDER; ++j) {
        const bj = wp * b[j], m = i + j;
        rhs[m] += bj * x;
        rhs[K + m] += bj * y;
        rhs[2 * K + m] += bj * z;
        const rm = rowBase[m] + i;
        for (let k = 0; k <= j; ++k) gd[rm + k] += bj * b[k];
      }
      continue;
    }
    for (let j = 0; j < ORDER; ++j) idx[j] = coefIndex(basis, i, j);
    for (let j = 0; j < ORDER; ++j) {
      const bj = wp * b[j], m = idx[j];
      rhs[m] += bj * x;
      rhs[K + m] += bj * y;
      rhs[2 * K + m] += bj * z;
      const rm = rowBase[m];
      for (let k = 0; k <= j; ++k) {
        const q = idx[k];
        if (q <= m) gd[rm + q] += bj * b[k];
        else gd[rowBase[q] + m] += bj * b[k];
      }
    }
  }
  sums[0] = yWy;
  sums[1] = wSum;
}

/**
 * Difference penalty P = D^T D of order 4 on the coefficients (Eilers & Marx 1996, Stat. Sci. 11:89),
 * cyclic when the basis is periodic, stored on the same envelope as G.
 */
export function differencePenalty(basis: SplineBasis, rowWeights?: Float64Array): Skyline {
  const K = basis.K;
  const P = makeSkyline(envelope(K, ORDER - 1, basis.periodic));
  const d = [1, -4, 6, -4, 1];
  const rows = basis.periodic ? K : K - 4;
  for (let r = 0; r < rows; ++r) {
    const wr = rowWeights ? rowWeights[r] : 1;
    for (let a = 0; a < 5; ++a) {
      for (let c = 0; c <= a; ++c) {
        const ia = (r + a) % K, ic = (r + c) % K;
        // Diagonal pairs once; off-diagonal pairs (a != c) stand for both (a,c) and (c,a).
        skyAdd(P, ia, ic, wr * d[a] * d[c]);
      }
    }
  }
  return P;
}
