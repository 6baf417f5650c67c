import { PLYLoader } from "three/examples/jsm/loaders/PLYLoader.js";
import { InputError } from "../../errors.js";
import { asBytes, exactArrayBuffer } from "./bytes.js";
import { checkSoup } from "./checkSoup.js";
import { parsePlyHeader, plySize, type PlyElement, type PlyHeader } from "./plyHeader.js";
import type { Mesh, MeshReadOptions } from "./types.js";
import { unitToMetres } from "./units.js";
import { weldVertices } from "./weld.js";

interface PlyContent {
  readonly header: PlyHeader;
  readonly vertexCount: number;
  /** Triangles after splitting quads (three's PLYLoader rule: 0 1 2 3 -> 0 1 2, 0 2 3). */
  readonly triangles: number;
  readonly diagnostics: string[];
}

/**
 * Checks a whole PLY file against its header, element by element, before three decodes it:
 * x, y, z present and finite; face lists of 3 or 4 indices within 0..vertices-1; the body as long
 * as the header says (truncation), in ASCII one element per line so that errors name the line.
 */
function checkPly(bytes: Uint8Array, file: string, needFaces: boolean): PlyContent {
  const header = parsePlyHeader(bytes, file);
  const vertex = header.elements.find((e) => e.name === "vertex");
  if (vertex === undefined) throw new InputError(file, null, "vertex", "the header declares no vertex element");
  for (const axis of ["x", "y", "z"]) {
    if (!vertex.properties.some((p) => p.name === axis && p.countType === undefined)) {
      throw new InputError(file, vertex.line, "vertex", `no scalar property ${axis}`);
    }
  }
  const face = header.elements.find((e) => e.name === "face");
  const faceList = face?.properties.find((p) => p.name === "vertex_indices" || p.name === "vertex_index");
  if (face !== undefined && face.count > 0 && (faceList === undefined || faceList.countType === undefined)) {
    throw new InputError(file, face.line, "face", "no list property vertex_indices");
  }
  if (needFaces && (face === undefined || face.count === 0)) {
    throw new InputError(file, null, "face", `no faces (${vertex.count} vertices only: read a vertex-only PLY as a point cloud)`);
  }
  if (vertex.count === 0) throw new InputError(file, null, "vertex", "none (the header says 0)");
  const diagnostics: string[] = [];
  let triangles = 0;
  const check = (el: PlyElement, k: number, name: string, value: number, where: number | null) => {
    if (el === vertex && (name === "x" || name === "y" || name === "z") && !Number.isFinite(value)) {
      throw new InputError(file, where, `vertex ${k}`, `${name}: not a finite number (${value})`);
    }
  };
  const checkFace = (k: number, list: number[], where: number | null) => {
    if (list.length !== 3 && list.length !== 4) {
      throw new InputError(file, where, `face ${k}`, `expected 3 or 4 vertex indices, got ${list.length}`);
    }
    for (const v of list) {
      if (!Number.isInteger(v) || v < 0 || v >= vertex.count) {
        throw new InputError(file, where, `face ${k}`, `vertex index ${v} is out of range (0..${vertex.count - 1})`);
      }
    }
    triangles += list.length - 2;
  };
  if (header.format === "ascii") {
    const text = new TextDecoder().decode(bytes.subarray(header.bodyOffset));
    const lines = text.split(/\r\n|\n|\r/);
    let li = 0;
    for (const el of header.elements) {
      for (let k = 0; k < el.count; k++) {
        while (li < lines.length && lines[li].trim() === "") li++;
        const line = header.headerLines + li + 1;
        if (li >= lines.length) {
          throw new InputError(file, null, el.name, `truncated: the header says ${el.count}, the file ends after ${k}`);
        }
        const tok = lines[li].trim().split(/\s+/);
        let t = 0;
        for (const p of el.properties) {
          if (p.countType !== undefined) {
            const n = Number(tok[t++]);
            if (!Number.isInteger(n) || n < 0) throw new InputError(file, line, `${el.name} ${k}`, `${p.name}: bad list count ${JSON.stringify(tok[t - 1] ?? "")}`);
            const list: number[] = [];
            for (let q = 0; q < n; q++) {
              const v = Number(tok[t++]);
              if (tok[t - 1] === undefined) throw new InputError(file, line, `${el.name} ${k}`, `${p.name}: expected ${n} values, got ${q}`);
              list.push(v);
            }
            if (el === face && p === faceList) checkFace(k, list, line);
          } else {
            const s = tok[t++];
            const v = Number(s);
            if (s === undefined) throw new InputError(file, line, `${el.name} ${k}`, `${p.name}: missing (expected ${el.properties.length} properties)`);
            if (Number.isNaN(v)) throw new InputError(file, line, `${el.name} ${k}`, `${p.name}: not a number: ${JSON.stringify(s)}`);
            check(el, k, p.name, v, line);
          }
        }
        if (t !== tok.length) throw new InputError(file, line, `${el.name} ${k}`, `expected ${t} values, got ${tok.length}`);
        li++;
      }
    }
    while (li < lines.length && lines[li].trim() === "") li++;
    if (li < lines.length) diagnostics.push(`ignored ${lines.length - li} lines after the last element`);
  } else {
    const little = header.format === "binary_little_endian";
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    let o = header.bodyOffset;
    const read = (type: string, el: PlyElement, k: number): number => {
      const size = plySize(type) as number;
      if (o + size > bytes.byteLength) {
        throw new InputError(file, null, `${el.name} ${k}`, `truncated: the file ends inside it (the header says ${el.count} ${el.name} elements)`);
      }
      let v: number;
      switch (type) {
        case "char": case "int8": v = view.getInt8(o); break;
        case "uchar": case "uint8": v = view.getUint8(o); break;
        case "short": case "int16": v = view.getInt16(o, little); break;
        case "ushort": case "uint16": v = view.getUint16(o, little); break;
        case "int": case "int32": v = view.getInt32(o, little); break;
        case "uint": case "uint32": v = view.getUint32(o, little); break;
        case "float": case "float32": v = view.getFloat32(o, little); break;
        default: v = view.getFloat64(o, little);
      }
      o += size;
      return v;
    };
    for (const el of header.elements) {
      for (let k = 0; k < el.count; k++) {
        for (const p of el.properties) {
          if (p.countType !== undefined) {
            const n = read(p.countType, el, k);
            const list: number[] = [];
            for (let q = 0; q < n; q++) list.push(read(p.type, el, k));
            if (el === face && p === faceList) checkFace(k, list, null);
          } else {
            check(el, k, p.name, read(p.type, el, k), null);
          }
        }
      }
    }
    if (o < bytes.byteLength) diagnostics.push(`ignored ${bytes.byteLength - o} bytes after the last element`);
  }
  return { header, vertexCount: vertex.count, triangles, diagnostics };
}

/** Decodes with three's PLYLoader and checks its counts against ours. */
function decode(bytes: Uint8Array, file: string, content: PlyContent): { positions: Float32Array | Float64Array; index: Uint32Array | null } {
  const geo = new PLYLoader().parse(exactArrayBuffer(bytes));
  const positions = geo.getAttribute("position").array as Float32Array | Float64Array;
  if (positions.length !== 3 * content.vertexCount) {
    throw new InputError(file, null, "vertex", `the PLY decoder read ${positions.length / 3}, the header says ${content.vertexCount}`);
  }
  const idx = geo.getIndex();
  const index = idx === null ? null : Uint32Array.from(idx.array as ArrayLike<number>);
  if ((index?.length ?? 0) !== 3 * content.triangles) {
    throw new InputError(file, null, "face", `the PLY decoder read ${(index?.length ?? 0) / 3} triangles, the faces give ${content.triangles}`);
  }
  checkSoup(positions, file);
  return { positions, index };
}

/**
 * Reads an ASCII or binary (either byte order) PLY mesh into a welded Float64 mesh in metres.
 *
 * Format: Turk 1994, "The PLY polygon file format" (https://paulbourke.net/dataformats/ply/):
 * `vertex` elements with x, y, z, and `face` elements with a `vertex_indices` list. The header and
 * the whole body are checked first (every value present and finite, indices in range, the body as
 * long as the header says), then three's PLYLoader decodes the bytes and its vertex and triangle
 * counts are checked against ours. Faces of 3 or 4 vertices (quads split 0 1 2 / 0 2 3, as three
 * does); larger polygons are rejected. Vertices are welded (the exporters often repeat them).
 *
 * Cost: O(file size).
 * @throws {InputError} "file: face 12: truncated: ...", "file:15: vertex 3: y: not a number ...", etc.
 */
export function parsePly(data: Uint8Array | string, file: string, options: MeshReadOptions): Mesh {
  const toMetres = unitToMetres(options.unit, options.pixelSize, "parsePly");
  const bytes = asBytes(data);
  const content = checkPly(bytes, file, true);
  const { positions, index } = decode(bytes, file, content);
  const mesh = weldVertices(positions, index, options.weldTolRel ?? 1e-6, toMetres);
  return { ...mesh, diagnostics: [...content.diagnostics, ...mesh.diagnostics] };
}

/**
 * Reads the vertices of a PLY file (a point cloud; faces, if any, are ignored) as interleaved
 * Float64 xyz in metres, with the same checks as `parsePly`.
 * @throws {InputError} as `parsePly`.
 */
export function parsePlyVertices(data: Uint8Array | string, file: string, options: Pick<MeshReadOptions, "unit" | "pixelSize">): { xyz: Float64Array; diagnostics: string[] } {
  const toMetres = unitToMetres(options.unit, options.pixelSize, "parsePlyVertices");
  const bytes = asBytes(data);
  const content = checkPly(bytes, file, false);
  const { positions } = decode(bytes, file, content);
  const xyz = new Float64Array(positions.length);
  for (let i = 0; i < xyz.length; i++) xyz[i] = toMetres(positions[i]);
  return { xyz, diagnostics: content.diagnostics };
}
