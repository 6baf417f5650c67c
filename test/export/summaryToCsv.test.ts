import { describe, expect, it } from "vitest";
import { csvField, SUMMARY_COLUMNS, summaryToCsv } from "../../src/export/summaryToCsv.js";
import { buildModelDocument } from "../../src/export/modelDocument.js";
import { wireSummary } from "../../src/export/wireSummary.js";
import type { Analysis } from "../../src/export/analyzeTrace.js";
import { makeProfile } from "../support/profiles.js";
import { segment } from "../../src/frame/segment.js";

const outputs = {
  profile: "p", report: "r", chain: { file: "c", sites: 0, spacing: 1, spacingNote: "", columns: [] },
  mesh: { file: "m", format: "ply" as const, offset: [0, 0, 0], radius: 1, radiusSource: "", vertices: 0, triangles: 0 },
};

/** A geometry-only Analysis of an invented constant-(kappa, tau) stretch with seeded replicates. */
function constant(kappa: number, tau: number): Analysis {
  const profile = makeProfile({ n: 200, length: 1e-6, kappa: () => kappa, tau: () => tau, replicates: 100, seed: 11, band: 0.02 * kappa });
  const trace = { xyz: new Float64Array(600), dims: 3 as const, source: profile.source, diagnostics: [] };
  return { trace, profile, segments: segment(profile), material: null, model: null, seed: 1, timings: { profile: 0, segment: 0, model: 0 } };
}

describe("wireSummary and summaryToCsv", () => {
  it("a constant profile has mean = max = the constant, and bands that contain it", () => {
    const a = constant(2e7, -5e6);
    const s = wireSummary(a, buildModelDocument(a, { unit: "nm", outputs }));
    expect(s.kappaMean.value).toBeCloseTo(0.02, 12); // 2e7 1/m = 0.02 1/nm
    expect(s.kappaMax.value).toBeCloseTo(0.02, 12);
    expect(s.tauMean.value).toBeCloseTo(-0.005, 12);
    expect(s.tauMaxAbs.value).toBeCloseTo(0.005, 12);
    expect(s.kappaMean.lo).toBeLessThan(0.02);
    expect(s.kappaMean.hi).toBeGreaterThan(0.02);
    expect(s.length).toBeCloseTo(1000, 9);
    expect(s.pinningSites).toBeNull();
  });

  it("mean |tau| is the mean of |tau|, not |mean tau|: torsion +t then -t averages to 0, its magnitude to t", () => {
    // definition of the arc-length mean of |tau|; two equal halves of opposite torsion (invented profile)
    const profile = makeProfile({ n: 200, length: 1e-6, kappa: () => 2e7, tau: (s) => (s < 0.5e-6 ? 5e6 : -5e6), replicates: 60, seed: 5, band: 1e5 });
    const trace = { xyz: new Float64Array(600), dims: 3 as const, source: profile.source, diagnostics: [] };
    const a: Analysis = { trace, profile, segments: segment(profile), material: null, model: null, seed: 1, timings: { profile: 0, segment: 0, model: 0 } };
    const s = wireSummary(a, buildModelDocument(a, { unit: "nm", outputs }));
    expect(Math.abs(s.tauMean.value)).toBeLessThan(1e-4 * 0.005); // the halves cancel up to the sample placement
    expect(s.tauAbsMean.value).toBeCloseTo(0.005, 9);
    expect(s.tauAbsMean.lo).toBeLessThanOrEqual(s.tauAbsMean.hi);
    expect(summaryToCsv([{ wire: "w", file: "w.csv", summary: s, error: null, seconds: 1 }])).toContain("tau_abs_mean,tau_abs_mean_lo");
  });

  it("quotes text fields per RFC 4180 and gives a failed wire its error and empty numbers", () => {
    expect(csvField('a,"b"')).toBe('"a,""b"""');
    expect(csvField("plain")).toBe("plain");
    const a = constant(1e7, 0);
    const ok = wireSummary(a, buildModelDocument(a, { unit: "nm", outputs }));
    const text = summaryToCsv([
      { wire: "good", file: "g.csv", summary: ok, error: null, seconds: 1.5 },
      { wire: "bad", file: "b,1.csv", summary: null, error: "b,1.csv:3: x: not a finite number: \"1.2e\"", seconds: 0.1 },
    ]);
    const lines = text.trimEnd().split("\n").filter((l) => !l.startsWith("#"));
    expect(lines[0]).toBe(SUMMARY_COLUMNS.join(","));
    expect(lines[1].startsWith("good,g.csv,ok,,nm,")).toBe(true);
    expect(lines[2]).toBe(`bad,"b,1.csv",error,"b,1.csv:3: x: not a finite number: ""1.2e""",${",".repeat(SUMMARY_COLUMNS.length - 6)},0.1`);
  });
});
