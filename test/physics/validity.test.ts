import { describe, expect, it } from "vitest";
import { makeChain } from "../../src/physics/chain.js";
import { parseMaterial, pinningLandscape, plainSystem, relaxWire } from "../../src/physics/index.js";
import { pinningSummary } from "../../src/physics/pinningSummary.js";
import { ringWalls } from "../../src/physics/ringState.js";
import { sampleValidity, thinWireLimit, validityLines, VALIDITY_BITS } from "../../src/physics/sampleValidity.js";
import { FLAG_BIAS } from "../../src/types.js";

const cols = (kappaHi: number[], flags: number[] = kappaHi.map(() => 0)) => ({
  kappaHi: Float64Array.from(kappaHi), tauLo: new Float64Array(kappaHi.length), tauHi: new Float64Array(kappaHi.length), flags: Uint8Array.from(flags),
});

describe("sampleValidity (PHYSICS.md section 1: radii much larger than thickness and lattice spacing; thin wire)", () => {
  const mat = parseMaterial({ order: "ferro", magneticLength: 10e-9, thickness: 4e-9, latticeSpacing: 0.25e-9 }, "m.json");
  it("a bend of radius 9.8 nm in a 4 nm wire is flagged (below 5 thicknesses); 25 nm is not", () => {
    const v = sampleValidity(cols([1 / 9.8e-9, 1 / 25e-9, 0]), mat);
    expect(v[0] & VALIDITY_BITS.bendVsThickness).toBeTruthy();
    expect(v[1]).toBe(0);
    expect(v[2]).toBe(0);
    expect(validityLines(v)).toEqual(["curvature or torsion radius below 5 wire thicknesses"]);
  });
  it("lattice spacing, the fit's bias flag and a torsion radius count too; unknown lengths are not checked (edge case)", () => {
    const v = sampleValidity({ ...cols([1 / 2e-9, 0, 0], [0, FLAG_BIAS, 0]), tauHi: Float64Array.of(0, 0, 1 / 15e-9) }, mat);
    expect(v[0] & VALIDITY_BITS.bendVsLattice).toBeTruthy();
    expect(v[1]).toBe(VALIDITY_BITS.featureVsResolution);
    expect(v[2]).toBe(VALIDITY_BITS.bendVsThickness);
    const bare = parseMaterial({ order: "ferro", magneticLength: 10e-9 }, "m.json");
    expect(Array.from(sampleValidity(cols([1 / 1e-9]), bare))).toEqual([0]);
  });
  it("thin-wire limit: FM 2 l_ex with l_ex = sqrt(2A / (mu0 Ms^2)); AFM the magnetic length", () => {
    // A = 13 pJ/m, Ms = 800 kA/m: l_ex = 5.69 nm (textbook permalloy-like values, common practice)
    const m = parseMaterial({ order: "ferro", exchange: 1.3e-11, saturationMagnetisation: 8e5, thickness: 12e-9 }, "m.json");
    expect(thinWireLimit(m) / 2 / 5.69e-9).toBeCloseTo(1, 2);
    expect(sampleValidity(cols([0]), m)[0]).toBe(VALIDITY_BITS.thickWire);
    const a = parseMaterial({ order: "antiferro", magneticLength: 5e-9, thickness: 2e-9 }, "a.json");
    expect(thinWireLimit(a)).toBe(5e-9);
  });
});

describe("ringWalls (closed FM texture: sign changes of m . T around the ring)", () => {
  it("vortex 0, onion 2, counting the closing bond", () => {
    const tex = (ts: number[]) => Float64Array.from(ts.flatMap((t) => [t, Math.sqrt(1 - t * t), 0]));
    expect(ringWalls(tex([1, 0.9, 1, 0.8]))).toBe(0);
    expect(ringWalls(tex([1, 0.5, -0.5, -1, -0.5, 0.5]))).toBe(2);
    expect(ringWalls(tex([-1, -0.5, 0.5, 1, 0.5]))).toBe(2); // the wall across the closing bond counts
    expect(ringWalls(tex([0, 0, 0]))).toBe(0); // no tangential component anywhere (edge case)
  });
});

describe("barriers: a curvature maximum repels an AFM wall (PHYSICS.md section 5)", () => {
  it("bump (w 2, k0 0.1) on kb 0.5: one barrier at the bump of height U(0) - U(far) = 0.17734 within 1%", () => {
    const h = 0.1, L = 60, n = L / h + 1, sys = plainSystem("antiferro");
    const s = Float64Array.from({ length: n }, (_, i) => -L / 2 + i * h);
    const k = Float64Array.from(s, (x) => 0.5 + 0.1 * Math.exp(-(x * x) / 4)), t = new Float64Array(n);
    const chain = makeChain(k, t, new Float64Array(n - 1).fill(h), sys.q, "open");
    const bg = relaxWire(chain, sys, k, t);
    const nodes = Array.from({ length: 33 }, (_, i) => Math.round((-16 + i + L / 2) / h));
    const scan = pinningLandscape(chain, s, bg.local, k, "antiferro", { nodes, keepWalls: true });
    const out = pinningSummary({
      scan, h: chain.h, q: sys.q, replicates: null, kappaReduced: k, tauReduced: t, sReduced: s, validity: new Uint8Array(n),
      l: 1e-9, energyUnit: null, kT: 4e-21, depinning: null,
    });
    expect(out.sites.length + out.minor.length).toBe(0);
    expect(out.barriers.length).toBe(1);
    expect(Math.abs(out.barriers[0].s / 1e-9)).toBeLessThan(0.5);
    expect(Math.abs(out.barriers[0].depthReduced / 0.17734 - 1)).toBeLessThan(0.01); // measured -0.07% (h = 0.1)
    expect(out.barriers[0].kind).toBe("barrier");
    expect(out.barriers[0].depthReducedLo).toBeNull(); // no replicates: no interval
  });
});
