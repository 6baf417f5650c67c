import { describe, expect, it } from "vitest";
import { chainEnergy, makeChain, uniformChain } from "../../src/physics/chain.js";
import { homogeneousState, plainSystem, relaxWire, wireChain } from "../../src/physics/index.js";
import { latticeMagnons } from "../../src/physics/latticeMagnons.js";
import { mulberry32 } from "../support/rng.js";
import { makeProfile, rotationMatrix } from "../support/profiles.js";

const fm = plainSystem("ferro"), af = plainSystem("antiferro");

describe("chain energy", () => {
  it("gradient matches central finite differences (common practice check)", () => {
    const r = mulberry32(3);
    const n = 30;
    const k = Float64Array.from({ length: n }, () => 0.5 + r()), t = Float64Array.from({ length: n }, () => r() - 0.5);
    const chain = makeChain(k, t, new Float64Array(n).fill(0.1), af.q, "open");
    const v = Float64Array.from({ length: 3 * n }, () => r() - 0.5);
    const g = new Float64Array(3 * n);
    chainEnergy(chain, v, g);
    for (const i of [0, 5, 31, 89]) {
      const e = 1e-6, vp = v.slice(), vm = v.slice();
      vp[i] += e; vm[i] -= e;
      const fd = (chainEnergy(chain, vp, null) - chainEnergy(chain, vm, null)) / (2 * e);
      expect(Math.abs(fd - g[i])).toBeLessThan(1e-6 * Math.max(1, Math.abs(g[i])));
    }
  });
  it("the homogeneous helix texture has the lattice energy density of latticeMagnons (antiperiodic-free closed chain)", () => {
    const h = (2 * Math.PI) / 100;
    const chain = uniformChain(100, 1, 0.5, h, af.q, "periodic");
    const u = latticeMagnons(af, 1, 0.5, h, []).u;
    const v = new Float64Array(300);
    for (let i = 0; i < 100; ++i) v.set(u, 3 * i);
    // PHYSICS.md section 6 lattice value e = 0.1171966673
    expect(chainEnergy(chain, v, null) / (2 * Math.PI)).toBeCloseTo(0.1171966673, 9);
  });
});

describe("relaxWire", () => {
  it("straight FM wire relaxes to m = T with energy -L exactly", () => {
    const n = 200, h = 0.1;
    const z = new Float64Array(n);
    const chain = makeChain(z, z, new Float64Array(n - 1).fill(h), fm.q, "open");
    const r = relaxWire(chain, fm, z, z);
    expect(r.energy).toBeCloseTo(-(n - 1) * h, 10);
    expect(Math.abs(r.local[3 * 50])).toBeCloseTo(1, 9);
  });
  it("closed AFM ring: n = B, e = 0 from several starts, the exact ground state (PHYSICS.md section 3)", () => {
    const n = 200, k = 0.7, h = (2 * Math.PI) / k / n;
    const kk = new Float64Array(n).fill(k), z = new Float64Array(n);
    const chain = makeChain(kk, z, new Float64Array(n).fill(h), af.q, "periodic");
    const r = relaxWire(chain, af, kk, z);
    expect(Math.abs(r.energy)).toBeLessThan(1e-9);
    expect(Math.abs(r.local[3 * 10 + 2])).toBeCloseTo(1, 6);
  });
  it("a long helix relaxes to the homogeneous tilt in the bulk (numerical state against closed form, 0.5 deg target)", () => {
    const n = 801, h = 0.05, k = 1, t = 0.5;
    const kk = new Float64Array(n).fill(k), tt = new Float64Array(n).fill(t);
    const chain = makeChain(kk, tt, new Float64Array(n - 1).fill(h), af.q, "open");
    const r = relaxWire(chain, af, kk, tt);
    const i = 400;
    const tilt = Math.atan2(r.local[3 * i], r.local[3 * i + 2]) * (180 / Math.PI);
    const ref = homogeneousState(af, k, t).tilt * (180 / Math.PI);
    expect(Math.abs(Math.abs(tilt) - ref)).toBeLessThan(0.05); // measured ~0.004 deg (O(h^2))
  });
  it("rigid motion of the wire changes nothing in the local frame; the lab texture rotates with it", () => {
    const spec = { n: 400, length: 40e-9, kappa: (s: number) => 0.1e9 + 0.05e9 * Math.sin(s * 0.2e9), tau: () => 0.05e9 };
    const a = makeProfile(spec);
    const R = rotationMatrix(1, 2, 3, 0.7);
    const b = makeProfile({ ...spec, rotation: R, translation: [1e-5, -2e-5, 3e-6] });
    const l = 5e-9;
    const ra = relaxWire(wireChain(a, l, fm), fm, Float64Array.from(a.kappa, (x) => x * l), Float64Array.from(a.tau, (x) => x * l));
    const rb = relaxWire(wireChain(b, l, fm), fm, Float64Array.from(b.kappa, (x) => x * l), Float64Array.from(b.tau, (x) => x * l));
    expect(rb.energy).toBeCloseTo(ra.energy, 10);
    for (let i = 0; i < ra.local.length; ++i) expect(rb.local[i]).toBeCloseTo(ra.local[i], 8);
    // lab frame: T of b is R T of a
    for (const i of [0, 100, 399]) for (let c = 0; c < 3; ++c) expect(b.T[3 * i + c]).toBeCloseTo(R[3 * c] * a.T[3 * i] + R[3 * c + 1] * a.T[3 * i + 1] + R[3 * c + 2] * a.T[3 * i + 2], 10);
  });
});
