import { Mesh as ThreeMesh } from "three";
import { OBJLoader } from "three/examples/jsm/loaders/OBJLoader.js";
import { InputError } from "../../errors.js";
import { asText } from "./bytes.js";
import { checkSoup } from "./checkSoup.js";
import type { Mesh, MeshReadOptions } from "./types.js";
import { unitToMetres } from "./units.js";
import { weldVertices } from "./weld.js";

/** Statements three's OBJLoader handles without logging; other lines are left out and reported. */
const KNOWN = new Set(["v", "vn", "vt", "f", "l", "p", "o", "g", "s", "usemtl", "mtllib"]);

/**
 * Reads a Wavefront OBJ file's faces into a welded Float64 mesh in metres.
 *
 * Format: `v x y z [w | r g b]` vertices and `f i[/t][/n] ...` faces with 1-based (or negative,
 * relative) indices; polygons are fanned into triangles (Wavefront Technologies, "Appendix B1:
 * Object Files", Advanced Visualizer manual; https://en.wikipedia.org/wiki/Wavefront_.obj_file).
 * Every line is checked first (numbers finite, indices integers that refer to vertices defined
 * above), so errors name the line; then three's OBJLoader decodes the text and its triangle count
 * is checked against ours. Lines (`l`) and points (`p`) are ignored; statements three does not know
 * are left out and counted in `diagnostics`. A truncated file is caught when the cut leaves a bad
 * last line or an index beyond the vertices read; an OBJ cut exactly at a line end is
 * indistinguishable from a shorter file.
 *
 * Cost: O(file size).
 * @throws {InputError} "file:41: f: vertex index 120 is out of range (1..97 defined so far)", etc.
 */
export function parseObj(data: Uint8Array | string, file: string, options: MeshReadOptions): Mesh {
  const toMetres = unitToMetres(options.unit, options.pixelSize, "parseObj");
  const text = asText(data);
  const lines = text.split(/\r\n|\r|\n/);
  let nv = 0, triangles = 0, skipped = 0, firstSkipped = 0;
  const kept: string[] = [];
  for (let i = 0; i < lines.length; i++) {
    const line = i + 1;
    const body = lines[i].replace(/#.*$/, "").trim();
    if (body === "") continue;
    const tok = body.split(/\s+/);
    const key = tok[0];
    if (!KNOWN.has(key)) {
      if (skipped++ === 0) firstSkipped = line;
      continue;
    }
    if (key === "v") {
      if (tok.length !== 4 && tok.length !== 5 && tok.length !== 7) {
        throw new InputError(file, line, "v", `expected 3 coordinates (optionally w or r g b), got ${tok.length - 1} values`);
      }
      for (let k = 1; k < tok.length; k++) {
        if (!Number.isFinite(Number(tok[k]))) {
          throw new InputError(file, line, k <= 3 ? "xyz"[k - 1] : "v", `not a finite number: ${JSON.stringify(tok[k])}`);
        }
      }
      nv++;
    } else if (key === "f") {
      if (tok.length < 4) throw new InputError(file, line, "f", `a face needs at least 3 vertices, got ${tok.length - 1}`);
      for (let k = 1; k < tok.length; k++) {
        const ref = tok[k].split("/")[0];
        const idx = Number(ref);
        if (!/^[+-]?\d+$/.test(ref) || idx === 0) {
          throw new InputError(file, line, "f", `vertex index must be a nonzero integer, got ${JSON.stringify(tok[k])}`);
        }
        const resolved = idx < 0 ? nv + idx + 1 : idx;
        if (resolved < 1 || resolved > nv) {
          throw new InputError(file, line, "f", `vertex index ${idx} is out of range (1..${nv} defined so far)`);
        }
      }
      triangles += tok.length - 3;
    }
    kept.push(lines[i]);
  }
  if (triangles === 0) {
    throw new InputError(file, null, "f", nv > 0 ? `no faces (${nv} vertices only: read a vertex-only file as a point cloud)` : "no faces");
  }
  const group = new OBJLoader().parse(kept.join("\n"));
  const parts: Float32Array[] = [];
  group.traverse((o) => {
    if (o instanceof ThreeMesh) parts.push(o.geometry.getAttribute("position").array as Float32Array);
  });
  const total = parts.reduce((s, a) => s + a.length, 0);
  if (total !== 9 * triangles) {
    throw new InputError(file, null, "f", `the OBJ decoder read ${total / 9} triangles, the faces give ${triangles}`);
  }
  const soup = new Float32Array(total);
  let o = 0;
  for (const a of parts) {
    soup.set(a, o);
    o += a.length;
  }
  checkSoup(soup, file, true);
  const mesh = weldVertices(soup, null, options.weldTolRel ?? 1e-6, toMetres);
  const diagnostics = skipped > 0 ? [`ignored ${skipped} unsupported statements (first on line ${firstSkipped})`] : [];
  return { ...mesh, diagnostics: [...diagnostics, ...mesh.diagnostics] };
}
