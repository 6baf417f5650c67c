/**
 * readTracesFile / readTraceFile over the whole format table: ordered traces, meshes (STL, OBJ,
 * PLY), point clouds (PLY vertices, `format: "cloud"` text) and SVG path data.
 * All test objects are invented; lengths are in nm in the files and in metres in the traces.
 * The reference for every centre line is the construction itself: the curve each tube or cloud
 * was built around (test/support/tubes.ts).
 */
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { InputError, ParameterError } from "../../src/errors.js";
import { readTraceFile, readTracesFile } from "../../src/import/readTrace.js";
import { TRACE_READERS } from "../../src/import/traceReaders.js";
import type { Trace } from "../../src/types.js";
import { mulberry32, normalStream } from "../support/rng.js";
import {
  bentWireCurve, cappedTube, circleCurve, distancesToTruth, helixCurve, implicitTube, threeTube, toObj, toPlyAscii, toPlyBinary, toStlAscii,
  toStlBinary, truthPolyline, type CurveFn,
} from "../support/tubes.js";

const NM = 1e-9;
const dir = mkdtempSync(join(tmpdir(), "twistline-traces-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const write = (name: string, data: string | Uint8Array): string => {
  const p = join(dir, name);
  writeFileSync(p, data);
  return p;
};

async function rejection(p: Promise<unknown>): Promise<Error> {
  try {
    await p;
  } catch (e) {
    return e as Error;
  }
  throw new Error("expected a rejection");
}

/**
 * Largest distance of the trace's points from the true curve, over `radius` (both in nm), over the
 * points whose foot on the curve lies strictly inside (a capped end runs on into its cap, past the curve's end).
 */
function worstOffset(trace: Trace, curve: CurveFn, radius: number, skipEnds = false): number {
  const { dist, foot } = distancesToTruth(trace.xyz, truthPolyline(curve, 6000, NM));
  let worst = 0;
  for (let i = 0; i < dist.length; i++) if (!skipEnds || (foot[i] > 1e-3 && foot[i] < 1 - 1e-3)) worst = Math.max(worst, dist[i]);
  return worst / (radius * NM);
}

/** Largest relative error of the trace's tube radius against `radius`. */
function worstRadius(trace: Trace, radius: number): number {
  return Math.max(...(trace.radius as Float64Array).map((r) => Math.abs(r / (radius * NM) - 1)));
}

/** Binary STL holding the triangles of both (two separate wires in one file). */
function concatStl(a: Uint8Array, b: Uint8Array): Uint8Array {
  const count = (s: Uint8Array) => new DataView(s.buffer, s.byteOffset, s.byteLength).getUint32(80, true);
  const na = count(a), nb = count(b);
  const out = new Uint8Array(84 + 50 * (na + nb));
  out.set(a.subarray(0, 80));
  new DataView(out.buffer).setUint32(80, na + nb, true);
  out.set(a.subarray(84), 84);
  out.set(b.subarray(84), 84 + 50 * na);
  return out;
}

/** `n` points along `curve` with seeded noise `sigma` (nm), in a seeded random order. */
function shuffledCloud(curve: CurveFn, n: number, sigma: number, seed: number): number[][] {
  const g = normalStream(seed), u = mulberry32(seed + 1);
  const pts = Array.from({ length: n }, (_, i) => curve(i / (n - 1)).map((v) => v + sigma * g()));
  return pts.map((p) => [u(), p] as const).sort((p, q) => p[0] - q[0]).map((p) => p[1]);
}

// Helix of radius 60 nm and pitch 40 nm, 2 turns, tube radius 10 nm (12000 triangles).
const helix = helixCurve(60, 40, 2);
const helixGeo = threeTube(helix, 10, 300, 20, false);
// Bent wire: 60 nm legs and a 90 degree bend of radius 40 nm, tube radius 8 nm, capped (smaller).
const bent = bentWireCurve(60, 40);
const bentGeo = cappedTube(bent, 8, { tubular: 80, radial: 16, capRings: 4 });

describe("readTracesFile(path, options): one list of wires for every format", () => {
  it("returns a one-element list for each ordered format", async () => {
    const square = "0 0 0\n1 0 0\n1 1 0\n0 1 0\n";
    for (const ext of ["csv", "tsv", "txt", "xyz"]) {
      const traces = await readTracesFile(write(`sq.${ext}`, square));
      expect(traces).toHaveLength(1);
      expect(traces[0].xyz[3]).toBe(1e-9); // default unit nm
    }
    const json = await readTracesFile(write("sq.json", '{"unit":"um","points":[[0,0],[1,0],[1,1],[0,1]]}'));
    expect(json).toHaveLength(1);
    expect(json[0].xyz[3]).toBe(1e-6);
  });

  it("lists every format, the mesh, cloud and SVG ones included", () => {
    expect([...TRACE_READERS.keys()]).toEqual(["csv", "tsv", "txt", "xyz", "json", "stl", "obj", "ply", "svg", "cloud"]);
  });

  it("reads the centre line and radius of a helix tube from binary and ASCII STL, OBJ and binary PLY, within 2% of the radius", async () => {
    const files = [
      write("helix.stl", toStlBinary(helixGeo)),
      write("helix-ascii.stl", toStlAscii(helixGeo)),
      write("helix.obj", toObj(helixGeo)),
      write("helix.ply", toPlyBinary(helixGeo)),
    ];
    for (const f of files) {
      const traces = await readTracesFile(f);
      expect(traces).toHaveLength(1);
      const [t] = traces;
      expect(t.source).toEqual({ file: f, unit: "nm" });
      expect(t.closed).toBe(false);
      expect(t.dims).toBe(3);
      expect(t.radius?.length).toBe(t.xyz.length / 3);
      expect(t.radiusSpread?.length).toBe(t.xyz.length / 3);
      // Reference: the helix the tube was built around (construction).
      expect(worstOffset(t, helix, 10)).toBeLessThan(0.02); // measured 1.9e-3 (each of the four files)
      expect(worstRadius(t, 10)).toBeLessThan(0.02); // measured 6.3e-3: a 20-gon's cut points lie between 0.988 r and r
    }
  });

  it("reads the file in the unit asked for, and in voxels with a pixel size", async () => {
    const f = write("bent.stl", toStlBinary(bentGeo));
    const [nm] = await readTracesFile(f);
    const [um] = await readTracesFile(f, { unit: "um" });
    const [px] = await readTracesFile(f, { unit: "px", pixelSize: 2e-9 });
    expect(um.source.unit).toBe("um");
    expect(px.source).toEqual({ file: f, unit: "px", pixelSize: 2e-9 });
    const n = nm.xyz.length / 3;
    expect(um.xyz.length / 3).toBe(n);
    // the same mesh scaled by 1000 and by 2: the same centre line, scaled (construction is scale-free)
    let worst = 0;
    for (let i = 0; i < 3 * n; i++) {
      worst = Math.max(worst, Math.abs(um.xyz[i] / 1000 - nm.xyz[i]) / (8 * NM), Math.abs(px.xyz[i] / 2 - nm.xyz[i]) / (8 * NM));
    }
    expect(worst).toBeLessThan(1e-9); // measured 1.3e-14 (rounding only)
  });

  it("refuses a pixel size without unit px, and unit px without a pixel size, for a mesh", async () => {
    const f = write("bent2.stl", toStlBinary(bentGeo));
    const e1 = await rejection(readTracesFile(f, { pixelSize: 2e-9 }));
    expect(e1).toBeInstanceOf(InputError);
    expect(e1.message).toBe(`${f}: pixelSize: only applies to unit "px" (the unit is "nm")`);
    const e2 = await rejection(readTracesFile(f, { unit: "px" }));
    expect(e2.message).toBe(`${f}: pixelSize: unit "px" needs a pixel size (metres per pixel)`);
  });

  it("gives one wire per tube, the larger first, and every wire keeps the file-wide notes", async () => {
    // the smaller tube first in the file, to see the order change
    const f = write("two.stl", concatStl(toStlBinary(bentGeo), toStlBinary(helixGeo)));
    const traces = await readTracesFile(f);
    expect(traces).toHaveLength(2);
    expect(worstOffset(traces[0], helix, 10)).toBeLessThan(0.02); // measured 1.9e-3
    expect(worstOffset(traces[1], bent, 8, true)).toBeLessThan(0.02); // measured 1.6e-3 (outside the caps)
    const welded = traces[0].diagnostics.find((d) => d.startsWith("welded "));
    expect(welded).toBeDefined();
    expect(traces[1].diagnostics[0]).toBe(welded);
    expect(traces[1].diagnostics.some((d) => d.startsWith("component 2 of 2: "))).toBe(true);
    expect(traces[0].diagnostics.some((d) => d.startsWith("component 2 of 2: "))).toBe(false);
  });

  it("refuses a branched mesh by default and keeps the longest path with branches: longest", async () => {
    // A T: a bar with a side arm, one watertight isosurface (marching tetrahedra on the distance field).
    const geo = implicitTube([[[-60, 0, 0], [60, 0, 0]], [[0, 0, 0], [0, 60, 0]]], 10, 3);
    const f = write("tee.stl", toStlBinary(geo));
    const e = await rejection(readTracesFile(f));
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toMatch(new RegExp(`^${f.replace(/[.*+?^${}()|[\]\\/]/g, "\\$&")}: component 1 of 1: branched: 3 arms meet near \\(`));
    const [t] = await readTracesFile(f, { branches: "longest" });
    expect(t.diagnostics.some((d) => /branched: .*kept the longest path only/.test(d))).toBe(true);
  });

  it("lets the caller's closure win over the mesh topology, with a note", async () => {
    const f = write("ring.obj", toObj(threeTube(circleCurve(80), 12, 160, 16, true)));
    const [ring] = await readTracesFile(f);
    expect(ring.closed).toBe(true);
    const [open] = await readTracesFile(f, { closed: false });
    expect(open.closed).toBe(false);
    expect(open.diagnostics.at(-1)).toBe("treated as open as asked, although the mesh topology says closed");
  });

  it("reads a PLY without faces as an unordered cloud of its vertices, and format cloud reads a PLY mesh's vertices", async () => {
    const pts = shuffledCloud(helix, 600, 0.5, 5);
    const ply = ["ply", "format ascii 1.0", `element vertex ${pts.length}`, "property double x", "property double y", "property double z", "end_header",
      ...pts.map((p) => p.join(" "))].join("\n") + "\n";
    const f = write("cloud.ply", ply);
    const [t] = await readTracesFile(f);
    expect(t.radius).toBeUndefined();
    expect(t.xyz.length).toBe(3 * 600);
    expect(t.diagnostics.some((d) => d.startsWith("ordered 600 points along an open curve"))).toBe(true);
    expect(worstOffset(t, helix, 10)).toBeLessThan(0.25); // the points themselves, noise sd 0.5 nm per axis: measured 0.18 of 10 nm
    // in curve order: no step longer than 4 median steps (a misordered point would jump a turn)
    const steps: number[] = [];
    for (let i = 3; i < t.xyz.length; i += 3) steps.push(Math.hypot(t.xyz[i] - t.xyz[i - 3], t.xyz[i + 1] - t.xyz[i - 2], t.xyz[i + 2] - t.xyz[i - 1]));
    const median = [...steps].sort((a, b) => a - b)[steps.length >> 1];
    expect(Math.max(...steps) / median).toBeLessThan(4); // measured 2.2
    // A tube's surface vertices read as a cloud: the spanning tree's longest path cannot follow one
    // wire through a thick surface, and the orderer says so (naming where) instead of returning it.
    const mesh = write("mesh-as-cloud.ply", toPlyAscii(bentGeo));
    await expect(readTracesFile(mesh, { format: "cloud" })).rejects.toThrow(/mesh-as-cloud\.ply: points: the cloud crosses itself or branches near \(.*\) nm \(a side branch of \d+ points reaching [\d.]+ nm from the path.*\): the order along one wire is ambiguous there; trace the wire as an ordered polyline, or split it into its wires \(--branches split\)$/);
  });

  it("reads unordered text with format cloud in the declared unit, honouring the file's closure", async () => {
    const pts = shuffledCloud(helix, 500, 0.3, 9);
    const text = "x_um,y_um,z_um\n" + pts.map((p) => p.map((v) => (v / 1000).toFixed(9)).join(",")).join("\n") + "\n";
    const [t] = await readTracesFile(write("cloud.csv", text), { format: "cloud" });
    expect(t.source.unit).toBe("um");
    expect(t.closed).toBe(false);
    expect(worstOffset(t, helix, 10)).toBeLessThan(0.2); // measured 0.14 (the noise itself, sd 0.3 nm per axis)
    // a ring: detected closed from its end gap; open when the file declares it open; the caller's choice over both
    const ringText = shuffledCloud(circleCurve(100), 400, 0.3, 4).map((p) => p.join(" ")).join("\n") + "\n";
    const [detected] = await readTracesFile(write("ring.xyz", ringText), { format: "cloud" });
    expect(detected.closed).toBe(true);
    const [declared] = await readTracesFile(write("ring1.xyz", "# closed: false\n" + ringText), { format: "cloud" });
    expect(declared.closed).toBe(false);
    const [asked] = await readTracesFile(write("ring2.xyz", "# closed: false\n" + ringText), { format: "cloud", closed: true });
    expect(asked.closed).toBe(true);
    // a JSON polyline read as a cloud: its unit holds, its order does not matter
    const doc = JSON.stringify({ unit: "um", points: pts.map((p) => p.map((v) => v / 1000)) });
    const [fromJson] = await readTracesFile(write("cloud.json", doc), { format: "cloud" });
    expect(fromJson.source.unit).toBe("um");
    expect(worstOffset(fromJson, helix, 10)).toBeLessThan(0.2); // the same points as above: measured 0.14
    // and a unit the file declares must agree with the one asked for, as for ordered traces
    const e = await rejection(readTracesFile(write("cloud2.csv", text), { format: "cloud", unit: "nm" }));
    expect(e.message).toBe(`${join(dir, "cloud2.csv")}:1: unit: the file declares "um" but "nm" was asked for`);
  });

  it("reads text with format cloud without the ordered-trace order check (3% stray points in the cloud)", async () => {
    // Truth: the helix the points were drawn from (construction); the strays are left out by the
    // cloud orderer. Before: the ordered-trace order check ran first and refused the file ("read them
    // as an unordered cloud with --format cloud", though that was given), or carried that note.
    const pts = shuffledCloud(helix, 500, 0.3, 11);
    const u = mulberry32(12);
    for (let i = 0; i < 15; i++) pts.splice(Math.floor(u() * pts.length), 0, [140 * u() - 70, 140 * u() - 70, 500 * u()]);
    const [t] = await readTracesFile(write("strays.csv", "x,y,z\n" + pts.map((p) => p.join(",")).join("\n") + "\n"), { format: "cloud" });
    expect(t.xyz.length / 3).toBe(500);
    expect(worstOffset(t, helix, 10)).toBeLessThan(0.2);
    expect(t.diagnostics.join("\n")).not.toMatch(/not in order|--format cloud/);
  });

  it("reads SVG paths as planar projections, calibrated by the pixel size, and refuses a length unit", async () => {
    const svg = '<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 400 400">\n<path id="a" d="M 50 200 A 150 150 0 0 1 350 200"/>\n' +
      '<path d="M 0 0 L 100 0 L 100 100 L 0 100 Z"/>\n</svg>\n';
    const f = write("two.svg", svg);
    const traces = await readTracesFile(f, { pixelSize: 2e-9 });
    expect(traces).toHaveLength(2);
    expect(traces.map((t) => [t.dims, t.planarProjection, t.closed])).toEqual([[2, true, false], [2, true, true]]);
    expect(traces[0].source).toEqual({ file: f, unit: "px", pixelSize: 2e-9 });
    // every point of the arc at 150 px x 2 nm = 300 nm from its centre (200, 200) px (SVG 1.1 F.6 arc)
    const a = traces[0].xyz;
    let worst = 0;
    for (let i = 0; i < a.length; i += 3) worst = Math.max(worst, Math.abs(Math.hypot(a[i] - 400e-9, a[i + 1] - 400e-9) / 300e-9 - 1));
    expect(worst).toBeLessThan(1e-12); // measured 6.7e-16
    expect(traces[1].diagnostics[0]).toBe("calibration pixel size 2e-9 m per user unit (given)");
    const e = await rejection(readTracesFile(f, { unit: "nm" }));
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toMatch(new RegExp(`: unit: an SVG drawing is in user units \\(px\\), not "nm"`));
    const noCal = await rejection(readTracesFile(f));
    expect(noCal.message).toMatch(/: svg: no pixel calibration/);
  });

  it("reads PLY and SVG from standard input by their first bytes", async () => {
    const bytes = (b: string | Uint8Array) => async () => (typeof b === "string" ? new TextEncoder().encode(b) : b);
    const [m] = await readTracesFile("-", { io: { readStdin: bytes(toPlyBinary(bentGeo)) } });
    expect(m.source.file).toBe("<stdin>");
    expect(m.radius).toBeDefined();
    const [s] = await readTracesFile("-", { pixelSize: 1e-9, io: { readStdin: bytes('<svg><path d="M0 0 L 10 0 L 10 10 L 20 10"/></svg>') } });
    expect(s.planarProjection).toBe(true);
  });
});

describe("readTraceFile(path, options): one wire", () => {
  const svg = '<svg width="400nm" viewBox="0 0 400 400"><path d="M0 0 L 100 0 L 100 100 L 200 100"/><path d="M0 200 L 100 200 L 100 300 L 200 300"/></svg>';

  it("returns wire 1 of several and says so in the diagnostics", async () => {
    const t = await readTraceFile(write("w.svg", svg));
    expect(t.diagnostics[0]).toBe("file has 2 wires; using wire 1 (--wire to choose)");
    expect(t.xyz[1]).toBe(0);
    const second = await readTraceFile(write("w.svg", svg), { wire: 2 });
    expect(second.diagnostics[0]).toBe("file has 2 wires; using wire 2");
    expect(second.xyz[1]).toBeCloseTo(200e-9, 20);
  });

  it("adds nothing for a one-wire file, and refuses a wire beyond the count, naming it", async () => {
    const f = write("one.csv", "0 0\n1 0\n1 1\n0 1\n");
    const t = await readTraceFile(f, { wire: 1 });
    expect(t.diagnostics).toEqual([]);
    const e = await rejection(readTraceFile(f, { wire: 3 }));
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toBe(`${f}: wire: asked for wire 3, but the file has 1 wire`);
    const two = await rejection(readTraceFile(write("w3.svg", svg), { wire: 3 }));
    expect(two.message).toBe(`${join(dir, "w3.svg")}: wire: asked for wire 3, but the file has 2 wires`);
    const bad = await rejection(readTraceFile(f, { wire: 0 }));
    expect(bad).toBeInstanceOf(ParameterError);
    expect(bad.message).toBe("readTraceFile: wire: must be an integer >= 1 (got 0)");
  });
});
