import { basisAt, locate, type SplineBasis } from "./bspline.js";

/** Quintic: six active basis functions per interval (local copy: imported bindings are slow in hot loops). */
const ORDER = 6;
const coefIndex = (basis: SplineBasis, i: number, j: number): number => (basis.periodic ? (i + j) % basis.K : i + j);
import { kappaTau } from "./curve.js";
import { envelope } from "./design.js";
import { factorLdl, makeSkyline, mulLsqrtD, solveLdl, sqrtDiagonal, type Skyline } from "./skyline.js";

/** Replicates on the evaluation points, replicate-major: kappa[r * m + j]. */
export interface BootstrapOutput {
  readonly kappa: Float64Array;
  readonly tau: Float64Array;
  /** Per point: mean squared deviation of the curvature vector per normal direction. */
  readonly curvatureVar: Float64Array;
}

/** xoshiro128** seeded by splitmix32 (Blackman & Vigna 2018, public domain); normals by Box-Muller. */
export function normalGenerator(seed: number): () => number {
  let x = seed >>> 0;
  const split = () => {
    x = (x + 0x9e3779b9) >>> 0;
    let z = x;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
  let a = split(), b = split(), c = split(), d = split();
  const next = () => {
    const r = Math.imul(((Math.imul(b, 5) << 7) | (Math.imul(b, 5) >>> 25)) >>> 0, 9) >>> 0;
    const t = (b << 9) >>> 0;
    c ^= a; d ^= b; b ^= c; a ^= d; c ^= t;
    d = ((d << 11) | (d >>> 21)) >>> 0;
    return r / 4294967296;
  };
  let spare = NaN;
  return () => {
    if (!Number.isNaN(spare)) { const v = spare; spare = NaN; return v; }
    let p = next();
    while (p <= 0) p = next();
    const q = next();
    const r = Math.sqrt(-2 * Math.log(p));
    spare = r * Math.sin(2 * Math.PI * q);
    return r * Math.cos(2 * Math.PI * q);
  };
}

/**
 * Law of the perturbation dB = B^T W dy of the right-hand side under normal-plane noise
 * dy_i = sigma P_i xi_i (P_i the projector on the normal plane of the fit at point i):
 * N(0, sigma^2 sum_i w_i^2 (b_i b_i^T) (x) P_i), a 3K x 3K block-banded matrix (coefficient-major,
 * coordinate-minor), returned factorised so that draws cost O(K b). Cost O(n b^2) to build.
 */
export function rhsNoiseFactor(
  basis: SplineBasis, u: Float64Array, w: Float64Array, tangent: Float64Array, sigma: number, normalDims: 1 | 2,
): Skyline {
  const K = basis.K;
  const C = makeSkyline(envelope(K, ORDER - 1, basis.periodic, 3));
  const st = new Float64Array(1), b = new Float64Array(24), idx = new Int32Array(ORDER);
  const Pm = new Float64Array(9);
  const s2 = sigma * sigma;
  for (let p = 0; p < u.length; ++p) {
    const wp = w[p];
    if (wp === 0) continue;
    const tx = tangent[3 * p], ty = tangent[3 * p + 1], tz = tangent[3 * p + 2];
    if (normalDims === 2) {
      Pm[0] = 1 - tx * tx; Pm[1] = -tx * ty; Pm[2] = -tx * tz;
      Pm[4] = 1 - ty * ty; Pm[5] = -ty * tz; Pm[8] = 1 - tz * tz;
    } else {
      // In-plane normal of a curve in the xy plane: n = z x t.
      const nx = -ty, ny = tx, nn2 = nx * nx + ny * ny || 1;
      Pm[0] = (nx * nx) / nn2; Pm[1] = (nx * ny) / nn2; Pm[2] = 0;
      Pm[4] = (ny * ny) / nn2; Pm[5] = 0; Pm[8] = 0;
    }
    Pm[3] = Pm[1]; Pm[6] = Pm[2]; Pm[7] = Pm[5];
    const i = locate(basis, u[p], st);
    basisAt(st[0], basis.h, 0, b);
    for (let j = 0; j < ORDER; ++j) idx[j] = coefIndex(basis, i, j);
    const f = wp * wp * s2;
    for (let j = 0; j < ORDER; ++j) {
      for (let k = 0; k <= j; ++k) {
        const v = f * b[j] * b[k];
        const mj = idx[j], mk = idx[k];
        for (let a = 0; a < 3; ++a) {
          for (let c = 0; c < 3; ++c) {
            const r = 3 * mj + a, q = 3 * mk + c;
            if (j === k && q > r) continue; // diagonal block: lower half only
            // Inlined skyAdd (hot loop).
            if (q <= r) C.data[C.offset[r] + q - C.first[r]] += v * Pm[3 * a + c];
            else C.data[C.offset[q] + r - C.first[q]] += v * Pm[3 * a + c];
          }
        }
      }
    }
  }
  // A basis richer than the data (sparse traces) makes C singular; a ridge of 1e-9 of its largest
  // diagonal keeps the L D L^T stable and adds a negligible variance.
  let maxDiag = 0;
  for (let r = 0; r < C.n; ++r) maxDiag = Math.max(maxDiag, C.data[C.offset[r] + r - C.first[r]]);
  for (let r = 0; r < C.n; ++r) C.data[C.offset[r] + r - C.first[r]] += 1e-9 * maxDiag;
  factorLdl(C, 0);
  return C;
}

/** Draws dB (3K, coefficient-major) and returns the coefficient perturbation (x, y, z blocks of K)
 * dc = A^{-1} dB for a factorised A. Scratch arrays are allocated by the caller. */
export function drawCoefPerturbation(
  C: Skyline, factor: Skyline, xi: Float64Array, dcOut: Float64Array, scratch: { db: Float64Array; rhs: Float64Array; sol: Float64Array; sqrtD?: Float64Array },
): Float64Array {
  const K = factor.n;
  scratch.sqrtD ??= sqrtDiagonal(C);
  mulLsqrtD(C, xi, scratch.db, scratch.sqrtD);
  for (let c = 0; c < 3; ++c) {
    for (let k = 0; k < K; ++k) scratch.rhs[k] = scratch.db[3 * k + c];
    solveLdl(factor, scratch.rhs, scratch.sol);
    dcOut.set(scratch.sol, c * K);
  }
  return dcOut;
}

/** Scratch arrays of {@link drawCoefPerturbation}. */
export interface DrawScratch { db: Float64Array; rhs: Float64Array; sol: Float64Array; sqrtD?: Float64Array }

/**
 * `probes` seeded standard-normal vectors of length 3K (common random numbers: the same draws for
 * every smoothing level compared), with the scratch arrays and a perturbation buffer for drawing.
 */
export function noiseProbes(K: number, probes: number, seed: number): { xis: Float64Array[]; scratch: DrawScratch; dc: Float64Array } {
  const rnd = normalGenerator(seed);
  const xis: Float64Array[] = [];
  for (let p = 0; p < probes; ++p) {
    const xi = new Float64Array(3 * K);
    for (let k = 0; k < 3 * K; ++k) xi[k] = rnd();
    xis.push(xi);
  }
  return { xis, scratch: { db: new Float64Array(3 * K), rhs: new Float64Array(K), sol: new Float64Array(K) }, dc: new Float64Array(3 * K) };
}

/** Basis values and derivatives tabulated at fixed parameters, for repeated evaluation. */
export interface GridBasis {
  readonly basis: SplineBasis;
  readonly m: number;
  readonly interval: Int32Array;
  readonly values: Float64Array;
}

export function gridBasis(basis: SplineBasis, at: Float64Array): GridBasis {
  const m = at.length;
  const values = new Float64Array(m * 24), interval = new Int32Array(m);
  const st = new Float64Array(1);
  for (let j = 0; j < m; ++j) {
    interval[j] = locate(basis, at[j], st);
    basisAt(st[0], basis.h, 3, values.subarray(24 * j, 24 * j + 24));
  }
  return { basis, m, interval, values };
}

/** kappa, tau and the curvature vector at grid point j for coefficients cf (+ optional dc). */
export function kappaTauAt(gb: GridBasis, cf: Float64Array, dc: Float64Array | null, j: number, d12: Float64Array, out: Float64Array): Float64Array {
  const basis = gb.basis, K = basis.K;
  d12.fill(0);
  const bb = 24 * j;
  for (let q = 0; q < ORDER; ++q) {
    const mm = coefIndex(basis, gb.interval[j], q);
    let cx = cf[mm], cy = cf[K + mm], cz = cf[2 * K + mm];
    if (dc) { cx += dc[mm]; cy += dc[K + mm]; cz += dc[2 * K + mm]; }
    for (let d = 0; d < 4; ++d) {
      const v = gb.values[bb + d * 6 + q];
      d12[3 * d] += v * cx; d12[3 * d + 1] += v * cy; d12[3 * d + 2] += v * cz;
    }
  }
  return kappaTau(d12, out);
}

/**
 * Parametric bootstrap of kappa and tau through the linear smoother (NUMERICS.md step 7): a
 * replicate is c + dc with dc = (G + lambda P)^{-1} dB, dB drawn from its exact Gaussian law
 * (`rhsNoiseFactor`) instead of drawing n noise vectors, so a replicate costs O(K b + m) whatever
 * the number of points n. Kappa comes from the curvature-level fit and tau from the torsion-level
 * fit (each with its own factor), driven by the same draw.
 */
export function bootstrapBands(inp: {
  readonly C: Skyline;
  readonly grid: GridBasis;
  readonly kappaFit: { readonly coef: Float64Array; readonly factor: Skyline };
  readonly tauFit: { readonly coef: Float64Array; readonly factor: Skyline };
  readonly normalDims: 1 | 2;
  readonly replicates: number;
  readonly seed: number;
}): BootstrapOutput {
  const { C, grid, kappaFit, tauFit, replicates: R } = inp;
  const K = grid.basis.K, m = grid.m;
  const d12 = new Float64Array(12), kt = new Float64Array(5);
  const kvec0 = new Float64Array(3 * m);
  for (let j = 0; j < m; ++j) {
    kappaTauAt(grid, kappaFit.coef, null, j, d12, kt);
    kvec0[3 * j] = kt[2]; kvec0[3 * j + 1] = kt[3]; kvec0[3 * j + 2] = kt[4];
  }
  const kappa = new Float64Array(R * m), tau = new Float64Array(R * m), curvatureVar = new Float64Array(m);
  const rnd = normalGenerator(inp.seed);
  const xi = new Float64Array(3 * K), dc = new Float64Array(3 * K);
  const scratch: { db: Float64Array; rhs: Float64Array; sol: Float64Array; sqrtD?: Float64Array } = { db: new Float64Array(3 * K), rhs: new Float64Array(K), sol: new Float64Array(K) };
  const sameFactor = kappaFit.factor === tauFit.factor;
  for (let r = 0; r < R; ++r) {
    for (let k = 0; k < 3 * K; ++k) xi[k] = rnd();
    drawCoefPerturbation(C, kappaFit.factor, xi, dc, scratch);
    for (let j = 0; j < m; ++j) {
      kappaTauAt(grid, kappaFit.coef, dc, j, d12, kt);
      kappa[r * m + j] = kt[0];
      if (sameFactor) tau[r * m + j] = kt[1];
      const ex = kt[2] - kvec0[3 * j], ey = kt[3] - kvec0[3 * j + 1], ez = kt[4] - kvec0[3 * j + 2];
      curvatureVar[j] += ex * ex + ey * ey + ez * ez;
    }
    if (!sameFactor) {
      drawCoefPerturbation(C, tauFit.factor, xi, dc, scratch);
      for (let j = 0; j < m; ++j) tau[r * m + j] = kappaTauAt(grid, tauFit.coef, dc, j, d12, kt)[1];
    }
  }
  for (let j = 0; j < m; ++j) curvatureVar[j] /= Math.max(R, 1) * inp.normalDims;
  return { kappa, tau, curvatureVar };
}
