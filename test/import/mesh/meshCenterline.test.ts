import { describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { meshCenterline } from "../../../src/import/mesh/meshCenterline.js";
import { parseObj } from "../../../src/import/mesh/parseObj.js";
import { parsePly } from "../../../src/import/mesh/parsePly.js";
import { parseStl } from "../../../src/import/mesh/parseStl.js";
import { readStlTraces } from "../../../src/import/mesh/readMesh.js";
import { fitProfile } from "../../../src/frame/profile.js";
import { FLAG_END, FLAG_TORSION_UNDEFINED, type Trace } from "../../../src/types.js";
import { mulberry32 } from "../../support/rng.js";
import {
  bentWireCurve, cappedTube, circleCurve, distancesToTruth, helixCurve, implicitTube, threeTube,
  toObj, toPlyAscii, toPlyBinary, toStlBinary, truthPolyline, type CurveFn,
} from "../../support/tubes.js";

// All test objects are invented; lengths in nm in the files, metres in the traces.
const NM = 1e-9;

/**
 * Largest distance from the centre line to the true curve, and largest radius error, both over the
 * tube radius, over the samples whose foot point on the truth lies inside [lo, hi] (the caps, where
 * the centre line runs on along the end tangent and the radius falls to 0, are checked apart).
 */
function errors(trace: Trace, curve: CurveFn, r: number, lo = 0, hi = 1) {
  const truth = truthPolyline(curve, 6000, NM);
  const { dist, foot } = distancesToTruth(trace.xyz, truth);
  let maxD = 0, maxR = 0, n = 0;
  for (let i = 0; i < dist.length; i++) {
    if (foot[i] < lo || foot[i] > hi) continue;
    n++;
    maxD = Math.max(maxD, dist[i] / (r * NM));
    maxR = Math.max(maxR, Math.abs((trace.radius as Float64Array)[i] - r * NM) / (r * NM));
  }
  return { maxD, maxR, n };
}

const helix = helixCurve(60, 40, 2); // radius 60 nm, pitch 40 nm, 2 turns; tube radius 10 nm
const helixStl = toStlBinary(threeTube(helix, 10, 300, 20, false)); // 12000 triangles
const ring = circleCurve(80); // torus: ring radius 80 nm, tube radius 12 nm
const torusObj = toObj(threeTube(ring, 12, 160, 16, true));
const bent = bentWireCurve(100, 50); // 100 nm legs, 90 degree bend of radius 50 nm, tube radius 10 nm
const bentGeo = cappedTube(bent, 10, { tubular: 120, radial: 20, capRings: 5 });

describe("meshCenterline(mesh, file, options)", () => {
  // The claims of the issue: centre line within 2% of the tube radius, radius within 2%, on tubes
  // whose centre line is known by construction (the curve the tube was built around).
  it("recovers the centre line and radius of an open helical tube (binary STL, three's TubeGeometry)", () => {
    const [t] = meshCenterline(parseStl(helixStl, "helix.stl", { unit: "nm" }), "helix.stl", { unit: "nm" });
    expect(t.closed).toBe(false);
    const e = errors(t, helix, 10);
    expect(e.n).toBeGreaterThan(80);
    expect(e.maxD).toBeLessThan(0.02); // measured 1.9e-3
    expect(e.maxR).toBeLessThan(0.02); // measured 6.3e-3 (a 20-gon's cut points lie between 0.988 r and r)
    // the uncapped ends stop within a step or two of the true ends
    const truth = truthPolyline(helix, 2, NM);
    const n = t.xyz.length / 3;
    const endGap = Math.min(
      Math.hypot(t.xyz[0] - truth[0], t.xyz[1] - truth[1], t.xyz[2] - truth[2]),
      Math.hypot(t.xyz[3 * n - 3] - truth[0], t.xyz[3 * n - 2] - truth[1], t.xyz[3 * n - 1] - truth[2]),
    );
    expect(endGap).toBeLessThan(10 * NM); // measured 3.3 nm (a third of a radius)
  });

  it("gives a closed ring for a torus (OBJ)", () => {
    const traces = meshCenterline(parseObj(torusObj, "torus.obj", { unit: "nm" }), "torus.obj", { unit: "nm" });
    expect(traces).toHaveLength(1);
    const [t] = traces;
    expect(t.closed).toBe(true);
    const e = errors(t, ring, 12);
    expect(e.n).toBe(t.xyz.length / 3);
    expect(e.maxD).toBeLessThan(0.02); // measured 1.3e-3
    expect(e.maxR).toBeLessThan(0.02); // measured 9.7e-3 (a 16-gon)
    // the samples go once around: total turning of the position angle is 2 pi
    let turn = 0;
    const n = t.xyz.length / 3;
    for (let i = 0; i < n; i++) {
      const j = (i + 1) % n;
      turn += Math.atan2(t.xyz[3 * i] * t.xyz[3 * j + 1] - t.xyz[3 * i + 1] * t.xyz[3 * j], t.xyz[3 * i] * t.xyz[3 * j] + t.xyz[3 * i + 1] * t.xyz[3 * j + 1]);
    }
    expect(Math.abs(Math.abs(turn) - 2 * Math.PI)).toBeLessThan(1e-9);
  });

  it("follows a capped bent wire into its caps, where the radius falls (binary and ASCII PLY)", () => {
    for (const [data, name] of [[toPlyBinary(bentGeo), "bent.ply"], [toPlyAscii(bentGeo), "bent-ascii.ply"]] as const) {
      const [t] = meshCenterline(parsePly(data, name, { unit: "nm" }), name, { unit: "nm" });
      expect(t.closed).toBe(false);
      // away from the caps (foot point strictly inside the curve)
      const e = errors(t, bent, 10, 1e-3, 1 - 1e-3);
      expect(e.maxD).toBeLessThan(0.02); // measured 1.3e-3
      expect(e.maxR).toBeLessThan(0.02); // measured 6.3e-3
      // the line runs on into each hemispherical cap, to within half a radius of its tip
      const n = t.xyz.length / 3;
      const tip = (p: number[], q: number[]) => Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2]) / (10 * NM);
      expect(tip([...t.xyz.subarray(0, 3)], [-10 * NM, 0, 0])).toBeLessThan(0.5); // measured 0.26
      expect(tip([...t.xyz.subarray(3 * n - 3)], [150 * NM, 160 * NM, 0])).toBeLessThan(0.5); // measured 0.30
      expect((t.radius as Float64Array)[0]).toBeLessThan(0.9 * 10 * NM);
      expect(t.diagnostics.some((d) => d.includes("end caps"))).toBe(true);
    }
  });

  it("gives a capped straight tube no torsion outside its end zones, even where the caps bend its centre line", () => {
    // A straight wire has no torsion (common practice: the Frenet frame is undefined where kappa = 0).
    // Next to the caps the extracted line bends a little; the curvature band reaches 0 there, and
    // torsion is reported only where that band excludes 0 (before: finite at 2 of 106 samples).
    const line: CurveFn = (t) => [600 * t, 0, 0];
    const [t] = meshCenterline(parseStl(toStlBinary(cappedTube(line, 10, { tubular: 60, radial: 16, capRings: 4 })), "rod.stl", { unit: "nm" }), "rod.stl", { unit: "nm" });
    // Inside the end zones (flag 4) the line runs on into the caps, off the axis by up to 0.08 radii
    // (measured): that bend is real for the line, and the end flag marks it.
    const p = fitProfile(t, { bootstrap: 100 });
    const inner = Array.from({ length: p.n }, (_, j) => j).filter((j) => !(p.flags[j] & FLAG_END));
    expect(inner.length).toBeGreaterThan(100); // measured 106 of 122
    for (const j of inner) {
      expect(p.tau[j]).toBeNaN();
      expect(p.flags[j] & FLAG_TORSION_UNDEFINED).toBe(FLAG_TORSION_UNDEFINED);
    }
  });

  it("stays within the noise floor on a noisy tube (5% radial vertex noise, as from a tomogram)", () => {
    const geo = cappedTube(helix, 10, { tubular: 200, radial: 24, capRings: 4, noiseRel: 0.05, seed: 11 });
    const [t] = meshCenterline(parseStl(toStlBinary(geo), "noisy.stl", { unit: "nm" }), "noisy.stl", { unit: "nm" });
    const e = errors(t, helix, 10, 0.02, 0.98);
    // Noise floor: a section centroid averages ~24 points of sd 0.05 r: sd about 0.05 r sqrt(2/24) = 1.4% r
    expect(e.maxD).toBeLessThan(0.08); // measured 4.3e-2
    expect(e.maxR).toBeLessThan(0.05); // measured 2.5e-2
    const spread = (t.radiusSpread as Float64Array)[Math.floor(t.xyz.length / 6)];
    expect(spread / (10 * NM)).toBeGreaterThan(0.02); // the noise shows in the spread: measured 0.040 (input 0.05)
    expect(spread / (10 * NM)).toBeLessThan(0.1);
  });

  it("handles an isosurface mesh (marching tetrahedra, irregular triangles) with rounded ends", () => {
    const geo = implicitTube([[[0, 0, 0], [120, 0, 0]]], 10, 3);
    const [t] = meshCenterline(parsePly(toPlyBinary(geo), "iso.ply", { unit: "nm" }), "iso.ply", { unit: "nm" });
    const line: CurveFn = (s) => [120 * s, 0, 0];
    const e = errors(t, line, 10, 1e-3, 1 - 1e-3);
    expect(e.maxD).toBeLessThan(0.02); // measured 3.5e-3
    expect(e.maxR).toBeLessThan(0.02); // measured 6.2e-3
  });

  it("returns one trace per disconnected wire, largest first", () => {
    const a = cappedTube(bent, 10, { tubular: 60, radial: 12, capRings: 3 });
    const shifted: CurveFn = (s) => {
      const p = helix(s);
      return [p[0] + 500, p[1], p[2]];
    };
    const b = cappedTube(shifted, 8, { tubular: 150, radial: 12, capRings: 3 });
    const merged = concatStl(toStlBinary(a), toStlBinary(b));
    const traces = readStlTraces(merged, "two.stl", { unit: "nm" });
    expect(traces).toHaveLength(2);
    expect(errors(traces[0], shifted, 8, 0.01, 0.99).maxD).toBeLessThan(0.02); // measured 6.6e-3
    expect(errors(traces[1], bent, 10, 0.01, 0.99).maxD).toBeLessThan(0.02); // measured 5.4e-3
    expect(traces[0].diagnostics.some((d) => d.startsWith("component 1 of 2"))).toBe(true);
  });

  it("reports a T junction with the component and the junction's position", () => {
    const geo = implicitTube([[[-60, 0, 0], [60, 0, 0]], [[0, 0, 0], [0, 60, 0]]], 10, 3);
    const mesh = parsePly(toPlyBinary(geo), "tee.ply", { unit: "nm" });
    let err: unknown;
    try {
      meshCenterline(mesh, "tee.ply", { unit: "nm" });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    const msg = (err as Error).message;
    expect(msg).toMatch(/^tee\.ply: component 1 of 1: branched: 3 arms meet near \(([-\d.e]+), ([-\d.e]+), ([-\d.e]+)\) nm \(arm lengths .*\); split the mesh/);
    const [, x, y, z] = /near \(([-\d.e]+), ([-\d.e]+), ([-\d.e]+)\)/.exec(msg) as RegExpExecArray;
    // approximate: within 2 tube radii of the true junction at the origin (measured 1.5 radii)
    expect(Math.hypot(Number(x), Number(y), Number(z))).toBeLessThan(20);
    // with branches: "longest", the longest path (tip to tip of the bar, about 140 nm) is kept
    const [t] = meshCenterline(mesh, "tee.ply", { unit: "nm", branches: "longest" });
    let L = 0;
    for (let i = 3; i < t.xyz.length; i += 3) L += Math.hypot(t.xyz[i] - t.xyz[i - 3], t.xyz[i + 1] - t.xyz[i - 2], t.xyz[i + 2] - t.xyz[i - 1]);
    expect(L / NM).toBeGreaterThan(120);
    expect(L / NM).toBeLessThan(150);
    expect(t.diagnostics.some((d) => d.includes("branched") && d.includes("kept the longest path"))).toBe(true);
  });

  it("is unchanged by a rigid motion (rotated and translated mesh gives the moved centre line)", () => {
    const rnd = mulberry32(5);
    const base = meshCenterline(parsePly(toPlyBinary(bentGeo), "bent.ply", { unit: "nm" }), "bent.ply", { unit: "nm" })[0];
    for (let trial = 0; trial < 3; trial++) {
      const geo = bentGeo.clone();
      const ax = [rnd() - 0.5, rnd() - 0.5, rnd() - 0.5];
      const angle = 6 * rnd();
      const shift = [1000 * rnd(), -500 * rnd(), 300 * rnd()];
      const { Matrix4, Vector3 } = THREE_MATH;
      const m = new Matrix4().makeRotationAxis(new Vector3(ax[0], ax[1], ax[2]).normalize(), angle).setPosition(shift[0], shift[1], shift[2]);
      geo.applyMatrix4(m);
      const [t] = meshCenterline(parsePly(toPlyBinary(geo), "moved.ply", { unit: "nm" }), "moved.ply", { unit: "nm" });
      // map the moved centre line back and compare with the original one (as curves)
      const back = new Float64Array(t.xyz.length);
      const inv = m.clone().invert();
      for (let i = 0; i < t.xyz.length; i += 3) {
        const v = new Vector3(t.xyz[i] / NM, t.xyz[i + 1] / NM, t.xyz[i + 2] / NM).applyMatrix4(inv);
        back.set([v.x * NM, v.y * NM, v.z * NM], i);
      }
      const { dist } = distancesToTruth(back, base.xyz);
      // float32 storage of coordinates up to ~1000 nm limits agreement to ~1e-4 nm; sampling of the polyline more
      expect(Math.max(...dist) / (10 * NM)).toBeLessThan(1e-4); // measured 5.9e-6 (float32 storage of the moved mesh)
      expect(t.xyz.length).toBe(base.xyz.length); // measured: equal
    }
  });

  it("scales lengths and radii with the unit (nm file read as um gives 1000x)", () => {
    const [a] = meshCenterline(parseStl(helixStl, "h.stl", { unit: "nm" }), "h.stl", { unit: "nm" });
    const [b] = meshCenterline(parseStl(helixStl, "h.stl", { unit: "um" }), "h.stl", { unit: "um" });
    expect(b.xyz.length).toBe(a.xyz.length);
    for (let i = 0; i < a.xyz.length; i++) expect(Math.abs(b.xyz[i] - 1000 * a.xyz[i])).toBeLessThanOrEqual(1e-9 * 1000 * 200 * NM);
    expect((b.radius as Float64Array)[10] / (a.radius as Float64Array)[10]).toBeCloseTo(1000, 6);
    expect(b.source).toEqual({ file: "h.stl", unit: "um" });
  });

  it("stops at each open end of a nearly closed ring instead of running on into the other end's tube", () => {
    // a 355 degree arc of radius 50 nm, tube radius 5 nm, uncapped: its open ends are 4.4 nm apart.
    // Truth: arc length R theta (textbook closed form) = 309.8 nm; the line had run 40 degrees on (345 nm).
    const R = 50, th = (355 * Math.PI) / 180;
    const arc: CurveFn = (t) => [R * Math.cos(th * t), R * Math.sin(th * t), 0];
    const stl = toStlBinary(threeTube(arc, 5, 240, 16, false));
    const [t] = meshCenterline(parseStl(stl, "arc355.stl", { unit: "nm" }), "arc355.stl", { unit: "nm" });
    expect(t.closed).toBe(false);
    const n = t.xyz.length / 3;
    let len = 0, turn = 0;
    for (let i = 0; i + 1 < n; i++) {
      len += Math.hypot(t.xyz[3 * i + 3] - t.xyz[3 * i], t.xyz[3 * i + 4] - t.xyz[3 * i + 1], t.xyz[3 * i + 5] - t.xyz[3 * i + 2]);
      turn += Math.atan2(t.xyz[3 * i] * t.xyz[3 * i + 4] - t.xyz[3 * i + 1] * t.xyz[3 * i + 3], t.xyz[3 * i] * t.xyz[3 * i + 3] + t.xyz[3 * i + 1] * t.xyz[3 * i + 4]);
    }
    expect(Math.abs(len / NM - R * th) / (R * th)).toBeLessThan(0.02); // was 11.5% long; the ends now stop at the last whole section
    expect(Math.abs(turn)).toBeLessThan(th); // no stretch of the ring traced twice
    const e = errors(t, arc, 5);
    expect(e.maxD).toBeLessThan(0.05);
    expect(t.diagnostics.some((d) => d.includes("another stretch of the surface"))).toBe(true);
  });

  it("names where the cross-section is far out of round (two wires fused side by side)", () => {
    // Two round tubes of radius 5 nm with axes 9 nm apart, fused (isosurface of their union): each
    // section is two overlapping circles, 19 x 10 nm (elementary geometry), not one round wire's.
    const line = (y: number) => Array.from({ length: 41 }, (_, i) => [5 * i, y, 0] as [number, number, number]);
    const fused = toStlBinary(implicitTube([line(0), line(9)], 5, 1.5));
    const [t] = meshCenterline(parseStl(fused, "fused.stl", { unit: "nm" }), "fused.stl", { unit: "nm" });
    const note = t.diagnostics.find((d) => d.includes("out of round"));
    expect(note).toMatch(/^component 1 of 1: cross-section out of round \(radius spread up to \d+% of the radius.* from \(.+\) nm to \(.+\) nm: .*fused side by side/);
    // one round tube of the same make: no such note (common practice: a wire's section is round)
    const single = toStlBinary(implicitTube([line(0)], 5, 1.5));
    const [u] = meshCenterline(parseStl(single, "one.stl", { unit: "nm" }), "one.stl", { unit: "nm" });
    expect(u.diagnostics.some((d) => d.includes("out of round"))).toBe(false);
  });

  it("names a lengthwise slit, duplicated triangles and a fat torus when it refuses a mesh", () => {
    // a straight tube (200 nm, radius 5 nm, 16 facets round) with one facet column cut out along its
    // whole length: had been called "a blob"; and the same tube with every triangle twice.
    const straight: CurveFn = (t) => [200 * t, 0, 0];
    const geo = threeTube(straight, 5, 60, 16, false);
    const idx = Array.from(geo.getIndex()!.array as ArrayLike<number>);
    const slit = geo.clone();
    slit.setIndex(idx.filter((_, k) => Math.floor(k / 3) % 32 > 1));
    expect(() => readStlTraces(toStlBinary(slit), "slit.stl", { unit: "nm" })).toThrow(/slit\.stl: mesh: no wire-like component \(component 1 of 1: skipped: an open surface whose boundary \(\d+ nm long\) runs within [\d.]+ nm of every point: a tube slit along its length\? close the slit\)$/);
    const twice = geo.clone();
    twice.setIndex([...idx, ...idx]);
    expect(() => readStlTraces(toStlBinary(twice), "twice.stl", { unit: "nm" })).toThrow(/no closed cross-section found along the level-set path \(\d+ edges are shared by more than 2 triangles: duplicated triangles/);
    // a torus whose hole (radius 4 nm) is narrower than its tube (radius 6 nm, ring radius 10 nm)
    const fat = toStlBinary(threeTube(circleCurve(10), 6, 60, 16, true));
    expect(() => readStlTraces(fat, "fat.stl", { unit: "nm" })).toThrow(/no closed cross-section found along the level-set path \(\d+ level loops of median radius [\d.]+ nm; .*not a thin tube there/);
  });

  it("skips debris components and fails clearly when nothing wire-like is left", () => {
    const tiny = implicitTube([[[0, 0, 0], [1, 0, 0]]], 2, 1.5);
    const main = cappedTube(bent, 10, { tubular: 60, radial: 12, capRings: 3 });
    const traces = readStlTraces(concatStl(toStlBinary(main), toStlBinary(tiny)), "d.stl", { unit: "nm", minTriangles: 300 }); // the debris has 228 triangles
    expect(traces).toHaveLength(1);
    expect(traces[0].diagnostics.some((d) => /component 2 of 2: skipped: \d+ triangles \(debris/.test(d))).toBe(true);
    const blob = implicitTube([[[0, 0, 0], [2, 0, 0]]], 10, 3); // a sphere-like blob
    expect(() => readStlTraces(toStlBinary(blob), "blob.stl", { unit: "nm" })).toThrow(
      /^blob\.stl: mesh: no wire-like component \(component 1 of 1: skipped: a blob, not a wire \(\d+ triangles, centre line [\d.]+ nm long for a radius of [\d.]+ nm\)\)$/,
    );
  });
});

import * as THREE_MATH from "three";

/** Concatenates binary STLs (header of the first, summed count). */
function concatStl(...parts: Uint8Array[]): Uint8Array {
  const n = parts.reduce((s, p) => s + (p.byteLength - 84) / 50, 0);
  const out = new Uint8Array(84 + 50 * n);
  out.set(parts[0].subarray(0, 80));
  new DataView(out.buffer).setUint32(80, n, true);
  let o = 84;
  for (const p of parts) {
    out.set(p.subarray(84), o);
    o += p.byteLength - 84;
  }
  return out;
}
