import { describe, expect, it } from "vitest";
import { checkMixedSampling, checkSparseGaps, checkSparseLength, chordTurn, MIXED_SAMPLING_LIMIT, dihedralConcentration, SPARSE_CLOSING_LIMIT, SPARSE_GAP_LIMIT, sparseHelicalWindow, ZIGZAG_DIHEDRAL_COS, zigzags } from "../../src/frame/passes.js";
import { fitProfile } from "../../src/frame/profile.js";
import { FLAG_END, FLAG_TORSION_UNDEFINED, type Profile, type Trace } from "../../src/types.js";
import { normalStream } from "../support/rng.js";
import { helixCurve, sampleCurveUneven } from "../support/curves.js";

const trace = (xyz: Float64Array): Trace => ({ xyz, dims: 3, source: { file: "h.xyz", unit: "A" }, diagnostics: [] });
const interior = (p: Profile) => Array.from({ length: p.n }, (_, j) => j).filter((j) => !(p.flags[j] & FLAG_END));
const isSparse = (p: Profile) => p.diagnostics.some((d) => d.startsWith("sparse trace:"));

/** Points t_i = i dphi on the helix (R cos t, R sin t, c t), with seeded noise. */
function helixPoints(n: number, R: number, c: number, dphi: number, noise = 0, seed = 1): Float64Array {
  const g = normalStream(seed), xyz = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    const t = i * dphi;
    xyz.set([R * Math.cos(t) + noise * g(), R * Math.sin(t) + noise * g(), c * t + noise * g()], 3 * i);
  }
  return xyz;
}

describe("chordTurn", () => {
  it("is the exterior angle of a regular polygon and the closed form on a helix", () => {
    // Regular polygon: consecutive sides turn by 2 pi / m (elementary geometry).
    expect(chordTurn(helixPoints(9, 1, 0, (2 * Math.PI) / 9), true)).toBeCloseTo((2 * Math.PI) / 9, 12);
    // Helix sampled every dphi: chords d_i with |d|^2 = 2 R^2 (1 - cos dphi) + (c dphi)^2 and
    // d_i . d_i+1 = 2 R^2 (1 - cos dphi) cos dphi + (c dphi)^2 (vector algebra on the parametrisation).
    const R = 2.3, dphi = (100 * Math.PI) / 180, c = 1.5 / dphi;
    const a = 2 * R * R * (1 - Math.cos(dphi)), b = (c * dphi) ** 2;
    expect(chordTurn(helixPoints(12, R, c, dphi), false)).toBeCloseTo(Math.acos((a * Math.cos(dphi) + b) / (a + b)), 12);
    expect(chordTurn(helixPoints(2, 1, 0, 1), false)).toBe(0);
  });
});

describe("dihedralConcentration", () => {
  it("is 1 on a helix (every dihedral the same: a screw motion maps each quadruple to the next) and well below it on noise", () => {
    const dphi = (100 * Math.PI) / 180;
    expect(dihedralConcentration(helixPoints(20, 2.3, 1.5 / dphi, dphi))).toBeCloseTo(1, 12);
    const g = normalStream(11), noise = Float64Array.from({ length: 600 }, () => g());
    expect(dihedralConcentration(noise)).toBeLessThan(0.5); // measured 0.26 (random dihedrals are not uniform: their cosine has a mean)
    expect(dihedralConcentration(helixPoints(3, 1, 0.1, 1))).toBe(0);
  });
});

describe("which traces are near-interpolated", () => {
  it("near-interpolates a 60-atom polyproline II helix (3 points per turn), which had come out straight", () => {
    // Left-handed polyproline II: radius 1.6 A, rise 3.1 A, -120 degrees per residue (from memory);
    // the first fit took the helix for noise about a straight axis (curvature ~0 for 0.34/A).
    const dphi = (-120 * Math.PI) / 180, c = 3.1 / dphi, R = 1.6;
    const k0 = R / (R * R + c * c), t0 = c / (R * R + c * c);
    const p = fitProfile(trace(helixPoints(60, R, c, dphi, 0.03, 5)), { bootstrap: 0 });
    expect(isSparse(p)).toBe(true);
    const js = interior(p);
    const meanK = js.reduce((s, j) => s + p.kappa[j], 0) / js.length, meanT = js.reduce((s, j) => s + p.tau[j], 0) / js.length;
    expect(Math.abs(meanK / k0 - 1)).toBeLessThan(0.05); // measured +2.2%
    expect(Math.abs(meanT / t0 - 1)).toBeLessThan(0.15); // measured -2.9%
    expect(meanT).toBeLessThan(0);
  });

  it("smooths a helix traced at 10 points per turn with the estimated noise, not near-interpolating it", () => {
    // DNA-like phosphate helix (radius 8.9 A, rise 3.38 A, 36 degrees per point; values from memory),
    // 30 points, 0.3 A noise. Helix curvature R / (R^2 + c^2), torsion c / (R^2 + c^2) (textbook).
    // Near-interpolated it was off by ~40% (curvature) and ~165% (torsion) RMS, with no noise estimate.
    const R = 8.9, dphi = (36 * Math.PI) / 180, c = 3.38 / dphi;
    const k0 = R / (R * R + c * c), t0 = c / (R * R + c * c);
    let covered = 0, count = 0;
    for (const seed of [1, 2, 3]) {
      const p = fitProfile(trace(helixPoints(30, R, c, dphi, 0.3, seed)), { bootstrap: 100, seed });
      expect(isSparse(p)).toBe(false);
      expect(Math.abs(p.sigma / 0.3 - 1)).toBeLessThan(0.35); // measured 0.24-0.35 A over 10 seeds
      const js = interior(p);
      const meanK = js.reduce((s, j) => s + p.kappa[j], 0) / js.length;
      const tv = js.filter((j) => Number.isFinite(p.tau[j]));
      const meanT = tv.reduce((s, j) => s + p.tau[j], 0) / tv.length;
      expect(Math.abs(meanK / k0 - 1)).toBeLessThan(0.05);
      expect(Math.abs(meanT / t0 - 1)).toBeLessThan(0.15);
      for (const j of js) { ++count; if (p.kappaLo[j] <= k0 && k0 <= p.kappaHi[j]) ++covered; }
    }
    expect(covered / count).toBeGreaterThan(0.75); // measured 0.88 over 10 seeds
  });

  it("does not estimate the noise of a long sparse trace, which had bands too narrow by 2x", () => {
    // 150-atom alpha helix at 0.2 A: the old probe estimate gave ~0.09 A, the curvature bands held
    // the truth at ~0.7 of the samples, unflagged.
    const dphi = (100 * Math.PI) / 180, c = 1.5 / dphi;
    const p = fitProfile(trace(helixPoints(150, 2.3, c, dphi, 0.2, 7)), { bootstrap: 50 });
    expect(isSparse(p)).toBe(true);
    expect(p.sigma).toBeNaN();
    expect(p.diagnostics.some((d) => d.startsWith("noise not estimable: on a sparse trace (150 points"))).toBe(true);
    expect(interior(p).every((j) => Number.isNaN(p.kappaLo[j]))).toBe(true);
    const given = fitProfile(trace(helixPoints(150, 2.3, c, dphi, 0.2, 7)), { bootstrap: 50, coordinateError: 0.2 });
    expect(given.sigma).toBe(0.2);
    expect(interior(given).every((j) => Number.isFinite(given.kappaLo[j]))).toBe(true);
  });

  it("refuses a sparse trace of more than 2000 points (it came out straight), not a dense noisy one", () => {
    const dphi = (-120 * Math.PI) / 180;
    expect(() => fitProfile(trace(helixPoints(2500, 1.6, 3.1 / dphi, dphi, 0.03, 2)), { bootstrap: 0 })).toThrow(
      "h.xyz: points: a sparse trace (the chords between points turn by 1.23 rad at the median, a few points per turn) of 2500 points: sparse traces are fitted up to 2000 points; split the file into pieces");
    // 2500 points on 5 turns of a helix, noise about the step (0.6 on 0.65): chords turn by 1.88 rad
    // at the median, but the dihedrals do not agree (concentration 0.14).
    const dense = fitProfile(trace(helixPoints(2500, 50, 10, (5 * 2 * Math.PI) / 2500, 0.6, 3)), { bootstrap: 0 });
    expect(isSparse(dense)).toBe(false);
  });

  it("near-interpolates a 60-atom pi helix whose first fit the divergence guard refused", () => {
    // pi helix: radius 2.8 A, rise 1.15 A, 87 degrees per residue (from memory); 0.14 A noise. Its
    // first (smoothing) fit came out straight, 0.29x the polyline's length, and was refused as diverged.
    const dphi = (87 * Math.PI) / 180, c = 1.15 / dphi, R = 2.8;
    const g = normalStream(3 * 77 + 60), xyz = new Float64Array(180);
    for (let i = 0; i < 60; ++i) { const t = i * dphi; xyz.set([R * Math.cos(t) + 0.14 * g(), R * Math.sin(t) + 0.14 * g(), c * t + 0.14 * g()], 3 * i); }
    const p = fitProfile(trace(xyz), { bootstrap: 0 });
    expect(isSparse(p)).toBe(true);
    const js = interior(p), k0 = R / (R * R + c * c);
    expect(Math.abs(js.reduce((s, j) => s + p.kappa[j], 0) / js.length / k0 - 1)).toBeLessThan(0.05);
  });

  it("still near-interpolates an alpha helix (3.6 points per turn), short or long", () => {
    const dphi = (100 * Math.PI) / 180, c = 1.5 / dphi;
    for (const n of [10, 16, 40]) expect(isSparse(fitProfile(trace(helixPoints(n, 2.3, c, dphi, 0.1, n)), { bootstrap: 0 }))).toBe(true);
  });
});

describe("traces sparse in part", () => {
  it("near-interpolates a straight lead followed by a 20-atom alpha helix, which came out nearly straight", () => {
    // Alpha helix (from memory: radius 2.3 A, rise 1.5 A, 100 degrees per residue) preceded by 10
    // points 3.8 A apart along its starting tangent; 0.05 A noise. Helix curvature R / (R^2 + c^2).
    const dphi = (100 * Math.PI) / 180, c = 1.5 / dphi, R = 2.3, k0 = R / (R * R + c * c);
    const g = normalStream(4), pts: number[] = [];
    const T = [0, R * dphi, 1.5], tn = Math.hypot(...T);
    for (let i = 10; i >= 1; --i) pts.push(R - (i * 3.8 * T[0]) / tn + 0.05 * g(), -(i * 3.8 * T[1]) / tn + 0.05 * g(), -(i * 3.8 * T[2]) / tn + 0.05 * g());
    for (let i = 0; i < 20; ++i) { const t = i * dphi; pts.push(R * Math.cos(t) + 0.05 * g(), R * Math.sin(t) + 0.05 * g(), c * t + 0.05 * g()); }
    const xyz = Float64Array.from(pts);
    expect(sparseHelicalWindow(xyz)).toBeGreaterThanOrEqual(0);
    const p = fitProfile(trace(xyz), { bootstrap: 0 });
    expect(isSparse(p)).toBe(true);
    // The helix's own samples (rows 14-25): measured +0.2%; the smoothing path gave 0.02-0.06/A.
    const helix = interior(p).filter((j) => p.inputRow![j] >= 14 && p.inputRow![j] <= 25);
    const meanK = helix.reduce((s, j) => s + p.kappa[j], 0) / helix.length;
    expect(Math.abs(meanK / k0 - 1)).toBeLessThan(0.05);
  });

  it("finds no sparse window on noisy dense traces (noise up to the step)", () => {
    for (const [N, noise, seed] of [[1000, 0.01, 19], [2000, 0.01, 3], [500, 0.03, 7], [200, 0.1, 2]] as const) {
      expect(sparseHelicalWindow(sampleCurveUneven(helixCurve(1, 0.4, 4), N, noise, seed).xyz)).toBe(-1);
    }
  });
});

describe("stretches of a sparse helix", () => {
  it("keeps a 14-atom helix in one stretch (too few non-end samples for a noise scale: all samples give it)", async () => {
    const { samplePoints, segmentWire } = await import("../../src/frame/segment.js");
    // 3-10 helix (radius 1.9 A, rise 2.0 A, 120 degrees per residue; from memory): with the noise
    // scale at its floor these draws were cut into 5-7 stretches.
    const dphi = (120 * Math.PI) / 180, c = 2.0 / dphi;
    for (const seed of [1, 2, 3]) {
      const tr = trace(helixPoints(14, 1.9, c, dphi, 0.04, seed * 31 + 14));
      const p = fitProfile(tr, { bootstrap: 0, keepSamples: true });
      const points = samplePoints(tr, p) ?? undefined;
      expect(segmentWire(p, points ? { points } : {}).segments).toHaveLength(1);
    }
  });

  it("labels a clean 20-point helix at 10 points per turn a helix, not irregular (its end samples left out of the variation)", async () => {
    const { samplePoints, segmentWire } = await import("../../src/frame/segment.js");
    // DNA-like phosphate helix (radius 8.9 A, rise 3.38 A, 36 degrees per point; from memory), 0.18 A noise.
    const dphi = (36 * Math.PI) / 180, c = 3.38 / dphi;
    for (const seed of [2 * 31 + 20, 3 * 31 + 20, 4 * 31 + 20]) {
      const tr = trace(helixPoints(20, 8.9, c, dphi, 0.178, seed));
      const p = fitProfile(tr, { bootstrap: 0, keepSamples: true });
      const points = samplePoints(tr, p) ?? undefined;
      expect(segmentWire(p, points ? { points } : {}).segments.map((g) => g.kind)).toEqual(["helix"]);
    }
  });

  it("keeps an ideal 30-atom alpha helix in one helix stretch (its end samples no longer open stretches)", async () => {
    const { samplePoints, segmentWire } = await import("../../src/frame/segment.js");
    // Alpha helix (Pauling, Corey & Branson 1951; from memory), 0.046 A noise: with the end samples at
    // full weight these draws gave 5, 5 and 4 stretches.
    const dphi = (100 * Math.PI) / 180, c = 1.5 / dphi;
    for (const seed of [1, 2, 3]) {
      const g = normalStream(seed * 31 + 30), xyz = new Float64Array(90);
      for (let i = 0; i < 30; ++i) { const t = i * dphi; xyz.set([2.3 * Math.cos(t) + 0.046 * g(), 2.3 * Math.sin(t) + 0.046 * g(), c * t + 0.046 * g()], 3 * i); }
      const tr = trace(xyz);
      const p = fitProfile(tr, { bootstrap: 0, keepSamples: true });
      const points = samplePoints(tr, p) ?? undefined;
      const { segments } = segmentWire(p, points ? { points } : {});
      expect(segments.map((s) => s.kind)).toEqual(["helix"]);
      // Helix curvature R / (R^2 + c^2) (textbook).
      expect(Math.abs(segments[0].kappa / (2.3 / (2.3 * 2.3 + c * c)) - 1)).toBeLessThan(0.02);
    }
  });
});

describe("sparse traces: gaps and loops refused", () => {
  // Alpha-helix C-alpha geometry (radius 2.3 A, 100 degrees and 1.5 A per residue; from memory).
  const R = 2.3, dphi = (100 * Math.PI) / 180, c = 1.5 / dphi;
  it("refuses two 20-atom helices 30 A apart read as one trace, naming the gap", () => {
    const a = helixPoints(20, R, c, dphi, 0.1, 1), b = helixPoints(20, R, c, dphi, 0.1, 2);
    const xyz = new Float64Array(120);
    xyz.set(a, 0);
    for (let i = 0; i < 20; ++i) xyz.set([b[3 * i] + 30, b[3 * i + 1], b[3 * i + 2] + 5], 60 + 3 * i);
    for (let k = 0; k < 120; ++k) xyz[k] *= 1e-10; // metres, read as A
    // Near-interpolated across the jump, the fit was 1.8x the polyline's length, exit 0.
    expect(() => fitProfile(trace(xyz), { bootstrap: 0 })).toThrow(
      /^h\.xyz: points: gap in a sparse trace: 40\.\d A between point 20 and point 21, \d+\.\dx the steps around it \(missing points\?\): near-interpolation would invent the wire there; split the trace at the gap$/);
  });

  it("keeps every step of noisy sparse helices within the limit; finds the widest step on a closed wire", () => {
    // Measured worst step over its neighbours' median: 1.38 on the molecule and trust benches.
    const say = (d: number) => `${d.toFixed(2)} A`, name = (i: number) => `point ${i + 1}`;
    for (let seed = 1; seed <= 5; ++seed) expect(() => checkSparseGaps(helixPoints(30, R, c, dphi, 0.3, seed), false, "h.xyz", name, say)).not.toThrow();
    // A closed 12-gon whose closing side spans 1.6 rad, the others 0.43 (3.4x the chords around it): the closure is refused.
    const ring = new Float64Array(36);
    for (let i = 0; i < 12; ++i) { const t = (i / 11) * (2 * Math.PI - 1.6); ring.set([10 * Math.cos(t), 10 * Math.sin(t), 0], 3 * i); }
    expect(() => checkSparseGaps(ring, true, "r.xyz", name, say)).toThrow(/^r\.xyz: closed: the wire was declared closed but its ends are 14\.35 A apart, 3\.4x the steps around them/);
    // The same ring read from its 6th point on: the wide side is now between points 6 and 7, named.
    const rolled = new Float64Array(36);
    for (let i = 0; i < 12; ++i) rolled.set(ring.subarray(3 * ((i + 6) % 12), 3 * ((i + 6) % 12) + 3), 3 * i);
    expect(() => checkSparseGaps(rolled, true, "r.xyz", name, say)).toThrow(/gap in a sparse trace: 14\.35 A between point 6 and point 7, 3\.4x/);
    expect(SPARSE_GAP_LIMIT).toBe(3);
  });

  it("refuses --closed on an open 8-atom helix (ends 2.75 steps apart: joined by an invented arc), not on a closed ring of atoms", () => {
    const xyz = helixPoints(8, R, c, dphi).map((v) => v * 1e-10);
    expect(() => fitProfile(trace(xyz), { bootstrap: 0, closed: true })).toThrow(
      /^h\.xyz: closed: the wire was declared closed but its ends are 10\.5 A apart, 2\.7x the steps around them: a sparse trace's closing chord must be a step like the others \(near-interpolation would invent the wire between its ends\); fit it open \(--open\), or give a trace whose ends meet$/);
    // An 8-point ring of radius 10 (curvature 0.1: elementary geometry), closed: kept and exact.
    const ring = new Float64Array(24);
    for (let i = 0; i < 8; ++i) ring.set([10e-10 * Math.cos((i * Math.PI) / 4), 10e-10 * Math.sin((i * Math.PI) / 4), 0], 3 * i);
    const p = fitProfile(trace(ring), { bootstrap: 0, closed: true });
    for (let j = 0; j < 8; ++j) expect(p.kappa[j] * 1e-10).toBeCloseTo(0.1, 4);
    expect(SPARSE_CLOSING_LIMIT).toBe(2);
  });

  it("refuses a fit that loops between the points (length over the polyline above 1.6)", () => {
    const say = (d: number) => `${d} A`;
    expect(() => checkSparseLength(100, 80, "h.xyz", say)).not.toThrow();
    expect(() => checkSparseLength(130, 80, "h.xyz", say)).toThrow(
      "h.xyz: points: the fit of this sparse trace diverged: its length is 1.6x the polyline through the points (80 A); the points are too few or too noisy for the turns of this wire (the curve loops between them)");
    expect(() => checkSparseLength(20, 80, "h.xyz", say)).toThrow(/0\.25x the polyline/);
  });
});

describe("sparse helices inside densely sampled traces", () => {
  // A gentle arc (radius 3000 A) traced every 1 A with 0.05 A of noise, a 20-atom alpha helix
  // (radius 2.3 A, 100 degrees and 1.5 A per residue; from memory) continuing along it, then the arc
  // again from the helix's last atom: `lead` points either side. Coordinates in metres, read as A.
  function mixed(lead: number): Float64Array {
    const g = normalStream(5), pts: number[] = [], Rh = 2.3, c = 1.5 / ((100 * Math.PI) / 180), Ra = 3000;
    let x = 0, oy = 0, oz = 0;
    const arc = (k: number) => { for (let i = 0; i < k; ++i) { x += 1; pts.push(x + 0.05 * g(), (x - 1700) ** 2 / (2 * Ra) + oy + 0.05 * g(), oz + 0.05 * g()); } };
    arc(lead);
    const x0 = x, y0 = (x - 1700) ** 2 / (2 * Ra);
    for (let i = 1; i <= 20; ++i) { const t = (i * 100 * Math.PI) / 180; pts.push(x0 + c * t, y0 + Rh * Math.cos(t) - Rh, Rh * Math.sin(t)); }
    const t = (20 * 100 * Math.PI) / 180;
    x = x0 + c * t; oy = y0 + Rh * Math.cos(t) - Rh - (x + 1 - 1700) ** 2 / (2 * Ra); oz = Rh * Math.sin(t);
    arc(lead);
    return Float64Array.from(pts, (v) => v * 1e-10);
  }
  it("refuses one that mixes 1 A steps with a 3.8 A helix (the dense part's noise came out as curvature 0.2/A for 0.0003/A)", () => {
    expect(() => fitProfile(trace(mixed(500)), { bootstrap: 0 })).toThrow(
      /^h\.xyz: points: point 500 to point 515 are a sparse helix \(a few points per turn, 3\.8\d A apart\), but a tenth of the trace's steps are 0\.9\d\d A or shorter: one fit cannot near-interpolate the helix and smooth the densely sampled rest; split the file where the sampling changes$/);
  });
  it("refuses a trace of more than 2000 points with a sparse helix inside (smoothing flattened it: curvature 0.005/A for 0.38/A)", () => {
    expect(() => fitProfile(trace(mixed(1500)), { bootstrap: 0 })).toThrow(
      "h.xyz: points: point 1500 to point 1515 are a sparse helix (a few points per turn) inside a trace of 3020 points: smoothing would flatten it, and sparse traces are fitted up to 2000 points; split the file into pieces");
  });
  it("keeps the uniform-step checks quiet: ratios of sparse helices stay under the limit", () => {
    const say = (d: number) => `${d}`, name = (i: number) => `point ${i + 1}`;
    const R = 2.3, dphi = (100 * Math.PI) / 180, c = 1.5 / dphi;
    for (let seed = 1; seed <= 5; ++seed) expect(() => checkMixedSampling(helixPoints(30, R, c, dphi, 0.3, seed), false, -1, "h.xyz", name, say)).not.toThrow();
    expect(MIXED_SAMPLING_LIMIT).toBe(2);
  });
});

describe("coarse traces whose noise estimate is their shape", () => {
  it("near-interpolates a noise-free coil traced at 8 points per turn (smoothed, curvature +22%, torsion 30x the curvature)", () => {
    // Coil of radius 20 nm rising 1 nm per turn, 120 points at 45 degrees: helix kappa = R/(R^2+c^2),
    // tau = c/(R^2+c^2) (do Carmo 1976, sec. 1-5). Its local-cubic "noise", 2.5 nm, was the shape.
    const R = 20, c = 1 / (2 * Math.PI), xyz = new Float64Array(360);
    for (let i = 0; i < 120; ++i) { const t = (i * 2 * Math.PI) / 8; xyz.set([R * Math.cos(t) * 1e-9, R * Math.sin(t) * 1e-9, c * t * 1e-9], 3 * i); }
    const p = fitProfile({ xyz, dims: 3, source: { file: "coil.csv", unit: "nm" }, diagnostics: [] }, { bootstrap: 0 });
    expect(p.diagnostics.some((d) => /^sparse trace: the smoothing fit ran inside the points by 1\.\d\d of its noise estimate on average/.test(d))).toBe(true);
    const k0 = R / (R * R + c * c), t0 = c / (R * R + c * c);
    for (const j of interior(p)) {
      expect(Math.abs((p.kappa[j] * 1e-9) / k0 - 1)).toBeLessThan(0.01); // measured 0.0%
      expect(Math.abs((p.tau[j] * 1e-9) / t0 - 1)).toBeLessThan(0.05);
    }
  });

  it("leaves noisy dense traces on the smoothing path (their misfit stays near 0)", () => {
    for (const [N, noise] of [[200, 0.002], [200, 0.01], [1000, 0.01]] as const) {
      const { xyz } = sampleCurveUneven(helixCurve(1, 0.4, 4), N, noise, 107);
      const p = fitProfile({ xyz, dims: 3, source: { file: "h.csv", unit: "m" }, diagnostics: [] }, { bootstrap: 0 });
      expect(p.diagnostics.some((d) => d.startsWith("sparse trace"))).toBe(false);
    }
  });
});

/**
 * Pixel chain of the curve f on [t0, t1]: f rounded to whole pixels at fine parameter steps,
 * repeats dropped; `four` inserts the corner pixel of every diagonal move (4-connected chain, as a
 * skeletonised micrograph gives). Invented test data.
 */
function pixelChain(f: (t: number) => [number, number], t0: number, t1: number, four: boolean, scale = 1): Float64Array {
  const pts: number[][] = [];
  for (let i = 0; i <= 40000; ++i) {
    const [x, y] = f(t0 + ((t1 - t0) * i) / 40000).map((v) => Math.round(v * scale) / scale);
    const q = pts[pts.length - 1];
    if (q && q[0] === x && q[1] === y) continue;
    if (four && q && q[0] !== x && q[1] !== y) pts.push([x, q[1]]);
    pts.push([x, y]);
  }
  return Float64Array.from(pts.flatMap(([x, y]) => [x * 1e-9, y * 1e-9, 0]));
}

describe("pixel and voxel chains are dense traces, not sparse ones", () => {
  const px = (xyz: Float64Array, dims: 2 | 3): Trace => ({ xyz, dims, source: { file: "skeleton.csv", unit: "nm" }, diagnostics: [] });

  it("zigzags: a 4-connected chain's turns reverse (mean dihedral cosine -1); helices and rings twist one way", () => {
    expect(zigzags(pixelChain((t) => [150 * Math.cos(t), 150 * Math.sin(t)], 0, 1.5 * Math.PI, true))).toBe(true);
    // Ideal helices with textbook geometries (from memory, as bench/molecules.ts): radius A, rise A, degrees per point.
    for (const [R, rise, deg] of [[2.3, 1.5, 100], [1.9, 2.0, 120], [2.8, 1.15, 87], [1.6, 3.1, -120]]) {
      const dphi = (deg * Math.PI) / 180;
      expect(zigzags(helixPoints(20, R, rise / dphi, dphi))).toBe(false);
    }
    expect(zigzags(helixPoints(12, 1, 0, (2 * Math.PI) / 8))).toBe(false); // a planar octagon: dihedral 0
    expect(ZIGZAG_DIHEDRAL_COS).toBe(-0.7);
  });

  it("smooths a 4-connected pixel arc of radius 150 px (near-interpolated: curvature 2/px for 0.0067/px, 1.34x its length, exit 0)", () => {
    // Circle: kappa = 1/R (textbook). Pixel size 1 nm.
    const R = 150, xyz = pixelChain((t) => [R * Math.cos(t), R * Math.sin(t)], 0, 1.5 * Math.PI, true);
    for (const dims of [2, 3] as const) {
      const p = fitProfile(px(xyz, dims), { bootstrap: 0 });
      expect(isSparse(p)).toBe(false);
      expect(Math.abs(p.length / (1.5 * Math.PI * R * 1e-9) - 1)).toBeLessThan(0.01); // measured +0.1%
      let worst = 0;
      for (const j of interior(p)) worst = Math.max(worst, Math.abs((p.kappa[j] * 1e-9 * R) - 1));
      expect(worst).toBeLessThan(0.03); // measured 0.34% (2-D), 0.28% (3-D)
    }
  });

  it("reads a digitised straight line (4-connected, slope 2/5) as straight: curvature near 0, torsion undefined", () => {
    const xyz = pixelChain((t) => [t, 0.4 * t], 0, 200, true);
    const p = fitProfile(px(xyz, 2), { bootstrap: 0 });
    expect(isSparse(p)).toBe(false);
    for (let j = 0; j < p.n; ++j) {
      expect(p.kappa[j] * 1e-9 * 200).toBeLessThan(0.05); // measured 0.001: a radius of curvature of 1000 lengths of the line
      expect(p.flags[j] & FLAG_TORSION_UNDEFINED).toBe(FLAG_TORSION_UNDEFINED);
    }
  });

  it("does not take a dense arc rounded to 0.1 px (8000 points, lattice steps) for a sparse helix inside a long trace", () => {
    const R = 150, xyz = pixelChain((t) => [R * Math.cos(t), R * Math.sin(t)], 0, 1.5 * Math.PI, false, 10);
    expect(xyz.length / 3).toBeGreaterThan(2000);
    const p = fitProfile(px(xyz, 2), { bootstrap: 0 });
    for (const j of interior(p)) expect(Math.abs(p.kappa[j] * 1e-9 * R - 1)).toBeLessThan(0.03); // measured 0.12% at worst
  });
});
