import { describe, expect, it } from "vitest";
import { helixContinuation } from "../../src/frame/endContinuation.js";
import { fitProfile } from "../../src/frame/profile.js";
import { FLAG_END, type InputUnit, type Profile, type Trace } from "../../src/types.js";

const trace = (xyz: Float64Array, unit: InputUnit = "A"): Trace => ({ xyz, dims: 3, source: { file: "h.xyz", unit }, diagnostics: [] });
const interior = (p: Profile) => Array.from({ length: p.n }, (_, j) => j).filter((j) => !(p.flags[j] & FLAG_END));
const continued = (p: Profile) => p.diagnostics.some((d) => d.includes("each end continued by the least-squares helix"));

// Alpha helix through its C-alpha atoms: radius 2.3 A, rise 1.5 A and 100 degrees per residue
// (Pauling, Corey & Branson 1951; values from memory). A helix (R cos t, R sin t, c t) has
// kappa = R / (R^2 + c^2), tau = c / (R^2 + c^2) (do Carmo 1976, sec. 1-5; textbook).
const Rh = 2.3, c = 1.5 / ((100 * Math.PI) / 180);
const k0 = Rh / (Rh * Rh + c * c), t0 = c / (Rh * Rh + c * c);
function alpha(n: number, scale = 1): Float64Array {
  const xyz = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    const t = (i * 100 * Math.PI) / 180;
    xyz.set([Rh * Math.cos(t) * scale, Rh * Math.sin(t) * scale, c * t * scale], 3 * i);
  }
  return xyz;
}

describe("helixContinuation", () => {
  it("continues exact helix points by the next points of the same helix", () => {
    const xyz = alpha(11);
    const next = helixContinuation(xyz, [0, 1, 2, 3, 4, 5, 6, 7], 3);
    expect(next).not.toBeNull();
    for (let k = 0; k < 3; ++k) for (let j = 0; j < 3; ++j) expect(Math.abs(next![3 * k + j] - xyz[3 * (8 + k) + j])).toBeLessThan(1e-6);
    // Backward: the points before the first one.
    const before = helixContinuation(xyz.slice(9), [7, 6, 5, 4, 3, 2, 1, 0], 2);
    for (let k = 0; k < 2; ++k) for (let j = 0; j < 3; ++j) expect(Math.abs(before![3 * k + j] - xyz[3 * (2 - k) + j])).toBeLessThan(1e-6);
  });

  it("refuses an end that is not a helix, and fewer than 6 points", () => {
    // A coarse 3D meander: its best helix misses the points by a third of their step.
    const meander = Float64Array.from({ length: 33 }, (_, i) => { const k = Math.floor(i / 3); return [k, Math.sin(k * 1.9), 0.3 * Math.cos(k * 1.3)][i % 3]; });
    expect(helixContinuation(meander, [0, 1, 2, 3, 4, 5, 6, 7], 3)).toBeNull();
    expect(helixContinuation(alpha(5), [0, 1, 2, 3, 4], 3)).toBeNull();
  });
});

describe("short sparse traces: ends continued", () => {
  it("gives a noise-free 10-atom alpha helix its curvature and torsion in the middle", () => {
    const p = fitProfile(trace(alpha(10)), { bootstrap: 0 });
    expect(continued(p)).toBe(true);
    const js = interior(p);
    expect(js.length).toBeGreaterThan(0);
    // measured +1.2% / -1.2% (without the continuation: -3.3% / +1.4%)
    for (const j of js) {
      expect(Math.abs(p.kappa[j] / k0 - 1)).toBeLessThan(0.02);
      expect(Math.abs(p.tau[j] / t0 - 1)).toBeLessThan(0.02);
    }
  });

  it("is equivariant: a mirror image negates the torsion, a rigid motion and the unit change nothing", () => {
    const xyz = alpha(11), p = fitProfile(trace(xyz), { bootstrap: 0 });
    const mirror = fitProfile(trace(xyz.map((v, i) => (i % 3 === 0 ? -v : v))), { bootstrap: 0 });
    const th = 0.7, moved = xyz.slice();
    for (let i = 0; i < 11; ++i) {
      const x = xyz[3 * i], y = xyz[3 * i + 1];
      moved[3 * i] = Math.cos(th) * x - Math.sin(th) * y + 5; moved[3 * i + 1] = Math.sin(th) * x + Math.cos(th) * y - 3; moved[3 * i + 2] += 1;
    }
    const m = fitProfile(trace(moved), { bootstrap: 0 });
    const metres = fitProfile(trace(xyz.map((v) => v * 1e-10), "m"), { bootstrap: 0 });
    for (const j of interior(p)) {
      expect(mirror.tau[j]).toBeCloseTo(-p.tau[j], 9);
      expect(mirror.kappa[j]).toBeCloseTo(p.kappa[j], 9);
      expect(Math.abs(m.kappa[j] / p.kappa[j] - 1)).toBeLessThan(1e-6);
      expect(Math.abs(m.tau[j] / p.tau[j] - 1)).toBeLessThan(1e-6);
      expect(Math.abs((metres.kappa[j] * 1e-10) / p.kappa[j] - 1)).toBeLessThan(1e-6);
    }
  });

  it("keeps an exactly planar sparse arc planar (torsion exactly 0) at the curvature 1/R", () => {
    // 7 points 1 rad apart on a circle of radius 1 (curvature 1/R: textbook); at 0.6 rad apart
    // (10 points per turn) an arc is no longer sparse and is smoothed instead.
    const arc = Float64Array.from({ length: 21 }, (_, i) => { const t = Math.floor(i / 3) * 1.0; return [Math.cos(t), Math.sin(t), 0][i % 3]; });
    const p = fitProfile(trace(arc), { bootstrap: 0 });
    expect(continued(p)).toBe(true);
    for (const j of interior(p)) {
      expect(Math.abs(p.kappa[j] - 1)).toBeLessThan(1e-3);
      expect(p.tau[j]).toBe(0);
    }
  });

  it("leaves a coarse meander (no helix at its ends) and a 13-atom helix to plain near-interpolation", () => {
    const meander = Float64Array.from({ length: 33 }, (_, i) => { const k = Math.floor(i / 3); return [k, Math.sin(k * 1.9), 0.3 * Math.cos(k * 1.3)][i % 3]; });
    expect(continued(fitProfile(trace(meander), { bootstrap: 0 }))).toBe(false);
    const p = fitProfile(trace(alpha(13)), { bootstrap: 0 });
    expect(p.diagnostics.some((d) => d.startsWith("sparse trace"))).toBe(true);
    expect(continued(p)).toBe(false);
  });
});
