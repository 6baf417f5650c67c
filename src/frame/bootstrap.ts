import { basisAt, basisValues, locate, type SplineBasis } from "./bspline.js";

/** Quintic: six active basis functions per interval (local copy: imported bindings are slow in hot loops). */
const ORDER = 6;
const coefIndex = (basis: SplineBasis, i: number, j: number): number => (basis.periodic ? (i + j) % basis.K : i + j);
import { kappaTau } from "./curve.js";
import { envelope } from "./design.js";
import { factorLdl, makeSkyline, mulLsqrtD, solveLdl, solveLdl3, sqrtDiagonal, type Skyline } from "./skyline.js";
export { solveLdl3 } from "./skyline.js";

/** Replicates on the evaluation points, replicate-major: kappa[r * m + j]. */
export interface BootstrapOutput {
  readonly kappa: Float64Array;
  readonly tau: Float64Array;
  /** Per point: mean squared deviation of the curvature vector per normal direction. */
  readonly curvatureVar: Float64Array;
}

/** xoshiro128** seeded by splitmix32 (Blackman & Vigna 2018, public domain); normals by Box-Muller. */
export function normalGenerator(seed: number): () => number {
  // The state lives in typed arrays (closure variables holding doubles or 32-bit integers outside
  // the small-integer range cost a heap allocation per update); the bit operations are unchanged.
  const st = seededState(seed), spare = new Float64Array(1);
  const next = () => {
    let a = st[0], b = st[1], c = st[2], d = st[3];
    const r = Math.imul(((Math.imul(b, 5) << 7) | (Math.imul(b, 5) >>> 25)) >>> 0, 9) >>> 0;
    const t = (b << 9) >>> 0;
    c ^= a; d ^= b; b ^= c; a ^= d; c ^= t;
    d = ((d << 11) | (d >>> 21)) >>> 0;
    st[0] = a; st[1] = b; st[2] = c; st[3] = d;
    return r / 4294967296;
  };
  spare[0] = NaN;
  return () => {
    const sv = spare[0];
    if (!Number.isNaN(sv)) { spare[0] = NaN; return sv; }
    let p = next();
    while (p <= 0) p = next();
    const q = next();
    const r = Math.sqrt(-2 * Math.log(p));
    spare[0] = r * Math.sin(2 * Math.PI * q);
    return r * Math.cos(2 * Math.PI * q);
  };
}

/** The xoshiro128** state of `normalGenerator` (st[0..3]; st[4] the splitmix32 counter). */
function seededState(seed: number): Int32Array {
  const st = new Int32Array(5);
  st[4] = seed >>> 0;
  const split = () => {
    const x = (st[4] + 0x9e3779b9) >>> 0;
    st[4] = x;
    let z = x;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
  st[0] = split(); st[1] = split(); st[2] = split(); st[3] = split();
  return st;
}

/**
 * The stream of `normalGenerator(seed)`, filled into whole arrays: each call continues where the
 * last one ended (a pair's second normal carried over), the same numbers as calling the generator
 * once per entry, without a call per number.
 */
export function normalFiller(seed: number): (out: Float64Array) => void {
  const st = seededState(seed), spare = Float64Array.of(NaN);
  return (out) => fillNormals(st, spare, out);
}

/** The loop of {@link normalFiller}: the generator's operations with the state in locals (the
 * 32-bit words are the same modulo 2^32 whether held signed or unsigned). */
function fillNormals(st: Int32Array, spare: Float64Array, out: Float64Array): void {
  const n = out.length;
  let k = 0;
  if (n === 0) return;
  if (!Number.isNaN(spare[0])) { out[k++] = spare[0]; spare[0] = NaN; }
  let a = st[0], b = st[1], c = st[2], d = st[3];
  while (k < n) {
    let p = 0, q = 0;
    for (let draw = 0; draw < 2; ) {
      const r = Math.imul(((Math.imul(b, 5) << 7) | (Math.imul(b, 5) >>> 25)) >>> 0, 9) >>> 0;
      const t = (b << 9) >>> 0;
      c ^= a; d ^= b; b ^= c; a ^= d; c ^= t;
      d = ((d << 11) | (d >>> 21)) >>> 0;
      const x = r / 4294967296;
      // The first uniform of a pair must be positive (redrawn until it is), as in the generator.
      if (draw === 0) { if (x > 0) { p = x; draw = 1; } } else { q = x; draw = 2; }
    }
    const rad = Math.sqrt(-2 * Math.log(p));
    out[k++] = rad * Math.cos(2 * Math.PI * q);
    const second = rad * Math.sin(2 * Math.PI * q);
    if (k < n) out[k++] = second;
    else spare[0] = second;
  }
  st[0] = a; st[1] = b; st[2] = c; st[3] = d;
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
  const rowBase = new Int32Array(C.n);
  for (let r = 0; r < C.n; ++r) rowBase[r] = C.offset[r] - C.first[r];
  accumulateRhsLaw(basis, u, w, tangent, sigma * sigma, normalDims, C.data, rowBase);
  // A basis richer than the data (sparse traces) makes C singular; a ridge of 1e-9 of its largest
  // diagonal keeps the L D L^T stable and adds a negligible variance.
  addRidge(C, 1e-9);
  factorLdl(C, 0);
  return C;
}

/** The per-point sums of {@link rhsNoiseFactor} into C's data (s2 = sigma^2; a loop of its own for the JIT). */
function accumulateRhsLaw(
  basis: SplineBasis, u: Float64Array, w: Float64Array, tangent: Float64Array, s2: number, normalDims: 1 | 2, data: Float64Array, rowBase: Int32Array,
): void {
  const K = basis.K;
  const st = new Float64Array(1), b = new Float64Array(24), idx = new Int32Array(ORDER);
  for (let p = 0; p < u.length; ++p) {
    const wp = w[p];
    if (wp === 0) continue;
    const tx = tangent[3 * p], ty = tangent[3 * p + 1], tz = tangent[3 * p + 2];
    // The normal-plane projector P (symmetric: entries 0, 1, 2, 4, 5, 8 of the 3 x 3), in locals.
    let p0: number, p1: number, p2: number, p4: number, p5: number, p8: number;
    if (normalDims === 2) {
      p0 = 1 - tx * tx; p1 = -tx * ty; p2 = -tx * tz;
      p4 = 1 - ty * ty; p5 = -ty * tz; p8 = 1 - tz * tz;
    } else {
      // In-plane normal of a curve in the xy plane: n = z x t.
      const nx = -ty, ny = tx, nn2 = nx * nx + ny * ny || 1;
      p0 = (nx * nx) / nn2; p1 = (nx * ny) / nn2; p2 = 0;
      p4 = (ny * ny) / nn2; p5 = 0; p8 = 0;
    }
    const i = locate(basis, u[p], st);
    basisValues(st[0], b);
    const f = wp * wp * s2;
    // Each entry of C gets one term per point (the pairs (j, k) meet distinct coefficient pairs),
    // so the sums run in point order as before; rowBase[r] + q addresses entry (r, q), r >= q.
    if (i + ORDER <= K) {
      // No wrap: coefficients i .. i + 5, so block (i + j, i + k) with i + j > i + k for k < j.
      for (let j = 0; j < ORDER; ++j) {
        const mj = i + j, fb = f * b[j];
        {
          const v = fb * b[j];
          const r0 = rowBase[3 * mj] + 3 * mj, r1 = rowBase[3 * mj + 1] + 3 * mj, r2 = rowBase[3 * mj + 2] + 3 * mj;
          data[r0] += v * p0;
          data[r1] += v * p1; data[r1 + 1] += v * p4;
          data[r2] += v * p2; data[r2 + 1] += v * p5; data[r2 + 2] += v * p8;
        }
        const r0 = rowBase[3 * mj], r1 = rowBase[3 * mj + 1], r2 = rowBase[3 * mj + 2];
        for (let k = 0; k < j; ++k) {
          const v = fb * b[k];
          const q = 3 * (i + k);
          const w0 = v * p0, w1 = v * p1, w2 = v * p2, w4 = v * p4, w5 = v * p5, w8 = v * p8;
          data[r0 + q] += w0; data[r0 + q + 1] += w1; data[r0 + q + 2] += w2;
          data[r1 + q] += w1; data[r1 + q + 1] += w4; data[r1 + q + 2] += w5;
          data[r2 + q] += w2; data[r2 + q + 1] += w5; data[r2 + q + 2] += w8;
        }
      }
      continue;
    }
    for (let j = 0; j < ORDER; ++j) idx[j] = coefIndex(basis, i, j);
    for (let j = 0; j < ORDER; ++j) {
      const mj = idx[j], fb = f * b[j];
      // Diagonal block (lower half).
      {
        const v = fb * b[j];
        const r0 = rowBase[3 * mj] + 3 * mj, r1 = rowBase[3 * mj + 1] + 3 * mj, r2 = rowBase[3 * mj + 2] + 3 * mj;
        data[r0] += v * p0;
        data[r1] += v * p1; data[r1 + 1] += v * p4;
        data[r2] += v * p2; data[r2 + 1] += v * p5; data[r2 + 2] += v * p8;
      }
      for (let k = 0; k < j; ++k) {
        const v = fb * b[k];
        const mk = idx[k];
        const w0 = v * p0, w1 = v * p1, w2 = v * p2, w4 = v * p4, w5 = v * p5, w8 = v * p8;
        // Block (mj, mk) when mj > mk, else its transpose (a periodic basis wraps); P is symmetric.
        const hi = mj > mk ? mj : mk, lo = mj > mk ? mk : mj;
        const q = 3 * lo, r0 = rowBase[3 * hi] + q, r1 = rowBase[3 * hi + 1] + q, r2 = rowBase[3 * hi + 2] + q;
        data[r0] += w0; data[r0 + 1] += w1; data[r0 + 2] += w2;
        data[r1] += w1; data[r1 + 1] += w4; data[r1 + 2] += w5;
        data[r2] += w2; data[r2 + 1] += w5; data[r2 + 2] += w8;
      }
    }
  }
}

/** Adds `ridge` times the largest diagonal entry to every diagonal entry. */
function addRidge(C: Skyline, ridge: number): void {
  let maxDiag = 0;
  for (let r = 0; r < C.n; ++r) maxDiag = Math.max(maxDiag, C.data[C.offset[r] + r - C.first[r]]);
  for (let r = 0; r < C.n; ++r) C.data[C.offset[r] + r - C.first[r]] += ridge * maxDiag;
}

/** Draws dB (3K, coefficient-major) and returns the coefficient perturbation (x, y, z blocks of K)
 * dc = A^{-1} dB for a factorised A. Scratch arrays are allocated by the caller (`drawScratch`);
 * scratch made by `noiseProbes` keeps dB per probe vector (the probes never change), so drawing the
 * same probe through another factor skips the product with C's factor. */
export function drawCoefPerturbation(
  C: Skyline, factor: Skyline, xi: Float64Array, dcOut: Float64Array, scratch: DrawScratch,
): Float64Array {
  let db = scratch.db;
  if (scratch.probeRhs) {
    const hit = scratch.probeRhs.get(xi);
    if (hit && hit.C === C) db = hit.db;
    else {
      db = new Float64Array(xi.length);
      drawRhs(C, xi, db, scratch);
      scratch.probeRhs.set(xi, { C, db });
    }
  } else drawRhs(C, xi, db, scratch);
  solveLdl3(factor, db, dcOut, scratch.sol3 ??= new Float64Array(db.length));
  return dcOut;
}

/**
 * dB = L sqrt(D) xi for C's factor L D L^T (a draw from N(0, C) when xi ~ N(0, I)). The same
 * products as `mulLsqrtD` (L_ik sqrt(D_k) is formed once per factor and reused: bit-identical).
 */
export function drawRhs(C: Skyline, xi: Float64Array, db: Float64Array, scratch: DrawScratch): Float64Array {
  if (scratch.factorOf !== C || !scratch.sqrtD || !scratch.lsd) scaleFactor(C, scratch);
  mulScaled(C, scratch.sqrtD!, scratch.lsd!, xi, db);
  return db;
}

/** scratch.sqrtD = sqrt(D) and scratch.lsd = L_ik sqrt(D_k) of C's factor. */
function scaleFactor(C: Skyline, scratch: DrawScratch): void {
  const sd = sqrtDiagonal(C);
  const { n, first, offset, data } = C;
  const lsd = new Float64Array(data.length);
  for (let i = 0; i < n; ++i) {
    const fi = first[i], oi = offset[i];
    for (let k = fi; k < i; ++k) lsd[oi + k - fi] = data[oi + k - fi] * sd[k];
  }
  scratch.sqrtD = sd;
  scratch.lsd = lsd;
  scratch.factorOf = C;
}

/** db = L sqrt(D) xi from sqrt(D) and the scaled factor (the sums of `mulLsqrtD`, in its order). */
function mulScaled(C: Skyline, sd: Float64Array, lsd: Float64Array, xi: Float64Array, db: Float64Array): void {
  const { n, first, offset } = C;
  for (let i = 0; i < n; ++i) {
    const fi = first[i], o = offset[i] - fi;
    let s = sd[i] * xi[i];
    for (let k = fi; k < i; ++k) s += lsd[o + k] * xi[k];
    db[i] = s;
  }
}

/** `drawRhs` for two vectors at once: each dB the sums of `drawRhs` in its order (bit-identical), one sweep over the scaled factor. */
export function drawRhsPair(C: Skyline, xiA: Float64Array, xiB: Float64Array, dbA: Float64Array, dbB: Float64Array, scratch: DrawScratch): void {
  if (scratch.factorOf !== C || !scratch.sqrtD || !scratch.lsd) scaleFactor(C, scratch);
  mulScaledPair(C, scratch.sqrtD!, scratch.lsd!, xiA, xiB, dbA, dbB);
}

/** The loop of {@link drawRhsPair}. */
function mulScaledPair(C: Skyline, sd: Float64Array, lsd: Float64Array, xiA: Float64Array, xiB: Float64Array, dbA: Float64Array, dbB: Float64Array): void {
  const { n, first, offset } = C;
  for (let i = 0; i < n; ++i) {
    const fi = first[i], o = offset[i] - fi;
    let a = sd[i] * xiA[i], b = sd[i] * xiB[i];
    for (let k = fi; k < i; ++k) { const l = lsd[o + k]; a += l * xiA[k]; b += l * xiB[k]; }
    dbA[i] = a; dbB[i] = b;
  }
}

/** Scratch of {@link drawCoefPerturbation}: dB, the solve's workspace, C's scaled factor, and (for
 * fixed probe vectors only) dB per probe. */
export interface DrawScratch {
  db: Float64Array;
  rhs?: Float64Array | undefined;
  sol?: Float64Array | undefined;
  sqrtD?: Float64Array | undefined;
  /** L sqrt(D) of C's factor, entry by entry on its envelope (strictly lower part). */
  lsd?: Float64Array | undefined;
  /** The C that sqrtD and lsd belong to. */
  factorOf?: Skyline | undefined;
  sol3?: Float64Array | undefined;
  probeRhs?: Map<Float64Array, { C: Skyline; db: Float64Array }> | undefined;
}

/** Scratch for drawing with coefficient count K (vectors xi refilled between draws: no dB cache). */
export function drawScratch(K: number): DrawScratch {
  // Every field present from the start: one object shape for all scratch objects.
  return { db: new Float64Array(3 * K), rhs: undefined, sol: undefined, sqrtD: undefined, lsd: undefined, factorOf: undefined, sol3: new Float64Array(3 * K), probeRhs: undefined };
}

/**
 * `probes` seeded standard-normal vectors of length 3K (common random numbers: the same draws for
 * every smoothing level compared), with the scratch arrays and a perturbation buffer for drawing.
 * The vectors must not be changed: the scratch keeps dB per vector.
 */
export function noiseProbes(K: number, probes: number, seed: number): { xis: Float64Array[]; scratch: DrawScratch; dc: Float64Array } {
  const rnd = normalGenerator(seed);
  const xis: Float64Array[] = [];
  for (let p = 0; p < probes; ++p) {
    const xi = new Float64Array(3 * K);
    for (let k = 0; k < 3 * K; ++k) xi[k] = rnd();
    xis.push(xi);
  }
  const scratch = drawScratch(K);
  scratch.probeRhs = new Map();
  return { xis, scratch, dc: new Float64Array(3 * K) };
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
  const K = gb.basis.K, vals = gb.values;
  const iv = gb.interval[j];
  const wrap = gb.basis.periodic && iv + ORDER > K;
  const bb = 24 * j;
  // Twelve sums over the six active coefficients, in the order of the plain loop (bit-identical).
  let p0 = 0, p1 = 0, p2 = 0, a0 = 0, a1 = 0, a2 = 0, b0 = 0, b1 = 0, b2 = 0, c0 = 0, c1 = 0, c2 = 0;
  for (let q = 0; q < ORDER; ++q) {
    const mm = wrap ? (iv + q) % K : iv + q;
    let cx = cf[mm], cy = cf[K + mm], cz = cf[2 * K + mm];
    if (dc) { cx += dc[mm]; cy += dc[K + mm]; cz += dc[2 * K + mm]; }
    const v0 = vals[bb + q], v1 = vals[bb + 6 + q], v2 = vals[bb + 12 + q], v3 = vals[bb + 18 + q];
    p0 += v0 * cx; p1 += v0 * cy; p2 += v0 * cz;
    a0 += v1 * cx; a1 += v1 * cy; a2 += v1 * cz;
    b0 += v2 * cx; b1 += v2 * cy; b2 += v2 * cz;
    c0 += v3 * cx; c1 += v3 * cy; c2 += v3 * cz;
  }
  d12[0] = p0; d12[1] = p1; d12[2] = p2; d12[3] = a0; d12[4] = a1; d12[5] = a2;
  d12[6] = b0; d12[7] = b1; d12[8] = b2; d12[9] = c0; d12[10] = c1; d12[11] = c2;
  return kappaTau(d12, out);
}

/** out = a + b (the perturbed coefficients, formed once per replicate as kappaTauAt would per point). */
export function addInto(a: Float64Array, b: Float64Array, out: Float64Array): void {
  for (let k = 0; k < out.length; ++k) out[k] = a[k] + b[k];
}

/**
 * First to third derivatives at grid point j for coefficients cs into d12[3..11] (d12[0..2], the
 * position, is left alone: kappaTau does not read it); the sums of kappaTauAt (bit-identical).
 */
export function derivativesAt(gb: GridBasis, cs: Float64Array, j: number, d12: Float64Array): void {
  const K = gb.basis.K, vals = gb.values;
  const iv = gb.interval[j];
  const wrap = gb.basis.periodic && iv + ORDER > K;
  const bb = 24 * j;
  let a0 = 0, a1 = 0, a2 = 0, b0 = 0, b1 = 0, b2 = 0, c0 = 0, c1 = 0, c2 = 0;
  for (let q = 0; q < ORDER; ++q) {
    const mm = wrap ? (iv + q) % K : iv + q;
    const cx = cs[mm], cy = cs[K + mm], cz = cs[2 * K + mm];
    const v1 = vals[bb + 6 + q], v2 = vals[bb + 12 + q], v3 = vals[bb + 18 + q];
    a0 += v1 * cx; a1 += v1 * cy; a2 += v1 * cz;
    b0 += v2 * cx; b1 += v2 * cy; b2 += v2 * cz;
    c0 += v3 * cx; c1 += v3 * cy; c2 += v3 * cz;
  }
  d12[3] = a0; d12[4] = a1; d12[5] = a2; d12[6] = b0; d12[7] = b1; d12[8] = b2; d12[9] = c0; d12[10] = c1; d12[11] = c2;
}

/** One replicate's kappa (and tau, when `tau` is given) on the grid, and the curvature vector's squared deviation added to curvatureVar. */
function replicateKappa(
  grid: GridBasis, cs: Float64Array, kappa: Float64Array, tau: Float64Array | null, off: number, kvec0: Float64Array, curvatureVar: Float64Array, d12: Float64Array, kt: Float64Array,
): void {
  for (let j = 0; j < grid.m; ++j) {
    derivativesAt(grid, cs, j, d12);
    kappaTau(d12, kt);
    kappa[off + j] = kt[0];
    if (tau) tau[off + j] = kt[1];
    const ex = kt[2] - kvec0[3 * j], ey = kt[3] - kvec0[3 * j + 1], ez = kt[4] - kvec0[3 * j + 2];
    curvatureVar[j] += ex * ex + ey * ey + ez * ez;
  }
}

/** One replicate's tau on the grid. */
function replicateTau(grid: GridBasis, cs: Float64Array, tau: Float64Array, off: number, d12: Float64Array, kt: Float64Array): void {
  for (let j = 0; j < grid.m; ++j) {
    derivativesAt(grid, cs, j, d12);
    tau[off + j] = kappaTau(d12, kt)[1];
  }
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
  const m = grid.m;
  const kvec0 = new Float64Array(3 * m);
  curvatureVectors(grid, kappaFit.coef, kvec0);
  const kappa = new Float64Array(R * m), tau = new Float64Array(R * m), curvatureVar = new Float64Array(m);
  drawReplicates(C, grid, kappaFit, tauFit, R, inp.seed, kvec0, { kappa, tau, curvatureVar });
  for (let j = 0; j < m; ++j) curvatureVar[j] /= Math.max(R, 1) * inp.normalDims;
  return { kappa, tau, curvatureVar };
}

/** The curvature vector of the fit `coef` at each grid point (3 per point). */
function curvatureVectors(grid: GridBasis, coef: Float64Array, kvec: Float64Array): void {
  const d12 = new Float64Array(12), kt = new Float64Array(5);
  for (let j = 0; j < grid.m; ++j) {
    kappaTauAt(grid, coef, null, j, d12, kt);
    kvec[3 * j] = kt[2]; kvec[3 * j + 1] = kt[3]; kvec[3 * j + 2] = kt[4];
  }
}

/**
 * The R replicates of {@link bootstrapBands} into out.kappa, out.tau (replicate-major) and the
 * curvature vector's squared deviations summed into out.curvatureVar. Replicates are drawn in pairs
 * (`drawRhsPair`: one sweep over C's factor for two draws), the normals in the same stream order,
 * and each replicate is then finished in turn, so every number is the one drawn one at a time.
 */
function drawReplicates(
  C: Skyline, grid: GridBasis, kappaFit: { readonly coef: Float64Array; readonly factor: Skyline }, tauFit: { readonly coef: Float64Array; readonly factor: Skyline },
  R: number, seed: number, kvec0: Float64Array, out: { readonly kappa: Float64Array; readonly tau: Float64Array; readonly curvatureVar: Float64Array },
): void {
  const K = grid.basis.K, m = grid.m;
  const fill = normalFiller(seed);
  const xiA = new Float64Array(3 * K), xiB = new Float64Array(3 * K), dbB = new Float64Array(3 * K);
  const scratch = drawScratch(K);
  const dbA = scratch.db;
  const rep = { dc: new Float64Array(3 * K), work: scratch.sol3 ?? new Float64Array(3 * K), cs: new Float64Array(3 * K), d12: new Float64Array(12), kt: new Float64Array(5) };
  for (let r = 0; r < R; r += 2) {
    fill(xiA);
    if (r + 1 < R) {
      fill(xiB);
      drawRhsPair(C, xiA, xiB, dbA, dbB, scratch);
    } else drawRhs(C, xiA, dbA, scratch);
    finishReplicate(grid, kappaFit, tauFit, dbA, r * m, kvec0, out, rep);
    if (r + 1 < R) finishReplicate(grid, kappaFit, tauFit, dbB, (r + 1) * m, kvec0, out, rep);
  }
}

/** One replicate from its dB: kappa (and tau) through each fit's factor (one draw serves both factors). */
function finishReplicate(
  grid: GridBasis, kappaFit: { readonly coef: Float64Array; readonly factor: Skyline }, tauFit: { readonly coef: Float64Array; readonly factor: Skyline },
  db: Float64Array, off: number, kvec0: Float64Array, out: { readonly kappa: Float64Array; readonly tau: Float64Array; readonly curvatureVar: Float64Array },
  rep: { readonly dc: Float64Array; readonly work: Float64Array; readonly cs: Float64Array; readonly d12: Float64Array; readonly kt: Float64Array },
): void {
  const sameFactor = kappaFit.factor === tauFit.factor;
  solveLdl3(kappaFit.factor, db, rep.dc, rep.work);
  addInto(kappaFit.coef, rep.dc, rep.cs);
  replicateKappa(grid, rep.cs, out.kappa, sameFactor ? out.tau : null, off, kvec0, out.curvatureVar, rep.d12, rep.kt);
  if (!sameFactor) {
    solveLdl3(tauFit.factor, db, rep.dc, rep.work);
    addInto(tauFit.coef, rep.dc, rep.cs);
    replicateTau(grid, rep.cs, out.tau, off, rep.d12, rep.kt);
  }
}
