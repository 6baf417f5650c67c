/**
 * analyze with a resampling step coarser than the fit resolves: the stretches see only the
 * resampled samples, and the outputs say so. Reference: a helix (R cos t, R sin t, c t) has
 * constant kappa = R/(R^2+c^2) (do Carmo 1976, sec. 1-5), so one helix stretch is the truth.
 * Invented wire, seeded noise.
 */
import { describe, expect, it } from "vitest";
import { analyzeTrace } from "../../src/export/analyzeTrace.js";
import { exportWarnings } from "../../src/export/wireOutputs.js";
import type { Trace } from "../../src/types.js";
import { helixCurve, sampleCurve } from "../support/curves.js";

const nm = 1e-9;
const { xyz } = sampleCurve(helixCurve(10 * nm, 4 * nm, 2), 300, 0.05 * nm, 7);
const trace: Trace = { xyz, dims: 3, source: { file: "helix.csv", unit: "nm" }, diagnostics: [] };

describe("analyze with --step", () => {
  it("says so when the step is coarser than half the resolution length, in the profile and the model's warnings", () => {
    const a = analyzeTrace(trace, { bootstrap: 0, step: 20 * nm });
    const note = a.profile.diagnostics.find((d) => d.startsWith("step: the profile is resampled every 20 nm, more than half the fit's resolution length"));
    expect(note).toBeDefined();
    expect(note).toMatch(/the stretches, features and model see only its 8 samples; for them use a step of at most \d+(\.\d+)? nm, or none$/);
    expect(exportWarnings(a, 1 * nm, "nm")).toContain(note);
  });

  it("says nothing at a step finer than a quarter of it, where the stretches are one helix as without a step", () => {
    const plain = analyzeTrace(trace, { bootstrap: 0 });
    expect(plain.segments.map((g) => g.kind)).toEqual(["helix"]);
    const a = analyzeTrace(trace, { bootstrap: 0, step: 0.2 * plain.profile.resolution });
    expect(a.profile.diagnostics.some((d) => d.startsWith("step:"))).toBe(false);
    expect(a.segments.map((g) => g.kind)).toEqual(["helix"]);
  });
});
