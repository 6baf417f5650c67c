/**
 * The geometry core's stages alone: selection medians against a sort (fast-check property, fixed
 * seed), band offsets, the torsion balancing rule, and their edge cases. References: the median of a
 * sorted sample (common practice); helix torsion c/(R^2+c^2) (https://en.wikipedia.org/wiki/Helix).
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { bandOffsets, KAPPA_EXTRAPOLATION } from "../../src/frame/bands.js";
import { fitProfile } from "../../src/frame/profile.js";
import { differenceNoise, medianInPlace, medianOf, selectInPlace, toCanonical } from "../../src/frame/robustStart.js";
import { biasChange, LINEAR_BIAS_SLOPE, linearBiasLaw } from "../../src/frame/torsionLevel.js";
import { FLAG_END, type Profile } from "../../src/types.js";
import { bumpCurve, circleCurve, denseTruth, ellipseCurve, helixCurve, matchTruth, sampleCurve, sampleCurveUneven, trefoilCurve } from "../support/curves.js";
import { normalStream } from "../support/rng.js";

describe("selection medians", () => {
  it("equal the middle of a sorted copy (property, 200 runs, fixed seed)", () => {
    fc.assert(fc.property(fc.array(fc.double({ noNaN: true, min: -1e6, max: 1e6 }), { minLength: 1, maxLength: 60 }), (xs) => {
      const s = [...xs].sort((a, b) => a - b), n = s.length;
      const want = n % 2 ? s[(n - 1) >> 1] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
      expect(medianOf(Float64Array.from(xs))).toBe(want);
      const k = Math.floor(n / 3);
      expect(selectInPlace(Float64Array.from(xs), n, k)).toBe(s[k]);
    }), { seed: 42, numRuns: 200 });
  });

  it("handle the empty and one-value cases", () => {
    expect(medianInPlace(new Float64Array(0))).toBeNaN();
    expect(medianInPlace(Float64Array.of(3))).toBe(3);
  });
});

describe("band offsets", () => {
  it("contain 0 (the estimate) whatever the shift, and widen on the shift's side by a third", () => {
    const sorted = Float64Array.from({ length: 101 }, (_, i) => i / 100 - 0.5); // uniform -0.5..0.5, median 0
    const [lo, hi] = bandOffsets(sorted, 0);
    expect(lo).toBeCloseTo(-0.475, 12); // R-7 quantile at 2.5% of 101 equally spaced values
    expect(hi).toBeCloseTo(0.475, 12);
    const [lo2, hi2] = bandOffsets(sorted, 0.3);
    expect(hi2).toBeCloseTo(0.475 + 0.3 + 0.1, 12);
    expect(lo2).toBeCloseTo(-0.475 + 0.3, 12);
    const [lo3, hi3] = bandOffsets(sorted, 3);
    expect(lo3).toBe(0); // stretched to hold the estimate
    expect(hi3).toBeGreaterThan(3);
    expect(bandOffsets(sorted, NaN)).toEqual([lo, hi]);
    // The curvature's step: r / (1 - r) of the shift with r = 2/3 (a geometric series of the bias
    // left at each quarter of the level, summed: common practice for Richardson extrapolation).
    expect(KAPPA_EXTRAPOLATION).toBe(2);
    const [lo4, hi4] = bandOffsets(sorted, 0.3, KAPPA_EXTRAPOLATION);
    expect(hi4).toBeCloseTo(0.475 + 0.3 + 0.6, 12);
    expect(lo4).toBeCloseTo(-0.475 + 0.3, 12);
    const [lo5, hi5] = bandOffsets(sorted, -0.3, KAPPA_EXTRAPOLATION);
    expect(lo5).toBeCloseTo(-0.475 - 0.3 - 0.6, 12);
    expect(hi5).toBeCloseTo(0.475 - 0.3, 12);
  });
});

describe("curvature bands at a localised peak", () => {
  it("hold an ellipse's tip curvature where the level of least error smooths it 10% low", () => {
    // Ellipse a = 200, b = 60 nm: curvature a b / (a^2 sin^2 t + b^2 cos^2 t)^(3/2), a / b^2 at the
    // tips (plane-curve formula, textbook), evaluated by test/support/curves.ts. 1000 points, 0.5 nm
    // of noise, seed 3: the tip came out 9.7% low, and the bands held the truth at 67 of the 158
    // samples above half the tip's curvature with the linear-bias step (1/3); measured 138 with 2.
    const a = 200e-9, b = 60e-9, curve = ellipseCurve(a, b), truth = denseTruth(curve, 40000);
    const { xyz } = sampleCurve(curve, 1000, 0.5e-9, 3);
    const p = fitProfile({ xyz, dims: 3, source: { file: "ellipse", unit: "nm" }, diagnostics: [] }, { closed: true, bootstrap: 100, seed: 3 });
    const idx = matchTruth(truth, p.x, p.y, p.z, true);
    let inside = 0, count = 0;
    for (let j = 0; j < p.n; ++j) {
      const k = truth.kappa[idx[j]];
      if (k < 0.5 * (a / (b * b))) continue;
      ++count;
      if (p.kappaLo[j] <= k && k <= p.kappaHi[j]) ++inside;
    }
    expect(count).toBeGreaterThan(100);
    expect(inside / count).toBeGreaterThan(0.75);
  });
});

describe("difference-based noise", () => {
  it("is NaN with fewer than 7 points and 0 for exact points on a line", () => {
    expect(differenceNoise(new Float64Array(18), new Float64Array(6), 2)).toBeNaN();
    const y = new Float64Array(60), u = new Float64Array(20);
    for (let i = 0; i < 20; ++i) { y[3 * i] = i; u[i] = i; }
    expect(differenceNoise(y, u, 2)).toBe(0);
  });

  it("does not change when the points are moved rigidly or rescaled (canonical frame)", () => {
    const { xyz } = sampleCurve(helixCurve(1, 0.4, 2), 200, 0.01, 3);
    const a = toCanonical(xyz, false)!, b = toCanonical(xyz.map((v) => 7 * v + 3), false)!;
    for (let k = 0; k < a.y.length; ++k) expect(b.y[k]).toBeCloseTo(a.y[k], 12);
  });
});

describe("torsion balancing rule", () => {
  it("takes the noise out of the change between levels: about b^2 for a bias b, about 0 for noise alone", () => {
    // E (q_k - q_j)^2 = b^2 + Var(q_k - q_j) (bias-variance decomposition, common practice). Two
    // "levels" of 2000 points with independent unit noise, 32 probes from the same law.
    const g = normalStream(17), M = 2000, P = 32;
    const draw = (bias: number) => {
      const q = new Float64Array(M), qp = new Float64Array(M * P);
      for (let a = 0; a < M; ++a) q[a] = bias + g();
      for (let k = 0; k < qp.length; ++k) qp[k] = g();
      return { q, qp };
    };
    const j = draw(0);
    for (const b of [0, 0.5, 2]) {
      const k = draw(b);
      // Sampling error of the mean of 2000 squared differences of variance 2: ~0.09 (1 SD).
      expect(Math.abs(biasChange(k.q, k.qp, j.q, j.qp, P) - b * b)).toBeLessThan(0.3);
    }
    // Points where a value is not finite are skipped; none left: Infinity.
    const nan = Float64Array.from({ length: M }, () => NaN);
    expect(biasChange(nan, j.qp, j.q, j.qp, P)).toBe(Infinity);
  });

  it("smooths a trefoil knot's torsion past the plateau where the plain rule stopped (within 1.6x of the best single level)", () => {
    // Torsion of the trefoil from the Frenet formulas on its closed form (test/support/curves.ts).
    // 1000 points, 1% noise, uneven sampling: measured 1.54x; the plain rule (no noise term) 1.95x.
    const curve = trefoilCurve(1), n = 1000;
    const truth = denseTruth(curve, 20 * n);
    const { xyz } = sampleCurveUneven(curve, n, 0.01 * curve.radius, 207);
    const tr = { xyz, dims: 3 as const, source: { file: "trefoil", unit: "m" as const }, diagnostics: [] };
    const auto = fitProfile(tr, { closed: true, bootstrap: 0, seed: 2 });
    const err = (p: Profile) => {
      const idx = matchTruth(truth, p.x, p.y, p.z, true);
      let e = 0, r = 0;
      for (let j = 0; j < p.n; ++j) { e += ((Number.isNaN(p.tau[j]) ? 0 : p.tau[j]) - truth.tau[idx[j]]) ** 2; r += truth.tau[idx[j]] ** 2; }
      return Math.sqrt(e / r);
    };
    let best = Infinity;
    for (let k = 0; k <= 12; ++k) {
      best = Math.min(best, err(fitProfile(tr, { closed: true, bootstrap: 0, lambda: auto.lambda * Math.pow(10, k / 4), segments: auto.segments })));
    }
    expect(err(auto) / best).toBeLessThan(1.6);
  });

  it("smooths a helix's constant torsion well beyond the curvature level, and recovers it within 3%", () => {
    const R = 1, c = 0.4, t0 = c / (R * R + c * c);
    const { xyz } = sampleCurve(helixCurve(R, c, 4), 800, 0.01, 5);
    const p = fitProfile({ xyz, dims: 3, source: { file: "h", unit: "m" }, diagnostics: [] }, { bootstrap: 0 });
    expect(p.lambdaTorsion / p.lambda).toBeGreaterThan(1.5); // measured 10^0.25 (the curvature level is itself 10^0.5 above the discrepancy level)
    const ts = Array.from(p.tau).filter((_, j) => !(p.flags[j] & FLAG_END));
    const mean = ts.reduce((a, v) => a + v, 0) / ts.length;
    expect(Math.abs(mean / t0 - 1)).toBeLessThan(0.03);
  });

  it("keeps the curvature level for a planar wire (torsion 0 with its band)", () => {
    const xyz = new Float64Array(3 * 300);
    for (let i = 0; i < 300; ++i) { const a = (i / 299) * 3; xyz.set([Math.cos(a), Math.sin(a), 0], 3 * i); }
    const p = fitProfile({ xyz, dims: 3, source: { file: "arc", unit: "m" }, diagnostics: [] }, { bootstrap: 40 });
    expect(p.lambdaTorsion).toBe(p.lambda);
    expect(p.diagnostics).toContain("planar within the noise (out-of-plane spread not above the noise): torsion reported as 0 with its noise band");
  });
});

describe("curvature level (least estimated curvature error)", () => {
  // The truth: helix curvature R/(R^2+c^2) (https://en.wikipedia.org/wiki/Helix); the bump's
  // curvature |y''|/(1+y'^2)^1.5 of y = h exp(-x^2/w^2) (plane-curve formula, common practice),
  // both evaluated by test/support/curves.ts. The benchmark of record is bench/families.ts.
  const cases = [
    { curve: helixCurve(1, 0.4, 4), n: 600, noise: 0.005 },
    { curve: bumpCurve(10, 0.6, 1), n: 600, noise: 0.01 },
  ];
  it("refuses an unknown rule by name, and keeps the passes' level with \"discrepancy\"", () => {
    const { xyz } = sampleCurve(helixCurve(1, 0.4, 2), 300, 0.01, 3);
    const tr = { xyz, dims: 3 as const, source: { file: "h", unit: "m" as const }, diagnostics: [] };
    expect(() => fitProfile(tr, { curvatureRule: "gcv" as "risk" })).toThrow('profile: curvatureRule: must be "risk" or "discrepancy" (got "gcv")');
    const p = fitProfile(tr, { bootstrap: 0, curvatureRule: "discrepancy" });
    expect(p.diagnostics.some((d) => d.startsWith("curvature: smoothing level"))).toBe(false);
    expect(fitProfile(tr, { bootstrap: 0 }).diagnostics.some((d) => d.startsWith("curvature: smoothing level"))).toBe(true);
  });
  it("reads the linear-bias law off the top decade of the ladder, and only that law", () => {
    // A smoother's bias on a slowly varying signal is proportional to its level (the leading term of
    // lambda w^8 / (1 + lambda w^8)): squared bias 10^(2 k / 4) on quarter-decade steps k.
    const top = 12, ladder = (f: (x: number) => number) => Float64Array.from({ length: top + 1 }, (_, k) => f(Math.pow(10, k / 4)));
    const lin = linearBiasLaw(ladder((x) => 3e-6 * x * x), top);
    expect(lin).not.toBeNull();
    expect(lin!.slope).toBeCloseTo(2, 12);
    expect(Math.pow(10, lin!.intercept)).toBeCloseTo(3e-6, 15);
    // Saturating (the feature smoothed away): (x / (1 + x / 30))^2 has slope 0.4 over the top decade.
    expect(linearBiasLaw(ladder((x) => (x / (1 + x / 30)) ** 2), top)).toBeNull();
    // Steeper than 2 (noise at the low end of the decade): capped at 2, through the centroid.
    const steep = linearBiasLaw(ladder((x) => x ** 3), top)!;
    expect(steep.slope).toBe(2);
    // Fewer than 3 positive estimates: no law.
    const few = ladder((x) => x * x); few[9] = few[10] = few[11] = -1;
    expect(linearBiasLaw(few, top)).toBeNull();
    expect(LINEAR_BIAS_SLOPE).toBe(1.5);
  });

  it("ring (constant curvature): the pilot's noise no longer pulls the level a decade low", () => {
    // A ring of radius 1 (curvature 1 everywhere: elementary geometry), 1000 uneven points at 0.2%
    // noise, the draw where the per-level bias estimate chose a decade below the best level and the
    // curvature error was 1.73x the best fixed level's (bench/families.ts, circle N=1000 0.2% s2).
    const curve = circleCurve(1), truth = denseTruth(curve, 20000);
    const { xyz } = sampleCurveUneven(curve, 1000, 0.002, 207);
    const tr = { xyz, dims: 3 as const, source: { file: "ring", unit: "m" as const }, diagnostics: [] };
    const auto = fitProfile(tr, { closed: true, bootstrap: 0, seed: 2 });
    expect(auto.diagnostics.some((d) => d.includes("bias extrapolated from the top of the scan"))).toBe(true);
    const err = (p: Profile) => {
      const idx = matchTruth(truth, p.x, p.y, p.z, true);
      let e = 0;
      for (let j = 0; j < p.n; ++j) e += (p.kappa[j] - truth.kappa[idx[j]]) ** 2;
      return Math.sqrt(e / p.n);
    };
    let best = Infinity;
    for (let k = -4; k <= 6; ++k) best = Math.min(best, err(fitProfile(tr, { closed: true, bootstrap: 0, lambda: auto.lambda * Math.pow(10, k / 4), segments: auto.segments })));
    expect(err(auto) / best).toBeLessThan(1.2); // measured 1.08 (1.73 before the law)
  });

  for (const { curve, n, noise } of cases) {
    it(`${curve.name}: kappa error within 1.5x of the best fixed level of a quarter-decade scan (2 seeds)`, () => {
      const truth = denseTruth(curve, 20 * n);
      for (const seed of [11, 12]) {
        const { xyz } = sampleCurveUneven(curve, n, noise * curve.radius, seed);
        const tr = { xyz, dims: 3 as const, source: { file: curve.name, unit: "m" as const }, diagnostics: [] };
        const auto = fitProfile(tr, { closed: curve.closed, bootstrap: 0 });
        const mask = Array.from(auto.flags, (f) => !(f & FLAG_END));
        const err = (p: Profile) => {
          const idx = matchTruth(truth, p.x, p.y, p.z, curve.closed);
          let e = 0, r = 0;
          for (let j = 0; j < p.n; ++j) if (mask[j]) { e += (p.kappa[j] - truth.kappa[idx[j]]) ** 2; r += truth.kappa[idx[j]] ** 2; }
          return Math.sqrt(e / r);
        };
        let best = Infinity;
        for (let k = -6; k <= 6; ++k) {
          const p = fitProfile(tr, { closed: curve.closed, bootstrap: 0, lambda: auto.lambda * Math.pow(10, k / 4), segments: auto.segments });
          best = Math.min(best, err(p));
        }
        // measured: helix 1.00, bump 1.33 at seed 12 (the target, 1.2x in 90% of cases, is a
        // fraction over many cases: bench/families.ts)
        expect(err(auto) / best).toBeLessThan(1.5);
      }
    });
  }
});
