/**
 * Uniform quintic B-spline basis (degree 5) on an open or periodic knot grid.
 *
 * Method: cardinal B-splines by the Cox-de Boor recursion (de Boor, "A Practical Guide to Splines",
 * 1978, ch. IX), tabulated once as polynomial pieces so that evaluation is a 6x6 matrix product.
 * On knot interval i (u in [u0 + i h, u0 + (i + 1) h)), the six active basis functions have
 * coefficient indices i .. i+5 (open) or (i .. i+5) mod K (periodic).
 */

export const DEGREE = 5;
export const ORDER = DEGREE + 1;

/** Cardinal B-spline of degree k with support [0, k+1], by the Cox-de Boor recursion. */
function cardinal(k: number, x: number): number {
  if (k === 0) return x >= 0 && x < 1 ? 1 : 0;
  return (x * cardinal(k - 1, x) + (k + 1 - x) * cardinal(k - 1, x - 1)) / k;
}

/**
 * PIECES[j * 6 + p]: coefficient of t^p in the basis function with local index j (0..5) on an
 * interval, t in [0, 1). Basis j is the cardinal piece B5(t + 5 - j).
 */
export const PIECES: Float64Array = (() => {
  // Exact polynomial pieces by solving a Vandermonde system at 6 rational nodes (well conditioned).
  const nodes = [0, 0.2, 0.4, 0.6, 0.8, 1 - 1e-15];
  const out = new Float64Array(36);
  for (let j = 0; j < ORDER; ++j) {
    const v = nodes.map((t) => cardinal(DEGREE, t + DEGREE - j));
    // Solve V a = v with V[r][p] = t_r^p by Gaussian elimination with partial pivoting.
    const m = nodes.map((t, r) => [...Array.from({ length: ORDER }, (_, p) => t ** p), v[r]]);
    for (let c = 0; c < ORDER; ++c) {
      let piv = c;
      for (let r = c + 1; r < ORDER; ++r) if (Math.abs(m[r][c]) > Math.abs(m[piv][c])) piv = r;
      [m[c], m[piv]] = [m[piv], m[c]];
      for (let r = 0; r < ORDER; ++r) {
        if (r === c) continue;
        const f = m[r][c] / m[c][c];
        for (let q = c; q <= ORDER; ++q) m[r][q] -= f * m[c][q];
      }
    }
    for (let p = 0; p < ORDER; ++p) out[j * ORDER + p] = m[p][ORDER] / m[p][p];
  }
  // The pieces are rationals with denominator 120: round away the solve's last-bit noise.
  for (let i = 0; i < 36; ++i) out[i] = Math.round(out[i] * 120) / 120;
  return out;
})();

/** Knot grid of a uniform quintic spline over [u0, u0 + nseg * h]. */
export interface SplineBasis {
  readonly periodic: boolean;
  readonly nseg: number;
  readonly u0: number;
  readonly h: number;
  /** Number of coefficients: nseg + 5 (open) or nseg (periodic). */
  readonly K: number;
}

/** Makes a basis with `nseg` intervals over [u0, u1]; periodic needs nseg >= 6. */
export function makeBasis(u0: number, u1: number, nseg: number, periodic: boolean): SplineBasis {
  const n = Math.max(periodic ? ORDER : 1, Math.round(nseg));
  return { periodic, nseg: n, u0, h: (u1 - u0) / n, K: periodic ? n : n + DEGREE };
}

/**
 * Locates u: returns the interval index and writes the local coordinate t to `out[0]`.
 * Open bases clamp to the end intervals (evaluation then extrapolates the end polynomial slightly,
 * which only happens for u a rounding error outside the domain). Periodic bases wrap.
 */
export function locate(basis: SplineBasis, u: number, out: Float64Array): number {
  let x = (u - basis.u0) / basis.h;
  if (basis.periodic) {
    x -= Math.floor(x / basis.nseg) * basis.nseg;
    let i = Math.floor(x);
    if (i >= basis.nseg) i = basis.nseg - 1;
    out[0] = x - i;
    return i;
  }
  let i = Math.floor(x);
  if (i < 0) i = 0;
  else if (i >= basis.nseg) i = basis.nseg - 1;
  out[0] = x - i;
  return i;
}

/** Coefficient index of local basis j on interval i. */
export function coefIndex(basis: SplineBasis, i: number, j: number): number {
  const m = i + j;
  return basis.periodic ? m % basis.K : m;
}

/**
 * Basis values and derivatives up to order `nd` (<= 3) at local coordinate t, with respect to u
 * (so divided by h^d). Writes out[d * 6 + j]. No allocation.
 */
export function basisAt(t: number, h: number, nd: number, out: Float64Array): void {
  const t2 = t * t, t3 = t2 * t, t4 = t3 * t, t5 = t4 * t;
  const ih = 1 / h;
  for (let j = 0; j < 6; ++j) {
    const a0 = PIECES[j * 6], a1 = PIECES[j * 6 + 1], a2 = PIECES[j * 6 + 2];
    const a3 = PIECES[j * 6 + 3], a4 = PIECES[j * 6 + 4], a5 = PIECES[j * 6 + 5];
    out[j] = a0 + a1 * t + a2 * t2 + a3 * t3 + a4 * t4 + a5 * t5;
    if (nd >= 1) out[6 + j] = (a1 + 2 * a2 * t + 3 * a3 * t2 + 4 * a4 * t3 + 5 * a5 * t4) * ih;
    if (nd >= 2) out[12 + j] = (2 * a2 + 6 * a3 * t + 12 * a4 * t2 + 20 * a5 * t3) * ih * ih;
    if (nd >= 3) out[18 + j] = (6 * a3 + 24 * a4 * t + 60 * a5 * t2) * ih * ih * ih;
  }
}

/**
 * Basis values alone at local coordinate t into out[0..5]: the `nd = 0` part of `basisAt` with its
 * arithmetic (bit-identical), small enough for the JIT to inline into per-point loops.
 */
export function basisValues(t: number, out: Float64Array): void {
  const t2 = t * t, t3 = t2 * t, t4 = t3 * t, t5 = t4 * t;
  for (let j = 0; j < 6; ++j) {
    out[j] = PIECES[j * 6] + PIECES[j * 6 + 1] * t + PIECES[j * 6 + 2] * t2 + PIECES[j * 6 + 3] * t3 + PIECES[j * 6 + 4] * t4 + PIECES[j * 6 + 5] * t5;
  }
}
