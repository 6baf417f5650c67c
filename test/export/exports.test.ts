/** VTK XML PolyData and OVF 2.0 exports, read back by independent readers (test/support/xmlReader, ovfReader). */
import { chunksToText } from "../../src/export/tableChunks.js";
import { Ajv2020 } from "ajv/dist/2020.js";
import { readFileSync } from "node:fs";
import { beforeAll, describe, expect, it } from "vitest";
import { ParameterError } from "../../src/errors.js";
import { gridToOvf, MAX_GRID_CELLS, textureGrid } from "../../src/export/textureToOvf.js";
import { buildWireOutputs, OUTPUT_NAMES, type WireOutputs } from "../../src/export/wireOutputs.js";
import { VTP_GEOMETRY_ARRAYS, VTP_MODEL_ARRAYS } from "../../src/export/wireToVtp.js";
import { readOvf } from "../support/ovfReader.js";
import { find, parseXml, type XmlElement } from "../support/xmlReader.js";
import { analysisFixture } from "./analysisFixture.js";

/** Reads a .vtp written in ASCII: counts, points, cells and named point arrays. */
function readVtp(text: string): { points: number; lines: number; polys: number; xyz: number[]; arrays: Map<string, { comps: number; type: string; values: number[] }>; cells: Map<string, number[]> } {
  const root = parseXml(text);
  expect(root.name).toBe("VTKFile");
  expect(root.attrs.type).toBe("PolyData");
  const piece = find(root, "Piece")!;
  const nums = (el: XmlElement): number[] => (el.text.trim() === "" ? [] : el.text.trim().split(/\s+/).map(Number));
  const arrays = new Map<string, { comps: number; type: string; values: number[] }>();
  for (const a of find(piece, "PointData")!.children) arrays.set(a.attrs.Name, { comps: Number(a.attrs.NumberOfComponents ?? 1), type: a.attrs.type, values: nums(a) });
  const cells = new Map<string, number[]>();
  for (const tag of ["Lines", "Polys"]) {
    const el = find(piece, tag);
    if (el !== null) for (const a of el.children) cells.set(`${tag}.${a.attrs.Name}`, nums(a));
  }
  return {
    points: Number(piece.attrs.NumberOfPoints), lines: Number(piece.attrs.NumberOfLines), polys: Number(piece.attrs.NumberOfPolys),
    xyz: nums(find(piece, "Points")!.children[0]), arrays, cells,
  };
}

const file = (o: WireOutputs, name: string): string | Uint8Array => { const d = o.files.find((f) => f.name === name)!.data; return typeof d === "string" || d instanceof Uint8Array ? d : chunksToText(d); };

describe("VTK XML PolyData exports (centerline.vtp, tube.vtp)", () => {
  let out: WireOutputs;
  beforeAll(async () => {
    out = await buildWireOutputs(analysisFixture({ material: true, pinning: false }), { unit: "nm", viewerScript: "", vtp: true, grid: 1e-9 });
  });

  it("the centre line reads back: one polyline through every chain site, with every array per point", () => {
    const v = readVtp(file(out, OUTPUT_NAMES.centerlineVtp) as string);
    const n = out.chain.n;
    expect(v.points).toBe(n);
    expect(v.lines).toBe(1);
    expect(v.cells.get("Lines.connectivity")).toEqual(Array.from({ length: n }, (_, i) => i));
    expect(v.cells.get("Lines.offsets")).toEqual([n]);
    expect([...v.arrays.keys()]).toEqual([...VTP_GEOMETRY_ARRAYS, ...VTP_MODEL_ARRAYS]);
    for (const [name, a] of v.arrays) expect(a.values.length, name).toBe(n * a.comps);
    // coordinates and curvature in nm and 1/nm, 12 significant digits
    for (let i = 0; i < 3 * n; ++i) expect(Math.abs(v.xyz[i] - out.chain.xyz[i] * 1e9)).toBeLessThanOrEqual(1e-10 * Math.max(1, Math.abs(v.xyz[i])));
    const kappa = v.arrays.get("kappa")!.values;
    for (let i = 0; i < n; ++i) expect(Math.abs(kappa[i] - out.chain.kappa[i] / 1e9)).toBeLessThanOrEqual(1e-11 * Math.abs(kappa[i]) + 1e-300);
    // the texture and the frame are unit vectors; the stretch numbers run 1, 2, ... in order
    for (const name of ["texture", "T", "N", "B"]) {
      const t = v.arrays.get(name)!.values;
      for (let i = 0; i < n; ++i) expect(Math.hypot(t[3 * i], t[3 * i + 1], t[3 * i + 2]), `${name}[${i}]`).toBeCloseTo(1, 9);
    }
    const st = v.arrays.get("stretch")!.values;
    expect(st[0]).toBe(1);
    for (let i = 1; i < n; ++i) expect(st[i] - st[i - 1]).toBeGreaterThanOrEqual(0);
    expect(st[n - 1]).toBe(out.document.segments.length);
  });

  it("the tube reads back: the mesh's triangles, and each vertex a radius away from the site whose values it carries", () => {
    const v = readVtp(file(out, OUTPUT_NAMES.tubeVtp) as string);
    const mesh = out.mesh;
    expect(v.points).toBe(mesh.positions.length / 3);
    expect(v.polys).toBe(mesh.indices.length / 3);
    expect(v.cells.get("Polys.offsets")!.slice(0, 3)).toEqual([3, 6, 9]);
    const s = v.arrays.get("s")!.values;
    // the rings subdivide the chain (every k-th ring at a site); each vertex lies a radius from its
    // ring's centre and carries the values of the site nearest in arc length (round(ring / k))
    const sites = out.chain;
    const per = (mesh.rings - 1) / (sites.n - 1);
    expect(Number.isInteger(per)).toBe(true);
    let worst = 0, wrongSite = 0;
    for (let r = 0; r < mesh.rings; ++r) {
      const c = [0, 1, 2].map((a) => {
        let acc = 0;
        for (let q = 0; q < mesh.radial; ++q) acc += v.xyz[3 * (r * mesh.radial + q) + a];
        return acc / mesh.radial;
      });
      const want = sites.s[Math.round(r / per)] * 1e9;
      for (let q = r * mesh.radial; q < (r + 1) * mesh.radial; ++q) {
        const d = Math.hypot(v.xyz[3 * q] - c[0], v.xyz[3 * q + 1] - c[1], v.xyz[3 * q + 2] - c[2]);
        worst = Math.max(worst, Math.abs(d - mesh.radius) / mesh.radius);
        if (Math.abs(want - s[q]) > 1e-9 * Math.max(1, want)) ++wrongSite;
      }
      if (r % per === 0) {
        const i = r / per; // a ring at a site is centred on it
        expect(Math.hypot(sites.xyz[3 * i] * 1e9 - c[0], sites.xyz[3 * i + 1] * 1e9 - c[1], sites.xyz[3 * i + 2] * 1e9 - c[2]) / mesh.radius).toBeLessThan(1e-4);
      }
    }
    expect(worst).toBeLessThan(1e-4); // float32 mesh positions; measured ~1e-6
    expect(wrongSite).toBe(0);
  });
});

describe("OVF 2.0 exports (texture.ovf, texture-binary8.ovf, mask.ovf)", () => {
  // a straight wire along x, radius 5 nm, uniform texture +y: the inside cells fill the cylinder volume pi r^2 L
  const L = 100e-9, r = 5e-9, cell = 1e-9, n = 51;
  const xyz = Float64Array.from({ length: 3 * n }, (_, k) => (k % 3 === 0 ? (Math.floor(k / 3) / (n - 1)) * L : 0));
  const tex = Float64Array.from({ length: 3 * n }, (_, k) => (k % 3 === 1 ? 1 : 0));

  it("the grid holds unit vectors inside the tube and 0 outside; the inside volume is the cylinder's", () => {
    const g = textureGrid(xyz, tex, false, r, cell);
    let inside = 0;
    for (let c = 0; c < g.mask.length; ++c) {
      const norm = Math.hypot(g.values[3 * c], g.values[3 * c + 1], g.values[3 * c + 2]);
      if (g.mask[c] === 1) { inside++; expect(g.values[3 * c + 1]).toBe(1); } else expect(norm).toBe(0);
    }
    // cylinder pi r^2 L plus two hemispherical caps (distance to a segment): (pi r^2 L + 4/3 pi r^3) / cell^3
    const expected = (Math.PI * r * r * L + (4 / 3) * Math.PI * r ** 3) / cell ** 3;
    expect(Math.abs(inside - expected) / expected).toBeLessThan(0.03); // measured +2.1% (cells cut by the surface)
  });

  it("text and binary-8 files read back to the same grid; header sizes and base agree", () => {
    const g = textureGrid(xyz, tex, false, r, cell);
    const text = readOvf(gridToOvf(g, { title: "t", desc: ["d"], data: "text", field: "vector" }));
    const bin = readOvf(gridToOvf(g, { title: "t", desc: ["d"], data: "binary8", field: "vector" }));
    expect(text.format).toBe("text");
    expect(bin.format).toBe("binary8");
    expect(Array.from(bin.values)).toEqual(Array.from(g.values));
    expect(Array.from(text.values)).toEqual(Array.from(g.values));
    for (const h of [text.header, bin.header]) {
      expect([h.xnodes, h.ynodes, h.znodes].map(Number)).toEqual([g.nx, g.ny, g.nz]);
      expect(h.meshunit).toBe("m");
      expect(h.valuedim).toBe("3");
      expect(Number(h.xstepsize)).toBe(cell);
      expect(Number(h.xbase)).toBeCloseTo(Number(h.xmin) + cell / 2, 20);
      expect(Number(h.xmax) - Number(h.xmin)).toBeCloseTo(g.nx * cell, 20);
    }
    const mask = readOvf(gridToOvf(g, { title: "m", desc: [], data: "text", field: "mask" }));
    expect(mask.header.valuedim).toBe("1");
    expect(Array.from(mask.values)).toEqual(Array.from(g.mask));
  });

  it("refuses a cell that gives more than MAX_GRID_CELLS cells, naming the option", () => {
    expect(() => textureGrid(xyz, tex, false, r, 1e-11)).toThrow(ParameterError);
    expect(() => textureGrid(xyz, tex, false, r, 1e-11)).toThrow(new RegExp(`textureGrid: cell: .* cells is more than ${MAX_GRID_CELLS}`));
    expect(() => textureGrid(xyz, tex, false, r, 0)).toThrow("textureGrid: cell: must be a positive length (got 0)");
  });

  it("the analysis folder's OVF files carry the model's relaxed texture; model.json lists the exports and validates", async () => {
    const a = analysisFixture({ material: true, pinning: false });
    const out = await buildWireOutputs(a, { unit: "nm", viewerScript: "", grid: 1e-9 });
    const t = readOvf(file(out, OUTPUT_NAMES.textureOvfBinary) as Uint8Array);
    const m = readOvf(file(out, OUTPUT_NAMES.maskOvf) as Uint8Array);
    expect(t.header.valuelabels).toBe("m_x m_y m_z");
    for (let c = 0; c < m.values.length; ++c) {
      const norm = Math.hypot(t.values[3 * c], t.values[3 * c + 1], t.values[3 * c + 2]);
      if (m.values[c] === 1) expect(norm).toBeCloseTo(1, 12); else expect(norm).toBe(0);
    }
    // brute force on every 97th cell: inside exactly when the cell centre is within the radius of the polyline
    const h = t.header, nx = Number(h.xnodes), ny = Number(h.ynodes), step = Number(h.xstepsize);
    const base = [Number(h.xbase), Number(h.ybase), Number(h.zbase)];
    const c = out.chain, rad = out.document.outputs.mesh.radius * 1e-9;
    const dist = (p: number[]): number => {
      let best = Infinity;
      for (let i = 0; i + 1 < c.n; ++i) {
        const a = [c.xyz[3 * i], c.xyz[3 * i + 1], c.xyz[3 * i + 2]], e = [c.xyz[3 * i + 3] - a[0], c.xyz[3 * i + 4] - a[1], c.xyz[3 * i + 5] - a[2]];
        const ee = e[0] ** 2 + e[1] ** 2 + e[2] ** 2;
        const u = Math.min(1, Math.max(0, ((p[0] - a[0]) * e[0] + (p[1] - a[1]) * e[1] + (p[2] - a[2]) * e[2]) / ee));
        best = Math.min(best, Math.hypot(p[0] - a[0] - u * e[0], p[1] - a[1] - u * e[1], p[2] - a[2] - u * e[2]));
      }
      return best;
    };
    let checked = 0, inside = 0;
    for (let q = 0; q < m.values.length; q += 97) {
      const p = [base[0] + (q % nx) * step, base[1] + (Math.floor(q / nx) % ny) * step, base[2] + Math.floor(q / (nx * ny)) * step];
      const d = dist(p);
      if (Math.abs(d - rad) < 1e-6 * rad) continue; // on the surface: either answer
      expect(m.values[q], `cell ${q} at distance ${d}`).toBe(d < rad ? 1 : 0);
      checked++; inside += d < rad ? 1 : 0;
    }
    expect(checked).toBeGreaterThan(1000);
    expect(inside).toBeGreaterThan(10);
    expect(out.document.outputs.exports?.map((e) => e.file)).toEqual(["texture.ovf", "texture-binary8.ovf", "mask.ovf"]);
    const schema = JSON.parse(readFileSync(new URL("../../src/export/schemas/model.schema.json", import.meta.url), "utf8")) as object;
    const validate = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true }).compile(schema);
    expect(validate(JSON.parse(JSON.stringify(out.document))), JSON.stringify(validate.errors)).toBe(true);
  });

  it("without a material there is no texture: the grid option is refused with a clear message", async () => {
    await expect(buildWireOutputs(analysisFixture({ material: false }), { unit: "nm", viewerScript: "", grid: 1e-9 }))
      .rejects.toThrow("buildWireOutputs: grid: the OVF texture needs a material");
  });
});
