/**
 * Never a silent wrong answer: the robust start, the divergence guard and the refusals of the
 * geometry core, each refusal with its full message. Reference values: helix kappa = R/(R^2+c^2),
 * tau = c/(R^2+c^2) (https://en.wikipedia.org/wiki/Helix); everything else is a property of the
 * input (a straight line has kappa = 0 and no torsion: common practice).
 */
import { describe, expect, it } from "vitest";
import { detectClosed } from "../../src/frame/detectClosed.js";
import { fitProfile } from "../../src/frame/profile.js";
import { grossOutliers, differenceNoise, findOverlap, findRetrace, referenceLength } from "../../src/frame/robustStart.js";
import { FLAG_BIAS, FLAG_END, FLAG_TORSION_UNDEFINED, type Profile, type Trace } from "../../src/types.js";
import { bumpCurve, circleCurve, helixCurve, sampleCurve, sampleCurveUneven, vivianiCurve } from "../support/curves.js";
import { mulberry32, normalStream } from "../support/rng.js";
import { checkPass } from "../../src/frame/fitGuard.js";

const trace = (xyz: Float64Array, extra: Partial<Trace> = {}): Trace => ({
  xyz, dims: 3, source: { file: "w.csv", unit: "nm" }, diagnostics: [], rows: Int32Array.from({ length: xyz.length / 3 }, (_, i) => i + 2), ...extra,
});
const interiorMedian = (p: Profile, key: "kappa" | "tau") => {
  const v = Array.from(p[key]).filter((x, j) => Number.isFinite(x) && !(p.flags[j] & FLAG_END)).sort((a, b) => a - b);
  return v[v.length >> 1];
};

// A 780 nm helix: radius 60 nm, pitch 2 pi 25 nm = 157 nm (invented test geometry).
const R = 60e-9, c = 25e-9;
const k0 = R / (R * R + c * c), t0 = c / (R * R + c * c);
const helix = helixCurve(R, c, 780e-9 / (2 * Math.PI * Math.hypot(R, c)));
const clean = sampleCurve(helix, 400, 1e-9, 3).xyz;

/** Out to point `to` of the helix and back to point `back`, the way back 0.36 nm off the way out. */
function outAndBack(x: Float64Array, to: number, back: number): Float64Array {
  const pts: number[] = [];
  for (let i = 0; i <= to; ++i) pts.push(x[3 * i], x[3 * i + 1], x[3 * i + 2]);
  for (let i = to - 1; i >= back; --i) pts.push(x[3 * i] + 0.3e-9, x[3 * i + 1] - 0.2e-9, x[3 * i + 2]);
  return Float64Array.from(pts);
}

/** Two straight legs `gap` apart (unit steps) joined by a half circle: a real hairpin. */
function hairpin(gap: number): Float64Array {
  const h: number[] = [];
  for (let i = 0; i < 100; ++i) h.push(i, 0, 0);
  const m = Math.ceil((Math.PI * gap) / 2);
  for (let i = 0; i <= m; ++i) { const a = -Math.PI / 2 + (Math.PI * i) / m; h.push(100 + (gap / 2) * Math.cos(a), gap / 2 + (gap / 2) * Math.sin(a), 0); }
  for (let i = 99; i >= 0; --i) h.push(i, gap, 0);
  return Float64Array.from(h);
}

/** The clean helix with its first 200 points kept and then every `every`-th point only. */
function thinnedTail(every: number): Float64Array {
  const pts: number[] = [];
  for (let i = 0; i < 400; ++i) if (i < 200 || i % every === 0) pts.push(clean[3 * i], clean[3 * i + 1], clean[3 * i + 2]);
  return Float64Array.from(pts);
}

describe("robust start", () => {
  it("flags no point of clean traces (uneven sampling, 0.2-3% noise, 10 seeds) and every wild point", () => {
    let falseFlags = 0;
    for (let seed = 1; seed <= 10; ++seed) {
      for (const noise of [0.002, 0.01, 0.03]) {
        const { xyz } = sampleCurveUneven(helixCurve(1, 0.4, 3), 300, noise, seed);
        falseFlags += grossOutliers(xyz, false).reduce((a, v) => a + (v ? 0 : 1), 0);
      }
    }
    expect(falseFlags).toBe(0);
    const x = clean.slice();
    const r = mulberry32(9);
    const wild = [17, 140, 141, 300, 399];
    for (const i of wild) { x[3 * i] += (r() < 0.5 ? -1 : 1) * 400e-9; x[3 * i + 2] += 300e-9 * r(); }
    const keep = grossOutliers(x, false);
    expect(wild.filter((i) => keep[i] === 0)).toEqual(wild);
    expect(keep.reduce((a, v) => a + (v ? 0 : 1), 0)).toBe(wild.length);
  });

  it("keeps both ends of a long straight segment (on the way, no detour)", () => {
    const pts: number[] = [];
    for (let i = 0; i <= 50; ++i) pts.push(i * 1e-9, 0, 0);
    pts.push(60e-9, 0, 0, 300e-9, 1e-9, 0);
    expect(Array.from(grossOutliers(Float64Array.from(pts), false)).every((v) => v === 1)).toBe(true);
  });

  it("keeps the points of a sparsely sampled stretch after a dense one (judged on the local spacing)", () => {
    // The first half of the helix at every point, the second at every 15th: each point of the sparse
    // half is far from its neighbours on the trace's median step, but on the way between them. Before
    // the local spacing was used, one of them was dropped and the fit lost 27 nm of the wire.
    expect(Array.from(grossOutliers(thinnedTail(15), false)).every((v) => v === 1)).toBe(true);
  });

  it("estimates the noise from arc-length neighbours whatever the sampling (within 10%)", () => {
    // White noise of 0.01 per coordinate on a helix sampled 3:1 unevenly: the estimate is
    // sampling-independent because the pseudo-residuals use the parameter spacing (Gasser et al. 1986).
    const { xyz } = sampleCurveUneven(helixCurve(1, 0.4, 4), 2000, 0.01, 4);
    // Parameters: the true arc length of each sample (helix speed sqrt(R^2 + c^2)).
    const { t } = sampleCurveUneven(helixCurve(1, 0.4, 4), 2000, 0, 4);
    const u = t.map((v) => v * Math.hypot(1, 0.4));
    expect(differenceNoise(xyz, u, 2) / 0.01).toBeGreaterThan(0.9);
    expect(differenceNoise(xyz, u, 2) / 0.01).toBeLessThan(1.1);
  });

  it("finds where a trace runs back over its own path, and nowhere on real wires", () => {
    const step = 780e-9 / 399;
    // Out to point 300 and back to point 150: the turn at 300, 150 points on the way back.
    expect(findRetrace(outAndBack(clean, 300, 150), false, 0, step)).toMatchObject({ at: 300, count: 150 });
    // The same with noise up to 1.5x the step (per coordinate): the progress per point, not the
    // noise-inflated step, sets the window.
    for (const noise of [1e-9, 3e-9]) {
      const back = findRetrace(outAndBack(sampleCurve(helix, 400, noise, 5).xyz, 300, 150), false, noise, step);
      expect(back?.at).toBeGreaterThanOrEqual(298);
      expect(back?.at).toBeLessThanOrEqual(302);
    }
    expect(findRetrace(clean, false, 1e-9, step)).toBeNull();
    for (let seed = 1; seed <= 5; ++seed) {
      expect(findRetrace(sampleCurve(circleCurve(1), 1000, 0.01, seed).xyz, true, 0.01, (2 * Math.PI) / 1000)).toBeNull();
      expect(findRetrace(sampleCurveUneven(bumpCurve(1, 0.1, 0.02), 1000, 0.002, seed).xyz, false, 0.002, 1 / 1000)).toBeNull();
    }
    // A hairpin whose legs are 3 steps apart is a wire; legs 0.5 steps apart are the same path twice.
    expect(findRetrace(hairpin(3), false, 0, 1)).toBeNull();
    expect(findRetrace(hairpin(0.5), false, 0, 1)).not.toBeNull();
  });

  it("takes ends a few steps apart for closed only when nothing else is nearer to them and the wire runs on through the gap", () => {
    // A tight open coil (radius 50, pitch 1, 5 turns, noise 0.3 per coordinate): its ends are 3 steps
    // apart but the neighbouring turn passes 1 away. Was: detected closed, the fit joined the ends
    // (kappa up to 24% high there), exit 0.
    const coil = sampleCurve(helixCurve(50, 1 / (2 * Math.PI), 5), 1000, 0.3, 8).xyz;
    const d: string[] = [];
    expect(detectClosed(coil, d)).toBe(false);
    expect(d[0]).toMatch(/^not taken for closed: the ends are [\d.]+ sample steps apart, but the wire passes closer to an end elsewhere \(use --closed to override\)$/);
    const p = fitProfile(trace(coil, { source: { file: "coil.csv", unit: "m" } }), { bootstrap: 0 });
    expect(p.closed).toBe(false);
    // helix kappa = R/(R^2+c^2) (https://en.wikipedia.org/wiki/Helix)
    expect(interiorMedian(p, "kappa") / (50 / (2500 + 1 / (4 * Math.PI * Math.PI)))).toBeCloseTo(1, 2);
    // A circle traced twice has its ends together and its middle on top of them: not one closed loop.
    const once = sampleCurve(circleCurve(100), 200, 0.5, 3).xyz, twice = new Float64Array(1200);
    twice.set(once); twice.set(sampleCurve(circleCurve(100), 200, 0.5, 4).xyz, 600);
    expect(detectClosed(twice, [])).toBe(false);
    // A noisy closed circle still is, at 1% and 0.1% noise.
    for (let seed = 1; seed <= 5; ++seed) {
      for (const [n, noise] of [[200, 0.01], [200, 0.001], [50, 0.001]]) expect(detectClosed(sampleCurve(circleCurve(1), n, noise, seed).xyz, [])).toBe(true);
    }
    // A narrow hairpin (legs 200 long, 3 apart, noise 0.3): its open ends face each other across the
    // gap at 90 degrees. Was: detected closed, a 3-wide closing jump fitted as wire.
    const g = mulberry32(12), jitter = () => 0.3 * Math.sqrt(-2 * Math.log(1 - g())) * Math.cos(2 * Math.PI * g());
    const pin: number[] = [];
    for (let i = 0; i < 200; ++i) pin.push(i + jitter(), jitter(), jitter());
    for (let i = 0; i < 200; ++i) pin.push(199 - i + jitter(), 3 + jitter(), jitter());
    const dp: string[] = [];
    expect(detectClosed(Float64Array.from(pin), dp)).toBe(false);
    expect(dp[0]).toMatch(/^not taken for closed: the ends are [\d.]+ sample steps apart, but the wire does not run on through the gap \(it turns by \d+ degrees there; use --closed to override\)$/);
  });

  it("finds a stretch traced twice (either direction), and not the turns of a tight coil or a crossing", () => {
    const step = 780e-9 / 399, noisy = (seed: number) => sampleCurve(helix, 400, 0.5e-9, seed).xyz;
    const joined = (a: Float64Array, b: Float64Array) => { const x = new Float64Array(a.length + b.length); x.set(a); x.set(b, a.length); return x; };
    const reversed = (a: Float64Array) => { const x = new Float64Array(a.length); for (let i = 0; i < a.length / 3; ++i) x.set(a.subarray(3 * i, 3 * i + 3), a.length - 3 * i - 3); return x; };
    // The same helix twice with fresh noise, the second time also backwards.
    expect(findOverlap(joined(noisy(1), noisy(2)), false, 0.5e-9, step)).not.toBeNull();
    expect(findOverlap(joined(noisy(1), reversed(noisy(2))), false, 0.5e-9, step)).not.toBeNull();
    expect(findOverlap(noisy(1), false, 0.5e-9, step)).toBeNull();
    // A coil whose turns are 1 apart at noise 0.3 (offset by the pitch: not the same path).
    const coil = sampleCurve(helixCurve(50, 1 / (2 * Math.PI), 5), 1000, 0.3, 8).xyz;
    expect(findOverlap(coil, false, 0.3, (2 * Math.PI * 50 * 5) / 999)).toBeNull();
    // A planar figure eight drawn in 3D: its strands cross at the middle, they do not run together.
    const eight = new Float64Array(3 * 400);
    for (let i = 0; i < 400; ++i) { const t = (2 * Math.PI * i) / 400; eight.set([Math.sin(t), 0.6 * Math.sin(2 * t), 0], 3 * i); }
    expect(findOverlap(eight, true, 0, 0.0155)).toBeNull();
    // A dense trace whose noise is 50x its progress per point: the window is set by chords that stand
    // above the noise, so neither check is fooled by noisy neighbours (was: refused as a path traced
    // twice, a 150000-point helix with 0.2 nm noise on 0.003 nm steps).
    // Helix of length 2 turns x 2 pi sqrt(30^2 + 8^2) = 390 over 19999 steps: 0.0195 per point; the
    // median step handed in is the noise-dominated 0.2 sqrt(6).
    const dense = sampleCurve(helixCurve(30, 8, 2), 20000, 0.2, 6).xyz;
    expect(findOverlap(dense, false, 0.2, 0.2 * Math.sqrt(6))).toBeNull();
    expect(findRetrace(dense, false, 0.2, 0.2 * Math.sqrt(6))).toBeNull();
  });

  it("fits rings, coils and knots sampled 30:1 (a dense stretch advancing less than the tolerance in 3k points is one pass)", () => {
    // Ring of radius 1 (curvature 1: elementary geometry), 1000 points whose density varies 30:1,
    // 0.2% and 1% noise: refused as "the same path twice" before the overlap check asked that the
    // path go away between the two passes.
    for (const noise of [0.002, 0.01]) {
      for (const seed of [107, 207]) {
        const { xyz } = sampleCurveUneven(circleCurve(1), 1000, noise, seed, 30);
        const p = fitProfile(trace(xyz), { closed: true, bootstrap: 0 });
        expect(Math.abs(interiorMedian(p, "kappa") - 1)).toBeLessThan(0.01); // measured within 0.1%
      }
    }
    // Viviani's curve (a figure eight on a sphere: two strands cross at its double point), dense at
    // that point: refused as an overlap until the stretch had to run together beyond the tolerance.
    const viv = sampleCurveUneven(vivianiCurve(1), 1000, 0.002, 207, 30).xyz;
    expect(findOverlap(viv, true, 0.002, 0.001)).toBeNull();
    expect(() => fitProfile(trace(viv), { closed: true, bootstrap: 0 })).not.toThrow();
    // The loop traced twice is still found (the path goes round the loop between the passes).
    const loop = sampleCurve(circleCurve(1), 300, 0.002, 3).xyz, twice = new Float64Array(2 * loop.length);
    twice.set(loop); twice.set(sampleCurve(circleCurve(1), 300, 0.002, 4).xyz, loop.length);
    expect(findOverlap(twice, false, 0.002, (2 * Math.PI) / 300)).not.toBeNull();
  });

  it("measures a robust length that ignores a wild point", () => {
    const x = clean.slice();
    x[600] += 5000e-9;
    expect(referenceLength(x, false) / referenceLength(clean, false)).toBeCloseTo(1, 1);
  });
});

describe("never a silent wrong answer", () => {
  it("refuses coordinates so far from the origin that doubles round them by more than half a step", () => {
    // 1e8 m: a double's spacing there is 2^-26 m = 14.9 nm (IEEE 754 binary64), over the 2 nm steps;
    // the 780 nm helix came out with curvature -12% and bands holding it at half the samples, exit 0.
    const far = clean.map((v, i) => (i % 3 === 0 ? v + 1e8 : v));
    expect(() => fitProfile(trace(far), { bootstrap: 0 })).toThrow(
      "w.csv: points: coordinates reach 1e+17 nm from the origin, where numbers carry about 16 digits and are rounded by up to 11.1 nm, more than half the median step between points (2.19 nm): subtract an offset (the first point, say) from every point");
    // 1e6 m (1e15 nm) still fits: rounded by 0.11 nm.
    const near = clean.map((v, i) => (i % 3 === 0 ? v + 1e6 : v));
    expect(interiorMedian(fitProfile(trace(near), { bootstrap: 0 }), "kappa") / k0).toBeCloseTo(1, 2);
  });

  it("fits a helix with one stray point 100 nm to 5 um off like its clean twin, and names the row", () => {
    const ref = fitProfile(trace(clean), { bootstrap: 0 });
    for (const off of [100e-9, 1000e-9, 5000e-9]) {
      const x = clean.slice();
      x[3 * 200] += off;
      const p = fitProfile(trace(x), { bootstrap: 0 });
      expect(p.length / ref.length).toBeCloseTo(1, 3);
      expect(interiorMedian(p, "kappa") / k0).toBeCloseTo(1, 2);
      expect(interiorMedian(p, "tau") / t0).toBeCloseTo(1, 1);
      expect(p.droppedRows).toEqual([202]);
      expect(p.inputRow?.includes(202)).toBe(false);
      expect(p.diagnostics).toContain("robust start: left out 1 gross outlier far off their neighbours (row 202)");
    }
  });

  it("fits an ordered trace with 1% gross outliers within 1.5x the error of its clean twin", () => {
    const g = normalStream(21);
    const n = 1000, noisy = sampleCurve(helix, n, 1e-9, 21).xyz;
    const x = noisy.slice();
    const r = mulberry32(22);
    for (let k = 0; k < 10; ++k) {
      const i = 5 + Math.floor(r() * (n - 10));
      // half near the wire (20-40 nm off), half anywhere in the bounding box
      const far = k % 2 === 0;
      for (let a = 0; a < 3; ++a) x[3 * i + a] = far ? (r() - 0.5) * 200e-9 : x[3 * i + a] + (20e-9 + 20e-9 * r()) * Math.sign(g());
    }
    const err = (p: Profile) => {
      const js = Array.from({ length: p.n }, (_, j) => j).filter((j) => !(p.flags[j] & FLAG_END));
      return Math.sqrt(js.reduce((a, j) => a + (p.kappa[j] / k0 - 1) ** 2, 0) / js.length);
    };
    const a = fitProfile(trace(noisy), { bootstrap: 0 }), b = fitProfile(trace(x), { bootstrap: 0 });
    expect(err(b) / err(a)).toBeLessThan(1.5);
    expect(b.outliers.length).toBeGreaterThanOrEqual(8);
  });

  it("refuses --closed on an open wire, naming the gap", () => {
    expect(() => fitProfile(trace(clean), { closed: true })).toThrow(
      "w.csv: closed: the wire was declared closed but its ends are 300 nm apart (108 sample steps, 26% of its length): fit it open (--open), or give a trace whose ends meet",
    );
  });

  it("refuses a trace with a long stretch without points, naming the rows", () => {
    const pts: number[] = [];
    for (let i = 0; i <= 100; ++i) { const a = (i / 100) * Math.PI; pts.push(100e-9 * Math.cos(a), 100e-9 * Math.sin(a), 0); }
    pts.push(-100e-9, -2000e-9, 0);
    expect(() => fitProfile(trace(Float64Array.from(pts)))).toThrow(
      "w.csv: points: no points over 2000 nm of the wire between row 102 and row 103 (637x the median step): the fit would invent the wire there; trace it more evenly or split it at the gap",
    );
  });

  it("refuses a trace whose second half is sampled too sparsely, instead of dropping that half as outliers", () => {
    // Was: four of the sparse points dropped as gross outliers and a profile of half the wire (390 of
    // 780 nm) with exit 0.
    expect(() => fitProfile(trace(thinnedTail(40)))).toThrow(
      "w.csv: points: no points over 129 nm of the wire between row 202 and row 204 (48x the median step): the fit would invent the wire there; trace it more evenly or split it at the gap",
    );
  });

  it("refuses a trace that runs out and back over its own path, naming the rows", () => {
    // Was: a 856 nm profile with a cusp at the turn and the way back counted as wire, exit 0.
    expect(() => fitProfile(trace(outAndBack(clean, 300, 150)))).toThrow(
      "w.csv: points: the trace turns back on its own path near row 302: the next 150 points (to row 452) run back over the points before it (within 5.06 nm); a wire cannot retrace itself: remove the retraced rows or split the file there",
    );
  });

  it("refuses a loop traced twice, naming both passes", () => {
    // Was: a closed "wire" of twice the length (1256 nm for a 628 nm ring), exit 0.
    const ring = (seed: number) => sampleCurve(circleCurve(100e-9), 200, 0.5e-9, seed).xyz;
    const x = new Float64Array(1200);
    x.set(ring(3)); x.set(ring(4), 600);
    expect(() => fitProfile(trace(x))).toThrow(
      "w.csv: points: the trace runs along the same path twice: row 16 to row 202 and row 216 to row 401 lie within 3.81 nm of each other with no offset between them; a wire cannot pass through itself (and turns of a coil closer than the noise cannot be told apart): remove the repeated rows or split the file there",
    );
  });

  it("refuses a trace whose points are mostly wild", () => {
    const r = mulberry32(4);
    const x = clean.slice();
    for (let i = 0; i < 400; i += 3) for (let a = 0; a < 3; ++a) x[3 * i + a] += (r() - 0.5) * 2e-6;
    expect(() => fitProfile(trace(x))).toThrow(/^w\.csv: points: (\d+ of 400 points \(rows .* and \d+ more\) sit far off their neighbours: the points are not an ordered trace of one wire \(for unordered points use --format cloud\)|the fit diverged: its length is [\d.]+x a robust polyline length of the trace \([\d.]+ nm\); the points farthest from it are row \d+, row \d+, row \d+: check for stray points, or for unordered points use --format cloud|no points over [\d.]+ nm of the wire between row \d+ and row \d+ \(\d+x the median spacing\): the fit would invent the wire there; trace it more evenly or split it at the gap)$/);
  });

  it("gives a straight line (exact, or with tiny noise) no torsion anywhere: NaN, flag 1", () => {
    const r = mulberry32(3);
    for (const eps of [0, 1e-15, 1e-12]) {
      const n = 200, x = new Float64Array(3 * n);
      for (let i = 0; i < n; ++i) { x[3 * i] = i * 1e-9 + eps * (r() - 0.5); x[3 * i + 1] = eps * (r() - 0.5); x[3 * i + 2] = eps * (r() - 0.5); }
      const p = fitProfile(trace(x), { bootstrap: 50 });
      expect(Array.from(p.tau).every(Number.isNaN)).toBe(true);
      expect(Array.from(p.flags).every((f) => (f & FLAG_TORSION_UNDEFINED) !== 0)).toBe(true);
      expect(Math.max(...p.kappa)).toBeLessThan(1e-3 / 199e-9); // total turning below 1 mrad
    }
  });

  it("refuses a curved fit whose resolution exceeds the wire's length", () => {
    const pts: number[] = [];
    for (let i = 0; i < 30; ++i) { const a = (i / 29) * 2; pts.push(100e-9 * Math.cos(a), 100e-9 * Math.sin(a), 0); }
    expect(() => fitProfile(trace(Float64Array.from(pts)), { lambda: 1e8 })).toThrow(/^w\.csv: points: the fit resolves nothing: its resolution length \([\d.e+]+ nm\) exceeds the wire's length \([\d.]+ nm\); too few points or too much noise for this wire$/);
  });

  it("flags the torsion biased (16) next to an inflection of a 3D wire, where its bias is not in its band", () => {
    // r(t) = 100 nm (t, t^3/3, t^4/4), t in [-1, 1]: curvature 0 at t = 0, torsion
    // 6t^2 / (4t^2 + 9t^4 + t^8) / 100 nm there (Frenet formulas, common practice) - a finite 0.015/nm
    // that the smoothed fit overstates 2-4x within 15 nm of the inflection (measured).
    const g = normalStream(9), n = 500, xyz = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) {
      const t = -1 + (2 * i) / (n - 1);
      xyz.set([100e-9 * t + 0.2e-9 * g(), (100e-9 * t ** 3) / 3 + 0.2e-9 * g(), (100e-9 * t ** 4) / 4 + 0.2e-9 * g()], 3 * i);
    }
    const p = fitProfile(trace(xyz), { bootstrap: 100 });
    let near = 0;
    for (let j = 0; j < p.n; ++j) {
      if (Math.abs(p.x[j]) > 15e-9) continue;
      ++near;
      expect(p.flags[j] & (FLAG_TORSION_UNDEFINED | FLAG_BIAS)).not.toBe(0);
    }
    expect(near).toBeGreaterThan(50);
    expect(p.diagnostics.some((d) => /^torsion: at \d+ samples within [\d.]+ nm of a point where the curvature cannot be told from zero, the torsion is flagged biased \(16\): its smoothing bias there is not in its band$/.test(d))).toBe(true);
  });

  it("keeps every band around its estimate and starts s at 0, open and closed", () => {
    for (const curve of [helix, circleCurve(200e-9)]) {
      const { xyz } = sampleCurveUneven(curve, 300, 0.01 * curve.radius, 5);
      const p = fitProfile(trace(xyz, { closed: curve.closed }), { bootstrap: 60 });
      expect(p.s[0]).toBe(0);
      for (let j = 0; j < p.n; ++j) {
        expect(p.kappaLo[j]).toBeLessThanOrEqual(p.kappa[j]);
        expect(p.kappaHi[j]).toBeGreaterThanOrEqual(p.kappa[j]);
        if (Number.isFinite(p.tau[j])) {
          expect(p.tauLo[j]).toBeLessThanOrEqual(p.tau[j]);
          expect(p.tauHi[j]).toBeGreaterThanOrEqual(p.tau[j]);
        }
      }
      expect(p.inputRow?.length).toBe(p.n);
    }
  });
});

describe("unit independence of sparse traces", () => {
  it("gives the same kappa x length for the same numbers read in angstrom and in metres", () => {
    // Ideal alpha helix through 16 atoms (radius 2.3 A, rise 1.5 A, 100 degrees per residue;
    // textbook values from memory), 0.1 A noise.
    const g = normalStream(8), n = 16, c1 = 1.5 / ((100 * Math.PI) / 180);
    const v = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) { const t = (i * 100 * Math.PI) / 180; v[3 * i] = 2.3 * Math.cos(t) + 0.1 * g(); v[3 * i + 1] = 2.3 * Math.sin(t) + 0.1 * g(); v[3 * i + 2] = c1 * t + 0.1 * g(); }
    const a = fitProfile(trace(v.map((x) => x * 1e-10), { source: { file: "h.xyz", unit: "A" } }), { bootstrap: 0 });
    const b = fitProfile(trace(v.slice(), { source: { file: "h.xyz", unit: "m" } }), { bootstrap: 0 });
    for (let j = 0; j < a.n; ++j) expect((a.kappa[j] * a.length) / (b.kappa[j] * b.length)).toBeCloseTo(1, 6); // measured 4e-8: rounding of the unit conversion
    expect(a.diagnostics.some((d) => d.startsWith("sparse trace"))).toBe(true);
  });
});

describe("spatially adaptive curvature (opt-in)", () => {
  it("weights the difference penalty row by row: unit weights give the plain penalty", async () => {
    const { differencePenalty } = await import("../../src/frame/design.js");
    const { makeBasis } = await import("../../src/frame/bspline.js");
    const b = makeBasis(0, 1, 20, false);
    const plain = differencePenalty(b), ones = differencePenalty(b, new Float64Array(b.K - 4).fill(1));
    expect(Array.from(ones.data)).toEqual(Array.from(plain.data));
    const doubled = differencePenalty(b, new Float64Array(b.K - 4).fill(2));
    expect(Array.from(doubled.data)).toEqual(Array.from(plain.data, (v) => 2 * v));
  });

  it("resolves a curvature bump better than the discrepancy level (peak 1.2: second derivative of the Gaussian, common practice)", () => {
    const bump = bumpCurve(10, 0.6, 1);
    let better = 0;
    for (const seed of [1, 2, 3]) {
      const { xyz } = sampleCurve(bump, 1000, 0.002 * bump.radius, seed);
      const t = { xyz, dims: 3 as const, source: { file: "b", unit: "m" as const }, diagnostics: [], closed: false };
      const a = fitProfile(t, { bootstrap: 0 }), b = fitProfile(t, { bootstrap: 0, adaptive: true });
      const peak = (p: Profile) => Math.max(...p.kappa);
      if (Math.abs(peak(b) - 1.2) < Math.abs(peak(a) - 1.2)) ++better;
      expect(b.diagnostics.some((d) => d.startsWith("curvature: spatially adaptive smoothing"))).toBe(true);
    }
    expect(better).toBeGreaterThanOrEqual(2);
  });
});

describe("checkPass on a trace ordered from a cloud", () => {
  it("names the cloud's thickness against its spacing instead of advising --format cloud", () => {
    // A fit 3.5x the polyline's length (limit 3, the guard's own rule; common practice) of points
    // ordered from a cloud 3 units thick at a spacing of 1.1.
    const state = { length: 350, u: Float64Array.from({ length: 50 }, (_, i) => 7 * i), resid: new Float64Array(50), sigma: 1, closed: false, knotInterval: 10 };
    const say = (d: number) => `${d} nm`;
    expect(() => checkPass(state, 100, "tube.csv", (i) => `row ${i + 1}`, say, { across: 3, spacing: 1.1 })).toThrow(
      "tube.csv: points: the fit of the points ordered from the cloud diverged: its length is 3.5x a robust polyline length of the trace (100 nm); the cloud is thicker across the wire (median distance of the points from the orderer's path 3 nm) than its point spacing along it (median nearest-neighbour spacing 1.1 nm), so the ordered points zigzag across it: a tube or volume of points, not points along a centre line; reduce it to a centre-line trace, or give the tube surface as a mesh");
  });
});
