import { describe, expect, it } from "vitest";
import { segment } from "../../src/frame/segment.js";
import type { Profile } from "../../src/types.js";
import { makeProfile, rotationMatrix } from "../support/profiles.js";
import { normalStream } from "../support/rng.js";

const L = 1e-6; // 1 um wire, invented
const k0 = 2e7, t0 = 1e7; // 1/m
// straight [0, 0.3 L), arc [0.3 L, 0.6 L), helix [0.6 L, L]
const piecewise = {
  n: 601, length: L, straightBelow: 1,
  kappa: (s: number) => (s < 0.3 * L ? 0 : k0), tau: (s: number) => (s < 0.6 * L ? 0 : t0),
  band: 0.02 * k0,
};

/** Add white noise consistent with the bands (sigma = half-band / 1.96) to kappa and tau. */
function noisy(p: Profile, seed: number): Profile {
  const g = normalStream(seed);
  const kappa = Float64Array.from(p.kappa, (k, i) => k + ((p.kappaHi[i] - p.kappaLo[i]) / 3.92) * g());
  const tau = Float64Array.from(p.tau, (t, i) => t + ((p.tauHi[i] - p.tauLo[i]) / 3.92) * g());
  return { ...p, kappa, tau };
}

describe("segment (PELT change points, Killick et al. 2012)", () => {
  it("finds straight, arc and helix stretches with change points within one resolution length", () => {
    const p = makeProfile(piecewise);
    const g = segment(p);
    expect(g.map((x) => x.kind)).toEqual(["straight", "arc", "helix"]);
    expect(Math.abs(g[1].s0 - 0.3 * L)).toBeLessThan(p.resolution);
    expect(Math.abs(g[2].s0 - 0.6 * L)).toBeLessThan(p.resolution);
    expect(g[2].kappa).toBeCloseTo(k0, -1);
    expect(g[2].tau).toBeCloseTo(t0, -1);
    expect(g[0].i0).toBe(0);
    expect(g[2].i1).toBe(p.n);
    for (let k = 1; k < g.length; ++k) expect(g[k].i0).toBe(g[k - 1].i1);
  });
  it("a noisy constant helix stays one helix stretch over 20 seeded noise draws", () => {
    const base = makeProfile({ n: 500, length: L, kappa: () => k0, tau: () => t0, band: 0.05 * k0 });
    for (let seed = 1; seed <= 20; ++seed) {
      const g = segment(noisy(base, seed));
      expect(g.length).toBe(1);
      expect(g[0].kind).toBe("helix");
      expect(g[0].kappaLo).toBeLessThan(k0);
      expect(g[0].kappaHi).toBeGreaterThan(k0);
    }
  });
  it("bands of the stretch means come from the replicates when the profile keeps them", () => {
    const p = makeProfile({ n: 300, length: L, kappa: () => k0, tau: () => t0, band: 0.05 * k0, replicates: 100, seed: 3 });
    const [g] = segment(p);
    expect(g.kappaLo).toBeLessThan(g.kappa);
    expect(g.kappaHi).toBeGreaterThan(g.kappa);
    // replicate-wide offsets of sd band/1.96: the 95% band of the mean is about +-band
    expect((g.kappaHi - g.kappaLo) / 2).toBeGreaterThan(0.5 * 0.05 * k0);
    expect((g.kappaHi - g.kappaLo) / 2).toBeLessThan(1.5 * 0.05 * k0);
  });
  it("merges a stretch shorter than minLength into a neighbour", () => {
    const p = makeProfile({ n: 601, length: L, kappa: (s) => (Math.abs(s - 0.5 * L) < 0.01 * L ? 1.5 * k0 : k0), tau: () => t0, band: 0.02 * k0 });
    expect(segment(p).length).toBe(3);
    // (bend detection off: a curvature peak this narrow is otherwise a stretch and a feature of its own)
    const merged = segment(p, { minLength: 0.05 * L, bendSigmas: Infinity });
    // the blip is absorbed by a neighbour (whose mean it shifts, so two stretches remain)
    expect(merged.length).toBe(2);
    for (const g of merged) expect(g.s1 - g.s0).toBeGreaterThanOrEqual(0.05 * L);
    expect(merged[0].i0).toBe(0);
    expect(merged[1].i0).toBe(merged[0].i1);
    expect(merged[1].i1).toBe(p.n);
  });
  it("mirror image (tau -> -tau) keeps the stretches and flips the sign of tau; rigid motion changes nothing", () => {
    const a = segment(makeProfile(piecewise));
    const b = segment(makeProfile({ ...piecewise, tau: (s: number) => -piecewise.tau(s) }));
    const c = segment(makeProfile({ ...piecewise, rotation: rotationMatrix(0.3, -1, 2, 1.1), translation: [5e-6, 0, 1e-6] }));
    expect(b.map((x) => [x.i0, x.i1, x.kind])).toEqual(a.map((x) => [x.i0, x.i1, x.kind]));
    expect(b[2].tau).toBeCloseTo(-a[2].tau, 0);
    expect(c).toEqual(a);
  });
  it("edge cases: an empty profile gives no stretch; a tiny one gives one", () => {
    const p = makeProfile({ n: 3, length: 1e-8, kappa: () => k0, tau: () => t0 });
    expect(segment(p).length).toBe(1);
    expect(segment({ ...p, n: 0, s: new Float64Array(0) })).toEqual([]);
  });
});
