/**
 * Pinning depth intervals carry the geometry fit's smoothing bias, not only its noise: a noisy
 * planar FM wire with a Gaussian curvature bump, fitted, cut and modelled (analyzeTrace).
 * Invented wire and material; the check value is external.
 */
import { describe, expect, it } from "vitest";
import { analyzeTrace } from "../../src/export/analyzeTrace.js";
import { buildWireModel, parseMaterial } from "../../src/physics/index.js";
import { VALIDITY_TEXT } from "../../src/physics/sampleValidity.js";
import { FLAG_BIAS } from "../../src/types.js";
import { planarFromCurvature } from "../support/curves.js";
import { normalStream } from "../support/rng.js";

// invented soft ferromagnet: l = sqrt(A / K) = 8.04 nm
const material = parseMaterial({ order: "ferro", exchange: 1.3e-11, anisotropy: 2.0106e5, thickness: 4e-9 }, "fm.json");
const l = material.magneticLength * 1e9; // nm
const k0 = 0.037, s0 = 300, L = 600; // 1/nm, nm: k0 l = 0.2975

/** The bump's planar centre line, one point per nm. */
const bumpWire = (peak = k0, w = 2 * l): number[] => planarFromCurvature((s) => peak * Math.exp(-(((s - s0) / w) ** 2)), L);

describe("pinning depth intervals with the smoothing bias", () => {
  it("a bump of k0 l = 0.30, w = 2 l at 0.5 nm noise: the interval holds the first-order depth; the noise-only interval lies below it", () => {
    // First-order depth D1 = 2 k0 l integral exp(-x^2 / (w/l)^2) sech(x) dx = 4.4522 k0 l for w = 2 l
    // (../shared/PHYSICS.md section 5, own derivation after Yershov, Kravchuk, Sheka, Gaididei,
    // PRB 92, 104412 (2015)); first order is within 1% there up to k0 l = 0.4 (relaxed: +0.5%).
    const D1 = 4.4522 * k0 * l;
    const pts = bumpWire();
    let flagged = 0;
    for (const seed of [1, 2, 3]) {
      const g = normalStream(7000 + seed);
      const xyz = Float64Array.from(pts, (v, i) => (i % 3 === 2 ? 0 : v + 0.5 * g()) * 1e-9);
      const a = analyzeTrace({ xyz, dims: 2, source: { file: "bump", unit: "nm" }, diagnostics: [] }, { material, seed, bootstrap: 100 });
      const site = a.model!.pinning.find((p) => Math.abs(p.s * 1e9 - s0) < l / 4)!;
      expect(site, `seed ${seed}`).toBeDefined();
      // the smoothed bump is lower than the truth, so is the depth (measured 1.20-1.26 against 1.32)
      expect(site.depthReduced).toBeLessThan(D1);
      expect(site.depthReducedLo!).toBeLessThanOrEqual(D1);
      expect(site.depthReducedHi!, `seed ${seed}`).toBeGreaterThanOrEqual(1.005 * D1);
      // the same profile without its bias estimate: the replicates' noise alone does not reach the truth
      const { kappaBias: _k, tauBias: _t, ...unbiased } = a.profile;
      const noiseOnly = buildWireModel(unbiased, a.segments, material, { seed });
      const n = noiseOnly.pinning.find((p) => Math.abs(p.s * 1e9 - s0) < l / 4)!;
      expect(n.depthReduced).toBe(site.depthReduced);
      expect(n.depthReducedHi!).toBeLessThan(D1);
      // the site carries the profile's smoothing-bias flag when a sample within l/2 has it
      let biased = false;
      for (let j = 0; j < a.profile.n; ++j) if (Math.abs(a.profile.s[j] - site.s) <= 0.5 * material.magneticLength && a.profile.flags[j] & FLAG_BIAS) biased = true;
      expect(site.flags.includes(VALIDITY_TEXT.featureVsResolution)).toBe(biased);
      if (biased) ++flagged;
    }
    expect(flagged).toBeGreaterThan(0); // measured: the bump's samples are flagged at 0.5 nm noise
  }, 120_000);

  it("a wide bump (k0 l = 0.3, w = 5 l) at 0.2 nm noise: the straight wire's curvature noise floor is reached to 0, the interval holds the first-order depth", () => {
    // D1 / (k0 l) = 5.7754 for w = 5 l (../shared/PHYSICS.md section 5; first order within 0.2% there).
    const D1 = 5.7754 * 0.3;
    const pts = bumpWire(0.3 / l, 5 * l);
    const g = normalStream(7001);
    const xyz = Float64Array.from(pts, (v, i) => (i % 3 === 2 ? 0 : v + 0.2 * g()) * 1e-9);
    const a = analyzeTrace({ xyz, dims: 2, source: { file: "bump", unit: "nm" }, diagnostics: [] }, { material, seed: 1, bootstrap: 100 });
    const site = a.model!.pinning.find((p) => Math.abs(p.s * 1e9 - s0) < l / 4)!;
    // measured 1.702 in [1.674, 1.754]; without the floor reached to 0, [1.674, 1.717]
    expect(site.depthReduced).toBeLessThan(D1);
    expect(site.depthReducedLo!).toBeLessThanOrEqual(D1);
    expect(site.depthReducedHi!).toBeGreaterThanOrEqual(D1);
    expect(site.depthReducedHi!).toBeLessThan(1.05 * D1);
  }, 60_000);
});
