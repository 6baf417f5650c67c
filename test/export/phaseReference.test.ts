import { describe, expect, it } from "vitest";
import { phaseBoundary } from "../../src/physics/phaseBoundary.js";
import { plainSystem } from "../../src/physics/reducedSystem.js";
import { boundaryAt, PHASE_BOUNDARY } from "../../src/report/phaseReference.js";

describe("the phase-boundary table drawn in the report", () => {
  it("matches physics/phaseBoundary at two points (coarse settings, 3%)", () => {
    // Table values: ../shared/PHYSICS.md section 4 (the project's own derivation). The physics
    // stage recomputes them here with coarse settings (hMax 0.4), so agreement within 3% is expected.
    const opts = { hMax: 0.4, scan: 6, refine: 3, relTol: 2e-2 };
    expect(Math.abs(phaseBoundary(plainSystem("ferro"), 0.5, opts) / boundaryAt("ferro", 0.5) - 1)).toBeLessThan(0.03); // measured 1.4%
    expect(Math.abs(phaseBoundary(plainSystem("antiferro"), 1, opts) / boundaryAt("antiferro", 1) - 1)).toBeLessThan(0.03); // measured 0.7%
  });

  it("starts at 2/pi for the ferromagnet (open arc, tau = 0) and at 0 for the antiferromagnet, and rises with torsion", () => {
    expect(boundaryAt("ferro", 0)).toBe(2 / Math.PI);
    expect(boundaryAt("antiferro", 0)).toBe(0);
    for (const order of ["ferro", "antiferro"] as const) {
      const t = PHASE_BOUNDARY[order];
      for (let i = 1; i < t.length; ++i) expect(t[i][1]).toBeGreaterThan(t[i - 1][1]);
    }
    expect(boundaryAt("ferro", 0.375)).toBeCloseTo((0.708 + 0.902) / 2, 12);
    expect(Number.isNaN(boundaryAt("ferro", 2.5))).toBe(true);
  });
});
