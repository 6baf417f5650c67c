/**
 * Speed work on the geometry core must not change its results: the fast kernels against the plain
 * formulations they replaced (bit for bit), and whole profiles against a fixture written before the
 * speed work (1e-9 relative). References: Math.hypot of the JavaScript engine (ECMA-262
 * sec. 21.3.2.18); medians and quantiles of a sorted copy (common practice); the 0-1 principle for sorting
 * networks (Knuth, TAOCP vol. 3, sec. 5.3.4, from memory); the bootstrap stream of the previous
 * closure-based generator (restated below); L D L^T solves column by column (`solveLdl`).
 */
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { placeBandQuantiles, quantileSorted } from "../../src/frame/bands.js";
import { drawRhs, drawRhsPair, drawScratch, gridBasis, kappaTauAt, normalFiller, normalGenerator, solveLdl3 } from "../../src/frame/bootstrap.js";
import { basisAt, basisValues, locate, makeBasis, type SplineBasis } from "../../src/frame/bspline.js";
import { evalCurve, kappaTau } from "../../src/frame/curve.js";
import { hypot2, hypot3 } from "../../src/frame/hypot3.js";
import { median5, median8, medianInPlace, medianOf, selectInPlace } from "../../src/frame/robustStart.js";
import { factorLdl, makeSkyline, mulLsqrtD, solveLdl, symMul, symMul3 } from "../../src/frame/skyline.js";
import { envelope } from "../../src/frame/design.js";
import { speedCaseDigests } from "../support/speedCases.js";
import { normalStream } from "../support/rng.js";

/** The generator as it was before its state moved to typed arrays (xoshiro128** + Box-Muller). */
function closureGenerator(seed: number): () => number {
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

/** evalCurve as a plain sum over locate + basisAt (the formulation it replaced). */
function plainEval(basis: SplineBasis, coef: Float64Array, u: number, nd: number): Float64Array {
  const st = new Float64Array(1), b = new Float64Array(24), out = new Float64Array(12);
  const i = locate(basis, u, st);
  basisAt(st[0], basis.h, nd, b);
  for (let j = 0; j < 6; ++j) {
    const m = basis.periodic ? (i + j) % basis.K : i + j;
    for (let d = 0; d <= nd; ++d) {
      out[3 * d] += b[d * 6 + j] * coef[m];
      out[3 * d + 1] += b[d * 6 + j] * coef[basis.K + m];
      out[3 * d + 2] += b[d * 6 + j] * coef[2 * basis.K + m];
    }
  }
  return out;
}

/** A random symmetric positive definite skyline (block-banded like the bootstrap's C), factorised. */
function randomFactor(K: number, periodic: boolean, block: number, seed: number) {
  const g = normalStream(seed);
  const A = makeSkyline(envelope(K, 5, periodic, block));
  for (let r = 0; r < A.n; ++r) {
    for (let c = A.first[r]; c < r; ++c) A.data[A.offset[r] + c - A.first[r]] = 0.1 * g();
    A.data[A.offset[r] + r - A.first[r]] = 20 + Math.abs(g());
  }
  factorLdl(A, 0);
  return A;
}

const bits = (a: number, b: number) => Object.is(a, b);

describe("fast kernels equal the plain formulations bit for bit", () => {
  it("hypot3 is Math.hypot (seeded random triples over 40 decades, and special values)", () => {
    const g = normalStream(3);
    for (let k = 0; k < 200_000; ++k) {
      const e = () => g() * Math.pow(10, Math.floor(40 * Math.abs(g()) % 40) - 20);
      const x = e(), y = k % 17 === 0 ? 0 : e(), z = k % 19 === 0 ? -0 : e();
      if (!bits(hypot3(x, y, z), Math.hypot(x, y, z))) expect([x, y, z, hypot3(x, y, z)]).toEqual([x, y, z, Math.hypot(x, y, z)]);
    }
    const sp = [0, -0, NaN, Infinity, -Infinity, 1, -2.5, 1e-310, 1e308, 5e-324];
    for (const a of sp) for (const b of sp) for (const c of sp) expect(Object.is(hypot3(a, b, c), Math.hypot(a, b, c))).toBe(true);
  });

  it("hypot2 is Math.hypot of two arguments (seeded random pairs over 40 decades, and special values)", () => {
    // The reference is the engine's own Math.hypot (ECMA-262 sec. 21.3.2.18, V8's implementation).
    const g = normalStream(4);
    for (let k = 0; k < 200_000; ++k) {
      const e = () => g() * Math.pow(10, Math.floor(40 * Math.abs(g()) % 40) - 20);
      const x = k % 23 === 0 ? -0 : e(), y = k % 17 === 0 ? 0 : e();
      if (!bits(hypot2(x, y), Math.hypot(x, y))) expect([x, y, hypot2(x, y)]).toEqual([x, y, Math.hypot(x, y)]);
    }
    const sp = [0, -0, NaN, Infinity, -Infinity, 1, -2.5, 1e-310, 1e308, 5e-324, 3, 4];
    for (const a of sp) for (const b of sp) expect(Object.is(hypot2(a, b), Math.hypot(a, b))).toBe(true);
  });

  it("median5 and median8 equal the median of a sort (every permutation; every 0-1 input)", () => {
    const perms = (n: number): number[][] => (n === 0 ? [[]] : perms(n - 1).flatMap((p) => Array.from({ length: n }, (_, i) => [...p.slice(0, i), n - 1, ...p.slice(i)])));
    for (const p of perms(5)) expect(median5(Float64Array.from(p))).toBe(2);
    // The 0-1 principle: a comparator network that places every 0-1 input right places every input.
    for (let m = 0; m < 256; ++m) {
      const v = Float64Array.from({ length: 8 }, (_, i) => (m >> i) & 1);
      expect(median8(v)).toBe(medianInPlace(v.slice(), 8));
      if (m < 32) expect(median5(v.subarray(0, 5))).toBe(medianInPlace(v.slice(0, 5), 5));
    }
  });

  it("selection above 600 values (Floyd-Rivest) gives the k-th of a sort and partitions around it (seeded; ties, sorted, reversed)", () => {
    const g = normalStream(21);
    for (let t = 0; t < 300; ++t) {
      const n = 601 + Math.floor(Math.abs(g()) * 1500);
      const v = Float64Array.from({ length: n }, () => (t % 3 === 0 ? Math.round(4 * g()) : g()));
      if (t % 7 === 1) v.sort();
      if (t % 7 === 2) v.sort().reverse();
      const s = v.slice().sort();
      const k = Math.min(n - 1, Math.floor(Math.abs(g()) * n / 2));
      const a = v.slice();
      const kth = selectInPlace(a, n, k);
      expect(kth === s[k]).toBe(true); // numerically (a tie of -0 and +0 may pick either)
      let ok = true;
      for (let i = 0; i < n; ++i) if ((i < k && a[i] > kth) || (i > k && a[i] < kth)) ok = false;
      expect(ok).toBe(true);
      expect(medianOf(v) === (n % 2 ? s[(n - 1) >> 1] : 0.5 * (s[n / 2 - 1] + s[n / 2]))).toBe(true);
    }
  });

  it("placeBandQuantiles puts the entries the band quantiles read where a sort puts them (seeded; ties, sorted, reversed, zeros, NaN)", () => {
    const g = normalStream(23);
    for (let t = 0; t < 400; ++t) {
      const n = 1 + Math.floor(Math.abs(g()) * 150) + (t % 5 === 0 ? 200 : 0);
      const v = Float64Array.from({ length: n }, () => (t % 3 === 0 ? Math.round(4 * g()) : g()));
      if (t % 7 === 1) v.sort();
      if (t % 7 === 2) v.sort().reverse();
      if (t % 11 === 3) v[Math.floor(n / 2)] = NaN;
      if (t % 13 === 4) v[0] = -0;
      const s = v.slice().sort();
      const a = placeBandQuantiles(v.slice());
      for (const p of [0.025, 0.5, 0.975]) {
        expect(Object.is(quantileSorted(a, p), quantileSorted(s, p))).toBe(true);
        const lo = Math.floor((n - 1) * p);
        expect(Object.is(a[lo], s[lo])).toBe(true);
        if (lo + 1 < n) expect(Object.is(a[lo + 1], s[lo + 1])).toBe(true);
      }
      expect(Array.from(a.slice().sort())).toEqual(Array.from(v.slice().sort())); // the same values, rearranged
    }
  });

  it("normalGenerator draws the same stream as before (seeds 1, 7 and 2^31 + 5)", () => {
    for (const seed of [1, 7, 2 ** 31 + 5]) {
      const a = normalGenerator(seed), b = closureGenerator(seed);
      for (let k = 0; k < 20_001; ++k) { const va = a(), vb = b(); if (!bits(va, vb)) expect(va).toBe(vb); }
    }
  });

  it("normalFiller fills the stream of the generator before it (seeds 1, 7 and 2^31 + 5; odd and even lengths)", () => {
    for (const seed of [1, 7, 2 ** 31 + 5]) {
      const fill = normalFiller(seed), b = closureGenerator(seed);
      for (const len of [0, 1, 3, 4, 4515, 1, 2, 7, 10_000]) {
        const out = new Float64Array(len);
        fill(out);
        for (let k = 0; k < len; ++k) { const vb = b(); if (!bits(out[k], vb)) expect(out[k]).toBe(vb); }
      }
    }
  });

  it("evalCurve and kappaTauAt equal the plain sums (open and periodic bases, derivatives 0-3)", () => {
    const g = normalStream(11);
    for (const periodic of [false, true]) {
      const basis = makeBasis(0, 1.7, 23, periodic);
      const coef = Float64Array.from({ length: 3 * basis.K }, () => g());
      const dc = Float64Array.from({ length: 3 * basis.K }, () => 1e-3 * g());
      const at = Float64Array.from({ length: 301 }, (_, k) => (1.7 * k) / 300 + (periodic ? 0.3 : 0));
      const grid = gridBasis(basis, at);
      const out = new Float64Array(12), d12 = new Float64Array(12), kt = new Float64Array(5), kp = new Float64Array(5);
      for (let j = 0; j < at.length; ++j) {
        for (let nd = 0; nd <= 3; ++nd) {
          out.fill(0);
          evalCurve(basis, coef, at[j], nd, out);
          expect(Array.from(out)).toEqual(Array.from(plainEval(basis, coef, at[j], nd)));
        }
        const sum = coef.map((c, k) => c + dc[k]);
        kappaTauAt(grid, coef, dc, j, d12, kt);
        expect(Array.from(d12)).toEqual(Array.from(plainEval(basis, sum, at[j], 3)));
        expect(Array.from(kt)).toEqual(Array.from(kappaTau(plainEval(basis, sum, at[j], 3), kp)));
      }
    }
  });

  it("drawRhs and drawRhsPair equal mulLsqrtD and solveLdl3 equals solveLdl per coordinate (open and periodic)", () => {
    const g = normalStream(12);
    for (const periodic of [false, true]) {
      const K = 40;
      const C = randomFactor(K, periodic, 3, 5), A = randomFactor(K, periodic, 1, 6);
      const xi = Float64Array.from({ length: 3 * K }, () => g());
      const scratch = drawScratch(K);
      const db = drawRhs(C, xi, scratch.db, scratch);
      expect(Array.from(db)).toEqual(Array.from(mulLsqrtD(C, xi, new Float64Array(3 * K))));
      const xi2 = Float64Array.from({ length: 3 * K }, () => g()), dbA = new Float64Array(3 * K), dbB = new Float64Array(3 * K);
      drawRhsPair(C, xi, xi2, dbA, dbB, drawScratch(K));
      expect(Array.from(dbA)).toEqual(Array.from(db));
      expect(Array.from(dbB)).toEqual(Array.from(mulLsqrtD(C, xi2, new Float64Array(3 * K))));
      const x = solveLdl3(A, db, new Float64Array(3 * K), new Float64Array(3 * K));
      for (let c = 0; c < 3; ++c) {
        const b = Float64Array.from({ length: K }, (_, k) => db[3 * k + c]);
        expect(Array.from(x.subarray(c * K, (c + 1) * K))).toEqual(Array.from(solveLdl(A, b, new Float64Array(K))));
      }
    }
  });

  it("basisValues equals the values of basisAt (seeded local coordinates, the ends of the interval, extrapolation)", () => {
    const g = normalStream(14);
    const a = new Float64Array(24), b = new Float64Array(6);
    for (const t of [0, 1, 1 - 1e-16, -1e-12, 1 + 1e-12, ...Array.from({ length: 2000 }, () => Math.abs(g()) % 1)]) {
      basisAt(t, 0.37, 0, a);
      basisValues(t, b);
      for (let j = 0; j < 6; ++j) expect(bits(a[j], b[j])).toBe(true);
    }
  });

  it("symMul3 equals symMul per coordinate block (open and periodic)", () => {
    const g = normalStream(13);
    for (const periodic of [false, true]) {
      const K = 40;
      const S = randomFactor(K, periodic, 1, 7); // any envelope-shaped symmetric matrix will do
      const x = Float64Array.from({ length: 3 * K }, () => g());
      const y3 = new Float64Array(3 * K);
      symMul3(S, x, y3);
      for (let c = 0; c < 3; ++c) {
        const y = new Float64Array(K);
        symMul(S, x, c * K, y);
        expect(Array.from(y3.subarray(c * K, (c + 1) * K))).toEqual(Array.from(y));
      }
    }
  });
});

describe("whole profiles equal those from before the speed work", () => {
  it("kappa, tau, their bands and the levels within 1e-9 relative (3 seeded invented curves)", () => {
    // Fixture: written by the code before the speed work (see test/support/speedCases.ts).
    const want = JSON.parse(readFileSync(new URL("./fixtures/speedInvariance.json", import.meta.url), "utf8")) as Record<string, Record<string, (number | null)[] | number>>;
    const got = speedCaseDigests();
    expect(Object.keys(got)).toEqual(Object.keys(want));
    for (const name of Object.keys(want)) {
      for (const field of Object.keys(want[name])) {
        const a = want[name][field], b = got[name][field];
        const as = Array.isArray(a) ? a : [a], bs = Array.isArray(b) ? b : [b];
        expect(bs.length, `${name} ${field}`).toBe(as.length);
        let big = 0;
        for (const v of as) if (v !== null) big = Math.max(big, Math.abs(v));
        for (let k = 0; k < as.length; ++k) {
          const x = as[k], y = bs[k];
          if (x === null || y === null) { expect(y, `${name} ${field}[${k}]`).toBe(x); continue; }
          const rel = Math.abs(x - y) / Math.max(Math.abs(x), Math.abs(y), 1e-12 * big);
          if (!(rel <= 1e-9)) expect(y, `${name} ${field}[${k}]`).toBe(x);
        }
      }
    }
  });
});
