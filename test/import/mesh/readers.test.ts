import { describe, expect, it } from "vitest";
import { mergeVertices } from "three/examples/jsm/utils/BufferGeometryUtils.js";
import { InputError } from "../../../src/errors.js";
import { parseObj } from "../../../src/import/mesh/parseObj.js";
import { parsePly, parsePlyVertices } from "../../../src/import/mesh/parsePly.js";
import { parseStl } from "../../../src/import/mesh/parseStl.js";
import { weldVertices } from "../../../src/import/mesh/weld.js";
import { cappedTube, helixCurve, threeTube, toObj, toPlyAscii, toPlyBinary, toStlAscii, toStlBinary } from "../../support/tubes.js";

// Invented test objects. Errors are asserted whole: "file[:line]: field: problem".
const helix = helixCurve(60, 40, 1);
const tube = threeTube(helix, 10, 40, 8, false); // 640 triangles, 41 rings of 8 distinct vertices
const stl = toStlBinary(tube);
const opts = { unit: "nm" } as const;

/** Asserts that f throws an InputError with exactly this message. */
function expectThrow(f: () => unknown, message: string): void {
  let err: unknown;
  try {
    f();
  } catch (e) {
    err = e;
  }
  expect(err).toBeInstanceOf(InputError);
  expect((err as Error).message).toBe(message);
}

describe("weldVertices(p, index, tolRel, toMetres)", () => {
  it("merges the corners of a triangle soup and drops triangles that collapse", () => {
    const soup = new Float32Array([0, 0, 0, 1, 0, 0, 0, 1, 0, 1, 0, 0, 0, 1, 0, 1, 1, 0, 0, 0, 0, 1e-9, 0, 0, 0, 1, 0]);
    const m = weldVertices(soup, null, 1e-6, (v) => v);
    expect(m.positions.length / 3).toBe(4);
    expect([...m.index]).toEqual([0, 1, 2, 1, 2, 3]);
    expect(m.diagnostics).toEqual(["welded 9 vertices into 4", "dropped 1 degenerate triangles (two corners welded together)"]);
  });

  it("finds the same vertices as three's mergeVertices, converted to Float64 metres", () => {
    const m = parseStl(stl, "h.stl", opts);
    // reference: three's mergeVertices on the same soup (normals removed, since STL normals are per face)
    const soup = tube.toNonIndexed();
    soup.deleteAttribute("normal");
    soup.deleteAttribute("uv");
    const ref = mergeVertices(soup);
    expect(m.positions.length / 3).toBe(ref.getAttribute("position").count);
    expect(m.positions.length / 3).toBe(41 * 8);
    expect(m.positions).toBeInstanceOf(Float64Array);
    const p = m.positions[0];
    expect(p * 1e9).toBeCloseTo(Math.fround(p * 1e9), 6); // a float32 value in nm, divided by 1e9 exactly
  });
});

describe("parseStl(data, file, options)", () => {
  it("reads binary and ASCII STL to the same mesh", () => {
    const a = parseStl(stl, "h.stl", opts), b = parseStl(toStlAscii(tube), "h-ascii.stl", opts);
    expect(b.index).toEqual(a.index);
    for (let i = 0; i < a.positions.length; i++) expect(Math.abs(b.positions[i] - a.positions[i])).toBeLessThan(1e-6 * 1e-9 * 100);
  });

  it("reads a Buffer view that starts inside a larger pool (the pooled-Buffer pitfall)", () => {
    const pool = new Uint8Array(stl.byteLength + 1216 + 7);
    pool.set(stl, 1216);
    const view = pool.subarray(1216, 1216 + stl.byteLength);
    expect(parseStl(view, "h.stl", opts).positions).toEqual(parseStl(stl, "h.stl", opts).positions);
  });

  it("fails clearly on a truncated binary STL", () => {
    expectThrow(() => parseStl(stl.subarray(0, 84 + 50 * 10 + 17), "cut.stl", opts),
      "cut.stl: triangles: truncated: the header says 640 triangles (32084 bytes), the file has 601 bytes (10 whole triangles)");
    expectThrow(() => parseStl(new Uint8Array(40), "short.stl", opts), "short.stl: header: truncated: a binary STL needs at least 84 bytes, got 40");
  });

  it("fails clearly on a non-finite coordinate and on zero triangles", () => {
    const bad = stl.slice();
    // triangle 3 (offset 84 + 2 * 50), vertex 2 (after the 12-byte normal and 12 bytes of vertex 1), y
    new DataView(bad.buffer).setFloat32(84 + 2 * 50 + 12 + 12 + 4, NaN, true);
    expectThrow(() => parseStl(bad, "nan.stl", opts), "nan.stl: triangle 3: vertex 2: y: not a finite number (NaN)");
    const zero = new Uint8Array(84);
    expectThrow(() => parseStl(zero, "zero.stl", opts), "zero.stl: triangles: none (the header says 0)");
  });

  it("fails clearly on malformed and truncated ASCII STL, naming the line", () => {
    const facet = (v: string) => `solid t\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 0 0\n${v}\nendloop\nendfacet\nendsolid t\n`;
    expectThrow(() => parseStl(facet("vertex 0 1 1.2e"), "a.stl", opts), 'a.stl:6: z: not a finite number: "1.2e"');
    expectThrow(() => parseStl(facet("vertex 0 1"), "a.stl", opts), "a.stl:6: vertex: expected 3 numbers, got 2");
    expectThrow(() => parseStl(facet(""), "a.stl", opts), "a.stl:7: facet: expected 3 vertices, got 2");
    const text = facet("vertex 0 1 0");
    expectThrow(() => parseStl(text.slice(0, text.indexOf("endsolid")), "cut.stl", opts),
      "cut.stl:9: endsolid: missing: the file ends inside a solid (truncated?) after 1 facets");
    expectThrow(() => parseStl(facet("vertx 0 1 0"), "a.stl", opts), "a.stl:6: vertx: unknown keyword in an ASCII STL");
  });
});

describe("parseObj(data, file, options)", () => {
  it("reads three's OBJ export to the same mesh as the STL", () => {
    const a = parseStl(stl, "h.stl", opts), b = parseObj(toObj(tube), "h.obj", opts);
    expect(b.positions.length).toBe(a.positions.length);
    expect(b.index.length).toBe(a.index.length);
  });

  it("fans polygons, accepts negative indices and reports unsupported statements", () => {
    const m = parseObj("v 0 0 0\nv 1 0 0\nv 1 1 0\nv 0 1 0\nf 1 2 3 4\nf -4 -2 -1\ncstype bezier\n", "q.obj", opts);
    expect(m.index.length / 3).toBe(3);
    expect(m.diagnostics).toContain("ignored 1 unsupported statements (first on line 7)");
  });

  it("fails clearly on bad numbers, indices and truncation, naming the line", () => {
    const head = "# test\nv 0 0 0\nv 1 0 0\nv 0 1 0\n";
    expectThrow(() => parseObj(head + "f 1 2 9\n", "o.obj", opts), "o.obj:5: f: vertex index 9 is out of range (1..3 defined so far)");
    expectThrow(() => parseObj("v 0 1.0.0 0\n", "o.obj", opts), 'o.obj:1: y: not a finite number: "1.0.0"');
    expectThrow(() => parseObj(head + "f 1 2", "o.obj", opts), "o.obj:5: f: a face needs at least 3 vertices, got 2");
    expectThrow(() => parseObj(head + "f 1 2 x/1\n", "o.obj", opts), 'o.obj:5: f: vertex index must be a nonzero integer, got "x/1"');
    expectThrow(() => parseObj(head, "o.obj", opts), "o.obj: f: no faces (3 vertices only: read a vertex-only file as a point cloud)");
    expectThrow(() => parseObj(head + "v 1 2\n", "o.obj", opts), "o.obj:5: v: expected 3 coordinates (optionally w or r g b), got 2 values");
  });
});

describe("parsePly(data, file, options)", () => {
  const capped = cappedTube(helix, 10, { tubular: 20, radial: 8, capRings: 2 });
  const faces = capped.getIndex()!.count / 3;
  const verts = capped.getAttribute("position").count;

  it("reads binary (both byte orders) and ASCII PLY to the same mesh", () => {
    const a = parsePly(toPlyBinary(capped), "c.ply", opts);
    const b = parsePly(toPlyBinary(capped, false), "c-be.ply", opts);
    const c = parsePly(toPlyAscii(capped), "c-ascii.ply", opts);
    expect(a.index.length / 3).toBe(faces);
    expect(b.positions).toEqual(a.positions);
    expect(c.index).toEqual(a.index);
    for (let i = 0; i < a.positions.length; i++) expect(Math.abs(c.positions[i] - a.positions[i])).toBeLessThan(1e-13);
  });

  it("fails clearly on truncated binary and ASCII PLY", () => {
    const bin = toPlyBinary(capped);
    expectThrow(() => parsePly(bin.subarray(0, bin.byteLength - 20), "cut.ply", opts),
      `cut.ply: face ${faces - 2}: truncated: the file ends inside it (the header says ${faces} face elements)`);
    const text = toPlyAscii(capped);
    const lines = text.trimEnd().split("\n");
    expectThrow(() => parsePly(lines.slice(0, lines.length - 9).join("\n"), "cut.ply", opts),
      `cut.ply: face: truncated: the header says ${faces}, the file ends after ${faces - 9}`);
    expectThrow(() => parsePly("ply\nformat ascii 1.0\nelement vertex 3\nproperty float x\n", "h.ply", opts),
      "h.ply: header: no end_header line (truncated or not a PLY file)");
  });

  it("fails clearly on malformed headers, values and indices, naming the line", () => {
    const head = "ply\nformat ascii 1.0\nelement vertex 3\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar int vertex_indices\nend_header\n";
    expectThrow(() => parsePly(head + "0 0 0\n1 abc 0\n0 1 0\n3 0 1 2\n", "p.ply", opts), 'p.ply:11: vertex 1: y: not a number: "abc"');
    expectThrow(() => parsePly(head + "0 0 0\n1 0 0\n0 1 0\n3 0 1 7\n", "p.ply", opts), "p.ply:13: face 0: vertex index 7 is out of range (0..2)");
    expectThrow(() => parsePly(head + "0 0 0\n1 0 0\n0 1 0 5\n3 0 1 2\n", "p.ply", opts), "p.ply:12: vertex 2: expected 3 values, got 4");
    expectThrow(() => parsePly(head + "0 0 0\n1 0 0\n0 1 Infinity\n3 0 1 2\n", "p.ply", opts), "p.ply:12: vertex 2: z: not a finite number (Infinity)");
    expectThrow(() => parsePly(head.replace("ascii", "text"), "p.ply", opts), 'p.ply:2: format: expected ascii, binary_little_endian or binary_big_endian, got "text"');
    expectThrow(() => parsePly(head.replace("element face", "elemnt face"), "p.ply", opts), "p.ply:7: elemnt: unknown header statement");
    expectThrow(() => parsePly(head.replace("property float y\n", ""), "p.ply", opts), "p.ply:3: vertex: no scalar property y");
    expectThrow(() => parsePly(head.replace("element face 1", "element face 0") + "0 0 0\n1 0 0\n0 1 0\n", "p.ply", opts),
      "p.ply: face: no faces (3 vertices only: read a vertex-only PLY as a point cloud)");
  });

  it("reads the vertices of a PLY as a point cloud in metres", () => {
    const { xyz } = parsePlyVertices(toPlyBinary(capped), "c.ply", opts);
    expect(xyz.length / 3).toBe(verts);
    const p = capped.getAttribute("position");
    expect(xyz[3] * 1e9).toBeCloseTo(p.getX(1), 4);
  });
});
