import { describe, expect, it } from "vitest";
import { segment } from "../../src/frame/segment.js";
import { BOLTZMANN, buildWireModel, firstOrderPinning, parseMaterial } from "../../src/physics/index.js";
import { makeProfile, rotationMatrix } from "../support/profiles.js";

const l = 5e-9; // magnetic length (invented material)
const afm = parseMaterial({ order: "antiferro", magneticLength: l, anisotropy: 1e5, thickness: 2e-9 }, "afm.json");

function helix(k: number, t: number, extra: object = {}) {
  return makeProfile({ n: 401, length: 40 * l, kappa: () => k / l, tau: () => t / l, band: 0.01 / l, ...extra });
}

describe("buildWireModel on an AFM helix (PHYSICS.md sections 3, 4, 6)", () => {
  it("(1, 0.5): one helix stretch, homogeneous and stable, tilt 14.8724 deg, gaps of the table", () => {
    const p = helix(1, 0.5);
    const m = buildWireModel(p, segment(p), afm, { pinning: false });
    expect(m.segments.length).toBe(1);
    const g = m.segments[0];
    expect(g.kind).toBe("helix");
    expect(g.kappaReduced).toBeCloseTo(1, 9);
    expect(g.tauReduced).toBeCloseTo(0.5, 9);
    expect(Math.abs(g.tiltDeg - 14.8724)).toBeLessThan(0.5); // target 0.5 deg; measured 1e-4
    expect(g.state).toBe("homogeneous");
    expect(g.homogeneousStability).toBe("stable");
    expect(g.probabilities.homogeneous).toBe(1);
    expect(g.uncertain).toBe(false);
    expect(Math.abs(g.magnons!.lower0 / 1.06432242 - 1)).toBeLessThan(0.01);
    expect(Math.abs(g.magnons!.upper0 / 1.4197057 - 1)).toBeLessThan(0.01);
    expect(g.dmi).toBeCloseTo(2 * afm.exchange! * Math.hypot(1, 0.5) / l, 12);
    // relaxed texture in the bulk matches the homogeneous tilt
    const i = 200, u = m.texture.local;
    expect(Math.abs(Math.abs(Math.atan2(u[3 * i], u[3 * i + 2]) * (180 / Math.PI)) - 14.8724)).toBeLessThan(0.1);
    // the anisotropy constants are K times the reduced eigenvalues; the lowest axis is the state
    expect(g.anisotropyConstantsUnit).toBe("J/m^3");
    expect(m.interactions.unit.dmi).toBe("J/m^2");
  });
  it("(1, 1): periodic ground state with a metastable homogeneous state, flagged", () => {
    const p = helix(1, 1);
    const g = buildWireModel(p, segment(p), afm, { pinning: false }).segments[0];
    expect(g.state).toBe("periodic");
    expect(g.homogeneousStability).toBe("metastable");
    expect(g.flags.some((f) => f.startsWith("metastable"))).toBe(true);
    expect(g.magnons!.note).toMatch(/metastable/);
  });
  it("mirror image flips the handedness and the sign of the tilt, labels unchanged; rigid motion changes nothing locally", () => {
    const a = helix(1, 0.5), b = helix(1, -0.5), c = helix(1, 0.5, { rotation: rotationMatrix(1, 1, 0, 2), translation: [1e-6, 2e-6, 3e-6] });
    const ma = buildWireModel(a, segment(a), afm, { pinning: false });
    const mb = buildWireModel(b, segment(b), afm, { pinning: false });
    const mc = buildWireModel(c, segment(c), afm, { pinning: false });
    expect(mb.segments[0].tiltDeg).toBeCloseTo(-ma.segments[0].tiltDeg, 9);
    expect(mb.segments[0].state).toBe(ma.segments[0].state);
    expect(mb.segments[0].homogeneousStability).toBe(ma.segments[0].homogeneousStability);
    expect(mc.segments[0]).toEqual(ma.segments[0]);
    expect(mc.texture.energyReduced).toBeCloseTo(ma.texture.energyReduced, 9);
  });
  it("a band straddling the phase boundary (tau 1, kappa near 1.36) is uncertain with probabilities strictly between 0 and 1", () => {
    const p = helix(1.36, 1, { band: 0.08 / l });
    const g = buildWireModel(p, segment(p), afm, { pinning: false, seed: 5 }).segments[0];
    expect(g.uncertain).toBe(true);
    expect(g.probabilities.periodic).toBeGreaterThan(0.05);
    expect(g.probabilities.periodic).toBeLessThan(0.95);
    expect(g.probabilities.homogeneous + g.probabilities.periodic).toBeCloseTo(1, 12);
    expect(g.probabilities.stable + g.probabilities.metastable + g.probabilities.unstable).toBeCloseTo(1, 12);
  });
  it("a closed AFM ring gives ring levels and the n = B ground state", () => {
    const k = 0.5, p = makeProfile({ n: 400, length: (2 * Math.PI * l) / k, closed: true, kappa: () => k / l, tau: () => 0 });
    const m = buildWireModel(p, segment(p), afm, { pinning: false });
    expect(m.segments.map((g) => g.kind)).toEqual(["arc"]);
    expect(m.ringLevels![1].lower).toBeCloseTo(0.5411961, 6); // PHYSICS.md section 6 ring table
    expect(Math.abs(m.texture.energyReduced)).toBeLessThan(1e-8);
  });
});

describe("buildWireModel pinning on a planar FM wire with a curvature bump (PHYSICS.md section 5)", () => {
  it("the wall through -N pins at the bump: site within l/4, depth in J and k_B T, first order within 10%", () => {
    const lf = 10e-9, K = 5e5, t = 20e-9;
    const fm = parseMaterial({ order: "ferro", exchange: K * lf * lf, anisotropy: K, thickness: t }, "fm.json");
    const c = 20.1 * lf;
    const p = makeProfile({ n: 801, length: 40 * lf, kappa: (s) => (0.3 / lf) * Math.exp(-(((s - c) / lf) ** 2)), tau: () => 0, straightBelow: 1e-3 / lf, band: 0.01 / lf });
    const m = buildWireModel(p, segment(p), fm, {});
    expect(m.pinning.length).toBeGreaterThan(0);
    const site = m.pinning[0];
    expect(Math.abs(site.s - c)).toBeLessThan(0.25 * lf);
    const area = (Math.PI * t * t) / 4;
    expect(site.depthJ!).toBeCloseTo(site.depthReduced * K * lf * area, 30);
    expect(site.depthKT!).toBeCloseTo(site.depthJ! / (BOLTZMANN * 300), 9);
    // first-order preview against the constrained depth: 0.3 * 2.9581 = 0.887 (PHYSICS.md D1/k0)
    const fo = firstOrderPinning(Float64Array.from(p.s, (x) => x / lf), Float64Array.from(p.kappa, (x) => x * lf), Float64Array.of(c / lf, 5), "ferro");
    expect(Math.abs((fo[1] - fo[0]) / site.depthReduced - 1)).toBeLessThan(0.1); // measured ~1.2%
    for (let k = 1; k < m.pinning.length; ++k) expect(m.pinning[k].depthReduced).toBeLessThanOrEqual(m.pinning[k - 1].depthReduced);
  });
});
