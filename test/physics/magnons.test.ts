import { describe, expect, it } from "vitest";
import { homogeneousModes, latticeMagnons, magnonDispersion, magnonGaps, plainSystem, ringLevels } from "../../src/physics/index.js";

const af = plainSystem("antiferro");
const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe("AFM magnons of a helix (PHYSICS.md section 6, own derivation)", () => {
  // (kappa, tau) -> theta deg, omega_-(0), omega_+(0), k_min, omega_min, Delta
  const TABLE: number[][] = [
    [0.5, 0.25, 5.944329, 0.51285012, 1.10160360, 0.25972925, 0.50818446, 0.00466566],
    [0.5, 0.5, 13.282526, 0.55589297, 1.05737126, 0.49873824, 0.48852690, 0.06736607],
    [1, 0.5, 14.872441, 1.06432242, 1.41970576, 1.07611641, 0.57868692, 0.48563550],
    [1, 1, 31.717474, 1.27201965, 1.49534878, 1.37179647, 0.14149968, 1.13051997],
    [2, 1, 22.5, 2.19736823, 2.37841423, 2.22850887, 0.50906285, 1.68830538],
  ];
  it.each(TABLE)("magnonGaps(%s, %s) reproduce the table to 1e-6 relative (target 1%)", (k, t, _th, lo, hi, kmin, wmin, depth) => {
    const g = magnonGaps(af, k, t);
    expect(rel(g.lower0, lo)).toBeLessThan(1e-6);
    expect(rel(g.upper0, hi)).toBeLessThan(1e-6);
    expect(rel(g.kMin, kmin)).toBeLessThan(1e-6);
    expect(rel(g.lowerMin, wmin)).toBeLessThan(1e-6);
    expect(rel(g.depth, depth)).toBeLessThan(2e-6); // depth is a difference: measured 1e-7
  });
  it("dispersion samples at k = 1: (0.5,0.25) 0.76746248, 1.69927840; (1,0.5) 0.58349076, 2.19268903", () => {
    const a = magnonDispersion(homogeneousModes(af, 0.5, 0.25), 1), b = magnonDispersion(homogeneousModes(af, 1, 0.5), 1);
    expect(rel(a.lower, 0.76746248)).toBeLessThan(1e-7);
    expect(rel(a.upper, 1.6992784)).toBeLessThan(1e-7);
    expect(rel(b.lower, 0.58349076)).toBeLessThan(1e-7);
    expect(rel(b.upper, 2.19268903)).toBeLessThan(1e-7);
  });
  it("straight-chain limit: in-plane omega = |k| (gapless), out-of-plane sqrt(1 + k^2)", () => {
    const m = homogeneousModes(af, 0, 0);
    for (const k of [0, 0.3, 1, 4]) {
      const d = magnonDispersion(m, k);
      expect(d.lower).toBeCloseTo(k, 12);
      expect(d.upper).toBeCloseTo(Math.sqrt(1 + k * k), 12);
    }
  });
  it("the splitting tends to 2|D0| at large k", () => {
    const m = homogeneousModes(af, 1, 0.5);
    const d = magnonDispersion(m, 1e4);
    expect(rel(d.upper - d.lower, 2 * Math.abs(m.d0))).toBeLessThan(1e-3);
  });
  it("an unstable state reports NaN for the band minimum (edge case)", () => {
    const g = magnonGaps(af, 0.5, 1.2);
    expect(g.unstable).toBe(true);
    expect(g.lowerMin).toBeNaN();
  });
});

describe("ring levels (PHYSICS.md section 6, own derivation)", () => {
  const RING: number[][] = [
    [0.1, 0.1, 0.14000057, 0.2200058, 1.00498756, 1.01014842, 1.02547426],
    [0.5, 0.5, 0.5411961, 0.7949629, 1.11803399, 1.30656296, 1.69352709],
    [1, 1, 0.66215345, 1.21196994, 1.41421356, 2.13577921, 3.08725264],
    [2, 2, 0.69598149, 2.11947857, 2.23606798, 4.06394018, 6.04216936],
  ];
  it.each(RING)("ringLevels(%s) j = 0, 1, 2 match the table to 1e-7 relative", (k, l0, l1, l2, u0, u1, u2) => {
    const r = ringLevels(k, 2);
    [l0, l1, l2].forEach((v, j) => expect(rel(r[j].lower, v)).toBeLessThan(1e-7));
    [u0, u1, u2].forEach((v, j) => expect(rel(r[j].upper, v)).toBeLessThan(1e-7));
  });
  it("ring levels are the helix dispersion at tau = 0 sampled at k = j kappa", () => {
    for (const k of [0.3, 1.2]) {
      const m = homogeneousModes(af, k, 0);
      ringLevels(k, 4).forEach(({ j, lower, upper }) => {
        const d = magnonDispersion(m, j * k);
        expect(d.lower).toBeCloseTo(lower, 12);
        expect(d.upper).toBeCloseTo(upper, 12);
      });
    }
  });
  it("for kappa > 1/sqrt(3) the lowest level is j = 1, below it j = 0", () => {
    const above = ringLevels(1 / Math.sqrt(3) + 0.01, 3), below = ringLevels(1 / Math.sqrt(3) - 0.01, 3);
    expect(above[1].lower).toBeLessThan(above[0].lower);
    expect(below[0].lower).toBeLessThan(below[1].lower);
  });
});

describe("lattice check (PHYSICS.md section 6 unit test: kappa 1, tau 0.5, L = 2 pi, N = 100)", () => {
  it("tilt 14.86954052 deg, e = 0.1171966673, frequencies 0.5834564581 (|k| = 1) and 1.0640908680 (k = 0)", () => {
    const r = latticeMagnons(af, 1, 0.5, (2 * Math.PI) / 100, [0, 1, -1]);
    expect(Math.atan2(r.u[0], r.u[2]) * (180 / Math.PI)).toBeCloseTo(14.86954052, 7);
    expect(r.energy).toBeCloseTo(0.1171966673, 9);
    expect(r.modes[0].lower).toBeCloseTo(1.064090868, 8);
    expect(r.modes[1].lower).toBeCloseTo(0.5834564581, 8);
    expect(r.modes[2].lower).toBeCloseTo(0.5834564581, 8);
  });
  it("converges to the continuum formulas at second order in h", () => {
    const cont = magnonDispersion(homogeneousModes(af, 1, 0.5), 1).lower;
    const e1 = Math.abs(latticeMagnons(af, 1, 0.5, 0.1, [1]).modes[0].lower - cont);
    const e2 = Math.abs(latticeMagnons(af, 1, 0.5, 0.05, [1]).modes[0].lower - cont);
    expect(e1 / e2).toBeGreaterThan(3.5); // measured ~4.0
    expect(e1 / e2).toBeLessThan(4.5);
  });
});
