import { describe, expect, it } from "vitest";
import { homogeneousModes } from "../../src/physics/homogeneousModes.js";
import { reducedSystem } from "../../src/physics/reducedSystem.js";
import { parseMaterial } from "../../src/physics/parseMaterial.js";
import { isoRegion, smoothPath } from "../../src/report/svg/isoRegion.js";
import { phaseMap, PHASE_BOX } from "../../src/report/svg/phaseMap.js";
import { linearScale } from "../../src/report/svg/plotFrame.js";

describe("isoRegion(values, nx, ny, toX, toY)", () => {
  it("cuts a cell where the sign changes, at the linear-interpolation zero (marching squares)", () => {
    expect(isoRegion(Float64Array.of(-1, 1, -1, 1), 1, 1, (i) => i, (j) => j)).toEqual({ fill: "M0 0L0.5 0L0.5 1L0 1Z", line: "M0.5 0L0.5 1" });
    // zero at a quarter: values -1 and 3 along x
    expect(isoRegion(Float64Array.of(-1, 3, -1, 3), 1, 1, (i) => 100 * i, (j) => j).line).toBe("M25 0L25 1");
    expect(isoRegion(Float64Array.of(1, 1, 1, 1), 1, 1, (i) => i, (j) => j)).toEqual({ fill: "", line: "" });
  });

  it("follows a circle with no staircase: every edge vertex lies on the circle to within the linear-interpolation error", () => {
    // f = x^2 + y^2 - R^2 on a 40 x 40 grid: the zero line is the circle of radius R (exact reference)
    const n = 40, R = 13.3, values = new Float64Array((n + 1) * (n + 1));
    for (let j = 0; j <= n; ++j) for (let i = 0; i <= n; ++i) values[i + (n + 1) * j] = (i - 20) ** 2 + (j - 20) ** 2 - R * R;
    const { line } = isoRegion(values, n, n, (i) => i - 20, (j) => j - 20);
    const pts = [...line.matchAll(/(-?[\d.]+) (-?[\d.]+)/g)].map((m) => Math.hypot(Number(m[1]), Number(m[2])));
    expect(pts.length).toBeGreaterThan(100);
    for (const r of pts) expect(Math.abs(r - R)).toBeLessThan(0.06); // chord error of a unit cell on R = 13.3, plus 0.05 px rounding
  });
});

describe("smoothPath(points)", () => {
  it("passes through every point", () => {
    const pts = [[0, 0], [10, 5], [20, 0], [30, 8]] as const;
    const d = smoothPath(pts);
    const ends = [...d.matchAll(/C[^C]*?(-?[\d.]+) (-?[\d.]+)(?=C|$)/g)].map((m) => [Number(m[1]), Number(m[2])]);
    expect(d.startsWith("M0 0")).toBe(true);
    expect(ends).toEqual([[10, 5], [20, 0], [30, 8]]);
  });
});

describe("phaseMap(system, points, options)", () => {
  const fm = reducedSystem(parseMaterial({ order: "ferro", exchange: 1.3e-11, anisotropy: 2e5 }, "m.json"));

  it("draws the unstable region as a contour (no grid rectangles) that agrees with the stability margin", () => {
    const svg = phaseMap(fm, [], { intrinsic: false });
    expect(/<g class="unstable">(.*?)<\/g>/.exec(svg)![1]).not.toContain("<rect"); // the old staircase was made of rectangles
    const edge = /<path class="edge" d="([^"]*)"/.exec(svg)![1];
    const box = PHASE_BOX;
    // map pixels back to (tau l, kappa l) with the same scales as the plot (domain from the empty-point defaults: X 0.5, Y 1.2)
    const tx = linearScale(box.left, box.width - box.right, -0.5, 0.5), ky = linearScale(box.height - box.bottom, box.top, 0, 1.2);
    const pts = [...edge.matchAll(/(-?[\d.]+) (-?[\d.]+)/g)].map((m) => [tx(Number(m[1])), ky(Number(m[2]))]);
    expect(pts.length).toBeGreaterThan(20);
    // on the edge the margin changes sign within one grid step (1.2 / 90 in kappa l, 1 / 120 in tau l)
    const dk = 1.2 / 90, dt = 1 / 120;
    for (const [t, k] of pts) {
      const m = [[k - dk, t], [k + dk, t], [k, t - dt], [k, t + dt]].map(([a, b]) => homogeneousModes(fm, a, b).margin);
      expect(Math.min(...m) < 0 && Math.max(...m) > 0, `edge point (${t}, ${k})`).toBe(true);
    }
  });

  it("moves coinciding markers apart with a leader, and keeps labels apart", () => {
    const p = (label: string) => ({ label, kappa: 0.2, kappaLo: 0.19, kappaHi: 0.21, tau: 0.1, tauLo: 0.09, tauHi: 0.11, category: 1 });
    const svg = phaseMap(fm, [p("1"), p("2"), p("3")], { intrinsic: false });
    expect((svg.match(/class="leader"/g) ?? []).length).toBe(2);
    const circles = [...svg.matchAll(/<circle cx="([\d.]+)" cy="([\d.]+)" r="5"/g)].map((m) => [Number(m[1]), Number(m[2])]);
    expect(circles.length).toBe(3);
    for (let a = 0; a < 3; ++a) for (let b = a + 1; b < 3; ++b) expect(Math.hypot(circles[a][0] - circles[b][0], circles[a][1] - circles[b][1])).toBeGreaterThanOrEqual(12.9);
    const labels = [...svg.matchAll(/<text x="([\d.]+)" y="([\d.]+)">(\d)<\/text>/g)].map((m) => [Number(m[1]), Number(m[2])]);
    for (let a = 0; a < 3; ++a) for (let b = a + 1; b < 3; ++b) expect(Math.abs(labels[a][0] - labels[b][0]) >= 16 || Math.abs(labels[a][1] - labels[b][1]) >= 11).toBe(true);
  });

  it("marks the ring rule only for a closed ferromagnetic wire", () => {
    expect(phaseMap(fm, [], { intrinsic: false, closedRing: true })).toContain('class="ring-rule"');
    expect(phaseMap(fm, [], { intrinsic: false, closedRing: false })).not.toContain('class="ring-rule"');
  });
});
