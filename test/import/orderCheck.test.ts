/**
 * Traces read as ordered whose points are not in order: reordered when the cloud orderer finds one
 * unambiguous path, refused with the measured ratios otherwise. The statistics (polyline over
 * Euclidean minimum spanning tree, median step over median nearest-neighbour distance) separate the
 * classes by an order of magnitude (measured, NUMERICS.md sec. 7 item 3); the EMST length of points
 * on a line is the line's length (Prim 1957; common practice).
 */
import { describe, expect, it } from "vitest";
import { buildTrace } from "../../src/import/buildTrace.js";
import { orderStats, outOfOrder } from "../../src/import/orderCheck.js";
import { helixCurve, sampleCurve, sampleCurveUneven, trefoilCurve } from "../support/curves.js";
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
});
