/**
 * Traces read as ordered whose points are not in order: reordered when the cloud orderer finds one
 * unambiguous path, refused with the measured ratios otherwise. The statistics (polyline over
 * Euclidean minimum spanning tree, median step over median nearest-neighbour distance) separate the
 * classes by an order of magnitude (measured, NUMERICS.md sec. 7 item 3); the EMST length of points
 * on a line is the line's length (Prim 1957; common practice).
 */
import { describe, expect, it } from "vitest";
import { buildTrace } from "../../src/import/buildTrace.js";
import { orderStats, outOfOrder, regularTurning } from "../../src/import/orderCheck.js";
import { fitProfile } from "../../src/frame/profile.js";
import { bendCurve, bumpCurve, circleCurve, helixCurve, sampleCurve, sampleCurveUneven, trefoilCurve, vivianiCurve } from "../support/curves.js";
import { mulberry32 } from "../support/rng.js";

function shuffled(xyz: Float64Array, seed: number): Float64Array {
  const n = xyz.length / 3, idx = Array.from({ length: n }, (_, i) => i), r = mulberry32(seed);
  for (let i = n - 1; i > 0; --i) { const j = Math.floor(r() * (i + 1)); [idx[i], idx[j]] = [idx[j], idx[i]]; }
  const out = new Float64Array(3 * n);
  idx.forEach((i, k) => out.set(xyz.subarray(3 * i, 3 * i + 3), 3 * k));
  return out;
}
const raw = (xyz: Float64Array) => ({ values: xyz.map((v) => v * 1e9), count: xyz.length / 3, dims: 3 as const, declared: {} });

describe("order statistics", () => {
  it("equal 1 for points in order along a line (EMST = polyline) and grow when shuffled", () => {
    const line = new Float64Array(300);
    for (let i = 0; i < 100; ++i) line[3 * i] = i;
    const s = orderStats(line);
    expect(s.polylineOverTree).toBeCloseTo(1, 12);
    expect(s.stepOverNeighbour).toBeCloseTo(1, 12);
    expect(outOfOrder(orderStats(shuffled(line, 1)))).toBe(true);
  });

  it("separate ordered (noisy, uneven) from shuffled traces by a wide margin over 20 seeds", () => {
    let maxOrdered = 0, minShuffled = Infinity;
    for (let seed = 1; seed <= 20; ++seed) {
      for (const noise of [0.002, 0.03]) {
        const { xyz } = sampleCurveUneven(helixCurve(1, 0.4, 4), 1000, noise, seed);
        const a = orderStats(xyz), b = orderStats(shuffled(xyz, seed));
        maxOrdered = Math.max(maxOrdered, a.polylineOverTree, a.stepOverNeighbour);
        minShuffled = Math.min(minShuffled, b.polylineOverTree, b.stepOverNeighbour);
      }
    }
    expect(maxOrdered).toBeLessThan(5); // measured 1.9
    expect(minShuffled).toBeGreaterThan(20); // measured 40+
  });
});

describe("buildTrace order check", () => {
  it("reorders a shuffled helix along the wire, says so loudly and keeps each point's row", () => {
    const { xyz } = sampleCurve(helixCurve(100e-9, 40e-9, 3), 600, 1e-9, 2);
    const t = buildTrace(raw(shuffled(xyz, 3)), "s.csv", { unit: "nm" });
    expect(t.diagnostics[0]).toMatch(/^the points were not in order along the wire \(polyline \d+x its minimum spanning tree, median step \d+x the median nearest-neighbour distance; ordered traces stay below 10\.0\): reordered them as an unordered cloud along an open curve; check the result, or read the file with --format cloud$/);
    const steps: number[] = [];
    for (let i = 1; i < t.xyz.length / 3; ++i) steps.push(Math.hypot(t.xyz[3 * i] - t.xyz[3 * i - 3], t.xyz[3 * i + 1] - t.xyz[3 * i - 2], t.xyz[3 * i + 2] - t.xyz[3 * i - 1]));
    expect(Math.max(...steps)).toBeLessThan(10e-9); // every step a neighbour's step (spacing ~2.3 nm)
    expect(new Set(t.rows).size).toBe(600);
  });

  it("refuses a shuffled self-crossing curve with the ratios and the way out", () => {
    // The trefoil's projection crosses itself; with 3% noise the cloud's branches meet at the crossings.
    const { xyz } = sampleCurve(trefoilCurve(100e-9), 500, 12e-9, 5);
    const flat = xyz.slice();
    for (let i = 0; i < 500; ++i) flat[3 * i + 2] *= 0.05; // squash it: the strands touch at the crossings
    expect(() => buildTrace(raw(shuffled(flat, 4)), "k.csv", { unit: "nm" })).toThrow(
      /^k\.csv: points: the points are not in order along the wire \(polyline \d+x its minimum spanning tree, median step \d+x the median nearest-neighbour distance; ordered traces stay below 10\.0\) and do not order unambiguously as a cloud \(.+\); read them as an unordered cloud with --format cloud, or fix the order$/,
    );
  });

  it("leaves ordered traces alone, short sparse ones included", () => {
    const { xyz } = sampleCurveUneven(helixCurve(1e-7, 0.4e-7, 3), 400, 3e-9, 1);
    expect(buildTrace(raw(xyz), "o.csv", { unit: "nm" }).diagnostics).toEqual([]);
    const atoms = new Float64Array(3 * 12);
    for (let i = 0; i < 12; ++i) { const a = (i * 100 * Math.PI) / 180; atoms.set([2.3e-10 * Math.cos(a), 2.3e-10 * Math.sin(a), 0.86e-10 * a], 3 * i); }
    expect(buildTrace(raw(atoms), "a.csv", { unit: "nm" }).diagnostics).toEqual([]);
  });

  it("keeps in file order a coarse spiral whose turns lie closer than its step (regular turning), and fits it", () => {
    // Archimedean spiral r = 10 + 0.5 t nm traced at 5 points per turn: turns 3.1 nm apart on
    // 13-30 nm steps look out of order by distance; it had been "reordered" across its turns and then
    // refused with a misleading message. Curvature of a polar curve r(t):
    // (r^2 + 2 r'^2 - r r'') / (r^2 + r'^2)^1.5 (textbook plane-curve formula; r'' = 0 here).
    const n = 40, xyz = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) { const t = (i * 2 * Math.PI) / 5, r = 10 + 0.5 * t; xyz.set([r * Math.cos(t) * 1e-9, r * Math.sin(t) * 1e-9, 0], 3 * i); }
    expect(outOfOrder(orderStats(xyz))).toBe(true);
    const t = buildTrace({ values: xyz.map((v) => v * 1e9), count: n, dims: 3 as const, declared: {} }, "sp.csv", { unit: "nm" });
    expect(t.diagnostics[0]).toMatch(/^order check: the points lie closer to other turns than to their neighbours in the file \(polyline \d+x .+\), but they turn by nearly the same angle at every point \(a coarse spiral or coil\): kept in file order$/);
    expect(Array.from(t.rows!.slice(0, 5))).toEqual([1, 2, 3, 4, 5]); // file order kept
    const p = fitProfile(t, { bootstrap: 0 });
    for (const j of [10, 20, 30]) {
      const th = (j * 2 * Math.PI) / 5, r = 10 + 0.5 * th, k = (r * r + 2 * 0.25) / (r * r + 0.25) ** 1.5;
      expect(Math.abs(p.kappa[j] * 1e-9 / k - 1)).toBeLessThan(0.01); // measured within 0.05%
    }
  });

  it("finds no regular turning in shuffled traces (6 families, 20-1000 points, 5 seeds)", () => {
    let found = 0;
    for (const f of [helixCurve(1, 0.4, 4), circleCurve(1), trefoilCurve(1), vivianiCurve(1), bumpCurve(10, 0.6, 1), bendCurve(4, 0.5)]) {
      for (const N of [20, 200, 1000]) for (let seed = 1; seed <= 5; ++seed) {
        const { xyz } = sampleCurveUneven(f, N, 0.002 * f.radius, seed);
        if (regularTurning(shuffled(xyz, seed * 7 + N))) ++found;
      }
    }
    expect(found).toBe(0); // measured 0 of 660 with noise 0-1% and 20-5000 points (6 of them at pi before the median cap)
  });
});
