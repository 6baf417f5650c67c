/**
 * Symmetric positive (semi-)definite matrices stored by rows of their lower envelope ("skyline"),
 * factorised as L D L^T with unit lower L, plus solves and the selected inverse on the envelope.
 *
 * Banded matrices (open splines) and banded-plus-wrapped corners (periodic splines: the last rows
 * are dense in the lower envelope) both fit: cost O(K b^2) for the factorisation and the selected
 * inverse, O(K b) per solve, b the half-bandwidth.
 * Method: George & Liu, "Computer Solution of Large Sparse Positive Definite Systems" (1981), ch. 4
 * (envelope methods); selected inverse by the Takahashi recursion (Takahashi, Fagan & Chin 1973;
 * for splines, Hutchinson & de Hoog 1985, Numer. Math. 47:99). References from memory.
 */
export interface Skyline {
  readonly n: number;
  /** First stored column of each row (<= row). */
  readonly first: Int32Array;
  /** Start of each row in `data`; row i holds columns first[i] .. i. */
  readonly offset: Int32Array;
  readonly data: Float64Array;
}

/** Allocates a zero skyline with the given first columns. */
export function makeSkyline(first: Int32Array): Skyline {
  const n = first.length;
  const offset = new Int32Array(n + 1);
  for (let i = 0; i < n; ++i) offset[i + 1] = offset[i] + (i - first[i] + 1);
  return { n, first, offset, data: new Float64Array(offset[n]) };
}

/** Adds v to entry (i, j) (either order); the entry must lie in the envelope. */
export function skyAdd(a: Skyline, i: number, j: number, v: number): void {
  if (j > i) [i, j] = [j, i];
  a.data[a.offset[i] + j - a.first[i]] += v;
}

/** Entry (i, j) of a skyline, 0 outside the envelope. */
export function skyGet(a: Skyline, i: number, j: number): number {
  if (j > i) [i, j] = [j, i];
  const f = a.first[i];
  return j < f ? 0 : a.data[a.offset[i] + j - f];
}

export function cloneSkyline(a: Skyline): Skyline {
  return { n: a.n, first: a.first, offset: a.offset, data: a.data.slice() };
}

/**
 * In-place L D L^T: on return the strictly lower part holds L and the diagonal holds D.
 * Pivots below `tiny` times the largest diagonal entry are treated as zero (semi-definite input):
 * that row of L is set to zero and D to 0, so solves ignore that direction.
 * Returns the number of such clamped pivots.
 */
export function factorLdl(a: Skyline, tiny = 1e-13): number {
  const { n, first, offset, data } = a;
  let maxDiag = 0;
  for (let i = 0; i < n; ++i) maxDiag = Math.max(maxDiag, Math.abs(data[offset[i] + i - first[i]]));
  const floor = tiny * maxDiag;
  const dvec = new Float64Array(n);
  let clamped = 0;
  for (let i = 0; i < n; ++i) {
    const fi = first[i], oi = offset[i];
    for (let j = fi; j <= i; ++j) {
      const fj = first[j], oj = offset[j];
      const k0 = fi > fj ? fi : fj;
      let s = data[oi + j - fi];
      for (let k = k0; k < j; ++k) s -= data[oi + k - fi] * data[oj + k - fj] * dvec[k];
      if (j < i) data[oi + j - fi] = dvec[j] === 0 ? 0 : s / dvec[j];
      else if (s > floor) dvec[i] = data[oi + i - fi] = s;
      else {
        dvec[i] = data[oi + i - fi] = 0;
        for (let k = fi; k < i; ++k) data[oi + k - fi] = 0;
        ++clamped;
      }
    }
  }
  return clamped;
}

/** Solves (L D L^T) x = b for a factorised skyline; x may alias b. Zero pivots give x = 0 there. */
export function solveLdl(f: Skyline, b: Float64Array, x: Float64Array): Float64Array {
  const { n, first, offset, data } = f;
  if (x !== b) x.set(b);
  for (let i = 0; i < n; ++i) {
    const fi = first[i], oi = offset[i];
    let s = x[i];
    for (let k = fi; k < i; ++k) s -= data[oi + k - fi] * x[k];
    x[i] = s;
  }
  for (let i = 0; i < n; ++i) {
    const d = data[offset[i] + i - first[i]];
    x[i] = d === 0 ? 0 : x[i] / d;
  }
  for (let i = n - 1; i >= 0; --i) {
    const fi = first[i], oi = offset[i];
    const xi = x[i];
    for (let k = fi; k < i; ++k) x[k] -= data[oi + k - fi] * xi;
  }
  return x;
}

/**
 * Solves (L D L^T) x_c = b_c for the three coordinates at once: b interleaved (b[3k + c]), x as
 * x, y, z blocks of K. Each coordinate sees exactly the operations of `solveLdl` (bit-identical);
 * one sweep over the factor serves all three. `w` is scratch of length 3K.
 */
export function solveLdl3(f: Skyline, b: Float64Array, x: Float64Array, w: Float64Array): Float64Array {
  // One loop per function (forward, diagonal, backward, scatter): a loop compiled on the stack
  // before the later loops have run would otherwise be deoptimised on every call.
  forward3(f, b, w);
  diagonal3(f, w);
  backward3(f, w);
  scatter3(w, x, f.n);
  return x;
}

function forward3(f: Skyline, b: Float64Array, w: Float64Array): void {
  const { n, first, offset, data } = f;
  for (let i = 0; i < n; ++i) {
    const fi = first[i], o = offset[i] - fi;
    let s0 = b[3 * i], s1 = b[3 * i + 1], s2 = b[3 * i + 2];
    for (let k = fi; k < i; ++k) {
      const l = data[o + k];
      s0 -= l * w[3 * k]; s1 -= l * w[3 * k + 1]; s2 -= l * w[3 * k + 2];
    }
    w[3 * i] = s0; w[3 * i + 1] = s1; w[3 * i + 2] = s2;
  }
}

function diagonal3(f: Skyline, w: Float64Array): void {
  const { n, first, offset, data } = f;
  for (let i = 0; i < n; ++i) {
    const d = data[offset[i] + i - first[i]];
    if (d === 0) { w[3 * i] = 0; w[3 * i + 1] = 0; w[3 * i + 2] = 0; }
    else { w[3 * i] /= d; w[3 * i + 1] /= d; w[3 * i + 2] /= d; }
  }
}

function backward3(f: Skyline, w: Float64Array): void {
  const { n, first, offset, data } = f;
  for (let i = n - 1; i >= 0; --i) {
    const fi = first[i], o = offset[i] - fi;
    const x0 = w[3 * i], x1 = w[3 * i + 1], x2 = w[3 * i + 2];
    for (let k = fi; k < i; ++k) {
      const l = data[o + k];
      w[3 * k] -= l * x0; w[3 * k + 1] -= l * x1; w[3 * k + 2] -= l * x2;
    }
  }
}

function scatter3(w: Float64Array, x: Float64Array, n: number): void {
  for (let k = 0; k < n; ++k) { x[k] = w[3 * k]; x[n + k] = w[3 * k + 1]; x[2 * n + k] = w[3 * k + 2]; }
}

/** y = L sqrt(D) z for a factorised skyline (draws N(0, A) when z ~ N(0, I)); y must not alias z. */
export function mulLsqrtD(f: Skyline, z: Float64Array, y: Float64Array, sqrtD?: Float64Array): Float64Array {
  const { n, first, offset, data } = f;
  const sd = sqrtD ?? sqrtDiagonal(f);
  for (let i = 0; i < n; ++i) {
    const fi = first[i], oi = offset[i];
    let s = sd[i] * z[i];
    for (let k = fi; k < i; ++k) s += data[oi + k - fi] * sd[k] * z[k];
    y[i] = s;
  }
  return y;
}

/** sqrt(D) of a factorised skyline, for repeated `mulLsqrtD` calls. */
export function sqrtDiagonal(f: Skyline): Float64Array {
  const out = new Float64Array(f.n);
  for (let i = 0; i < f.n; ++i) out[i] = Math.sqrt(f.data[f.offset[i] + i - f.first[i]]);
  return out;
}

/**
 * Selected inverse: the entries of A^{-1} on the envelope of A's factor, as a skyline with the same
 * shape, by the Takahashi recursion Z = D^{-1} L^{-1} + (I - L^T) Z, processed from the last row up.
 * Cost O(K b^2) for banded-plus-dense-tail envelopes. `out`: optional storage for the result's data.
 */
export function selectedInverse(f: Skyline, out?: Float64Array): Skyline {
  const { n, first, offset, data } = f;
  // Every envelope entry is written before it is read (rows are done from the last up), so `out`
  // (storage of the same length, reused by the caller) needs no clearing.
  const z = { n, first, offset, data: out ?? new Float64Array(data.length) };
  const colRows = columnPattern(first);
  const zd = z.data;
  // base[r] + c addresses entry (r, c) of the envelope.
  const base = new Int32Array(n);
  for (let r = 0; r < n; ++r) base[r] = offset[r] - first[r];
  const lk = new Float64Array(n);
  for (let i = n - 1; i >= 0; --i) {
    const rows = colRows[i];
    const nr = rows.length;
    for (let b = 0; b < nr; ++b) lk[b] = data[base[rows[b]] + i];
    const d = data[base[i] + i];
    // Off-diagonal entries Z(j, i) for rows j > i in the pattern of column i, then the diagonal.
    // Rows ascend, so Z(k, j) with the larger index as the row is Z(j, k) for b < a, else Z(k, j).
    for (let a = nr - 1; a >= 0; --a) {
      const j = rows[a], bj = base[j];
      let s = 0;
      for (let b = 0; b < a; ++b) s -= lk[b] * zd[bj + rows[b]];
      for (let b = a; b < nr; ++b) s -= lk[b] * zd[base[rows[b]] + j];
      zd[bj + i] = s;
    }
    let s = d === 0 ? 0 : 1 / d;
    for (let b = 0; b < nr; ++b) s -= lk[b] * zd[base[rows[b]] + i];
    zd[base[i] + i] = s;
  }
  return z;
}

const patternCache = new WeakMap<Int32Array, Int32Array[]>();

/** For each column c, the rows k > c whose envelope reaches c (the column pattern of L); cached per envelope. */
function columnPattern(first: Int32Array): Int32Array[] {
  const hit = patternCache.get(first);
  if (hit) return hit;
  const n = first.length;
  const counts = new Int32Array(n);
  for (let k = 0; k < n; ++k) for (let c = first[k]; c < k; ++c) ++counts[c];
  const rows = Array.from({ length: n }, (_, c) => new Int32Array(counts[c]));
  counts.fill(0);
  for (let k = 0; k < n; ++k) for (let c = first[k]; c < k; ++c) rows[c][counts[c]++] = k;
  patternCache.set(first, rows);
  return rows;
}

/** y = S x[off .. off + n) for a symmetric skyline S (y of length n, not aliasing x). O(n b). */
export function symMul(S: Skyline, x: Float64Array, off: number, y: Float64Array): void {
  const { n, first, offset, data } = S;
  y.fill(0);
  for (let i = 0; i < n; ++i) {
    const fi = first[i], oi = offset[i];
    let s = 0;
    for (let j = fi; j < i; ++j) {
      const a = data[oi + j - fi];
      s += a * x[off + j];
      y[j] += a * x[off + i];
    }
    y[i] += s + data[oi + i - fi] * x[off + i];
  }
}


/**
 * y = S x for the three blocks of length n of x (x, y, z coefficients) at once: for each block the
 * operations of `symMul` in its order (bit-identical), one sweep over S for all three.
 */
export function symMul3(S: Skyline, x: Float64Array, y: Float64Array): void {
  const { n, first, offset, data } = S;
  y.fill(0);
  for (let i = 0; i < n; ++i) {
    const fi = first[i], oi = offset[i] - fi;
    const x0 = x[i], x1 = x[n + i], x2 = x[2 * n + i];
    let s0 = 0, s1 = 0, s2 = 0;
    for (let j = fi; j < i; ++j) {
      const a = data[oi + j];
      s0 += a * x[j]; s1 += a * x[n + j]; s2 += a * x[2 * n + j];
      y[j] += a * x0; y[n + j] += a * x1; y[2 * n + j] += a * x2;
    }
    const d = data[oi + i];
    y[i] += s0 + d * x0; y[n + i] += s1 + d * x1; y[2 * n + i] += s2 + d * x2;
  }
}
