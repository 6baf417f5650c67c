import { describe, expect, it } from "vitest";
import { GLTFLoader } from "three/examples/jsm/loaders/GLTFLoader.js";
import { OBJLoader } from "three/examples/jsm/loaders/OBJLoader.js";
import { PLYLoader } from "three/examples/jsm/loaders/PLYLoader.js";
import { STLLoader } from "three/examples/jsm/loaders/STLLoader.js";
import type { Mesh } from "three";
import { meshToBytes } from "../../src/export/meshToBytes.js";
import { tubeMesh } from "../../src/export/tubeMesh.js";

// an invented ring of radius 30 nm, 5 um from the origin (so the centroid offset matters)
const n = 120, pts = new Float64Array(3 * n), tan = new Float64Array(3 * n);
for (let i = 0; i < n; ++i) {
  const a = (2 * Math.PI * i) / n;
  pts.set([5000 + 30 * Math.cos(a), 30 * Math.sin(a), 0], 3 * i);
  tan.set([-Math.sin(a), Math.cos(a), 0], 3 * i);
}
const mesh = tubeMesh(pts, tan, true, 1.5, { radial: 10 });
const meta = { unit: "nm" as const, radiusNote: "test radius", sourceFile: "ring<1>.csv" };
const ab = (b: Uint8Array): ArrayBuffer => b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength) as ArrayBuffer;

describe("meshToBytes(mesh, format, meta): read back by the three.js loaders", () => {
  it("ply: binary little-endian, same vertex and face counts, comments with unit and offset", async () => {
    const bytes = await meshToBytes(mesh, "ply", meta);
    const head = new TextDecoder("latin1").decode(bytes.subarray(0, 800));
    expect(head).toMatch(/^ply\nformat binary_little_endian 1\.0\ncomment twistline /);
    expect(head).toContain("comment unit: nm\n");
    expect(head).toContain("comment offset: 5000 ");
    const g = new PLYLoader().parse(ab(bytes));
    expect(g.getAttribute("position").count).toBe(mesh.positions.length / 3);
    expect(g.index!.count).toBe(mesh.indices.length);
    expect(g.getAttribute("position").getX(7)).toBeCloseTo(mesh.positions[21], 5);
  });

  it("stl: binary, header with unit and offset not starting with 'solid', one facet per triangle", async () => {
    const bytes = await meshToBytes(mesh, "stl", meta);
    const head = new TextDecoder("latin1").decode(bytes.subarray(0, 80));
    expect(head.startsWith("solid")).toBe(false);
    expect(head).toMatch(/^twistline tube; unit nm; offset 5000,/);
    expect(new DataView(bytes.buffer, bytes.byteOffset).getUint32(80, true)).toBe(mesh.indices.length / 3);
    const g = new STLLoader().parse(ab(bytes));
    expect(g.getAttribute("position").count).toBe(mesh.indices.length);
  });

  it("obj: comment lines first, then the geometry", async () => {
    const text = new TextDecoder().decode(await meshToBytes(mesh, "obj", meta));
    expect(text.split("\n").slice(0, 3)).toEqual([
      "# twistline 0.1.0: tube around the fitted centre line (model geometry, not a measurement)",
      "# source: ring<1>.csv",
      "# unit: nm",
    ]);
    const group = new OBJLoader().parse(text);
    const g = (group.children[0] as Mesh).geometry;
    expect(g.getAttribute("position").count).toBe(mesh.indices.length); // OBJLoader expands faces
  });

  it("glb: a glTF 2.0 binary that GLTFLoader reads, with unit and offset in the node's extras", async () => {
    const bytes = await meshToBytes(mesh, "glb", meta);
    expect(new TextDecoder().decode(bytes.subarray(0, 4))).toBe("glTF");
    const gltf = await new GLTFLoader().parseAsync(ab(bytes), "");
    let found: Mesh | undefined;
    gltf.scene.traverse((o) => { if ((o as Mesh).isMesh) found = o as Mesh; });
    expect(found).toBeDefined();
    expect(found!.geometry.getAttribute("position").count).toBe(mesh.positions.length / 3);
    expect(found!.userData.unit).toBe("nm");
    expect(found!.userData.offset[0]).toBeCloseTo(5000, 6);
  });
});
