/** Junction geometry helpers (src/import/network/junctionFit.ts) against closed forms. */
import { describe, expect, it } from "vitest";
import { angleDeg, cycleRank, endAxis, nearestPointToLines } from "../../../src/import/network/junctionFit.js";

describe("junction geometry", () => {
  it("three lines through one point meet there exactly (least squares, zero residual)", () => {
    const P: [number, number, number] = [1, -2, 3];
    const dirs = [[1, 0, 0], [0, 1, 1], [1, 1, -1]].map((d) => d.map((v) => v / Math.hypot(...d)) as [number, number, number]);
    const lines = dirs.map((t, i) => ({ point: [P[0] + 3 * (i + 1) * t[0], P[1] + 3 * (i + 1) * t[1], P[2] + 3 * (i + 1) * t[2]] as const, tangent: t }));
    const { point, rms } = nearestPointToLines(lines, [0, 0, 0], 0);
    for (let i = 0; i < 3; i++) expect(point[i]).toBeCloseTo(P[i], 10);
    expect(rms).toBeLessThan(1e-10);
  });
  it("two skew lines: the midpoint of their common perpendicular (closed form)", () => {
    // x axis, and the line through (0, 0, 2) along y: common perpendicular from (0,0,0) to (0,0,2)
    const { point } = nearestPointToLines([{ point: [5, 0, 0], tangent: [1, 0, 0] }, { point: [0, -4, 2], tangent: [0, 1, 0] }], [0, 0, 0], 0);
    expect(point[0]).toBeCloseTo(0, 10);
    expect(point[1]).toBeCloseTo(0, 10);
    expect(point[2]).toBeCloseTo(1, 10);
  });
  it("parallel lines: the weak prior fixes the free direction (edge case)", () => {
    const { point } = nearestPointToLines([{ point: [0, 1, 0], tangent: [1, 0, 0] }, { point: [0, -1, 0], tangent: [1, 0, 0] }], [7, 0, 0]);
    expect(point[0]).toBeCloseTo(7, 6);
    expect(point[1]).toBeCloseTo(0, 6);
  });
  it("endAxis of a circular arc: the end point and the exact tangent there (quadratic fit; error O(window^3 kappa^2))", () => {
    const Rb = 50, n = 200, xyz = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) {
      const t = (i / (n - 1)) * 1.2;
      xyz.set([Rb * Math.sin(t), Rb * (1 - Math.cos(t)), 0], 3 * i);
    }
    const a = endAxis(xyz, false, 10);
    expect(a).not.toBeNull();
    expect(Math.hypot(a!.point[0], a!.point[1], a!.point[2])).toBeLessThan(0.01);
    expect(angleDeg(a!.tangent, [1, 0, 0])).toBeLessThan(0.5);
    const b = endAxis(xyz, true, 10)!;
    // at the far end the tangent pointing back into the arc is -(cos 1.2, sin 1.2)
    expect(angleDeg(b.tangent, [-Math.cos(1.2), -Math.sin(1.2), 0])).toBeLessThan(0.5);
  });
  it("angleDeg and cycleRank: closed forms", () => {
    expect(angleDeg([1, 0, 0], [0, 1, 0])).toBeCloseTo(90, 12);
    expect(angleDeg([1, 0, 0], [-1, 1e-9, 0])).toBeCloseTo(180, 6);
    // cycle rank (Diestel, Graph Theory, 1.9): a tree has 0; a ladder with two rungs 8 - 8 + 1 = 1; a ring 1 - 1 + 1
    expect(cycleRank(3, 4, 1)).toBe(0);
    expect(cycleRank(8, 8, 1)).toBe(1);
    expect(cycleRank(1, 1, 1)).toBe(1);
  });
});
