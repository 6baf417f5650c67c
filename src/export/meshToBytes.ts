import * as THREE from "three";
import { GLTFExporter } from "three/examples/jsm/exporters/GLTFExporter.js";
import { OBJExporter } from "three/examples/jsm/exporters/OBJExporter.js";
import { PLYExporter } from "three/examples/jsm/exporters/PLYExporter.js";
import { STLExporter } from "three/examples/jsm/exporters/STLExporter.js";
import { ParameterError } from "../errors.js";
import type { LengthUnit } from "../types.js";
import { formatNumber } from "./formatNumber.js";
import { installFileReader } from "./nodeFileReader.js";
import type { TubeMesh } from "./tubeMesh.js";
import { TOOL_NAME, TOOL_VERSION } from "./version.js";

import { MESH_FORMATS, type MeshFormat } from "./meshFormats.js";

export { MESH_FORMATS, type MeshFormat } from "./meshFormats.js";

/** What every mesh file states about itself. */
export interface MeshMeta {
  readonly unit: LengthUnit;
  /** Where the radius came from (one line). */
  readonly radiusNote: string;
  readonly sourceFile: string;
}

function geometryOf(mesh: TubeMesh): THREE.BufferGeometry {
  const g = new THREE.BufferGeometry();
  g.setAttribute("position", new THREE.BufferAttribute(mesh.positions, 3));
  g.setIndex(new THREE.BufferAttribute(mesh.indices, 1));
  return g;
}

/** Header lines shared by the text headers (no line breaks inside; file names are made safe). */
function headerLines(mesh: TubeMesh, meta: MeshMeta): string[] {
  const o = mesh.offset.map((v) => formatNumber(v)).join(" ");
  const safe = meta.sourceFile.replace(/[\r\n\u2028\u2029]+/g, " ").replace(/[^\x20-\x7e]/g, "?");
  return [
    `${TOOL_NAME} ${TOOL_VERSION}: tube around the fitted centre line (model geometry, not a measurement)`,
    `source: ${safe}`,
    `unit: ${meta.unit}`,
    `offset: ${o} (${meta.unit}; add it to every vertex to place the mesh: the centroid was subtracted for float32 precision)`,
    `radius: ${formatNumber(mesh.radius)} ${meta.unit} (${meta.radiusNote.replace(/[\r\n]+/g, " ").replace(/[^\x20-\x7e]/g, "?")})`,
    `rings: ${mesh.rings}, vertices per ring: ${mesh.radial}, ${mesh.closed ? "closed loop" : "open with flat end caps"}`,
  ];
}

/**
 * Encodes a tube mesh in one of {@link MESH_FORMATS} with the three.js exporters:
 * - ply: binary little-endian PLY (PLYExporter, used without its callback, which needs
 *   requestAnimationFrame in Node); the header gets `comment` lines with unit, offset and radius.
 * - stl: binary STL (STLExporter); the 80-byte header holds the unit and the offset (ASCII,
 *   never starting with "solid", which some readers take for ASCII STL).
 * - obj: OBJ text (OBJExporter) after `#` comment lines.
 * - glb: binary glTF 2.0 (GLTFExporter, with a FileReader polyfill for Node 20); unit, offset and
 *   radius go to the node's `extras`. glTF's own unit is the metre: the numbers are in `meta.unit`.
 * Positions are float32 relative to `mesh.offset` in every format.
 *
 * Cost: O(vertices + triangles); the exporters copy the data once or twice.
 * @throws {ParameterError} an unknown format.
 */
export async function meshToBytes(mesh: TubeMesh, format: MeshFormat, meta: MeshMeta): Promise<Uint8Array> {
  const lines = headerLines(mesh, meta);
  const object = new THREE.Mesh(geometryOf(mesh), new THREE.MeshStandardMaterial({ color: 0x8a8f98 }));
  object.name = "wire";
  switch (format) {
    case "ply": {
      const ab = new PLYExporter().parse(object, undefined as never, { binary: true, littleEndian: true }) as ArrayBuffer | null;
      if (ab === null) throw new Error("PLYExporter returned nothing");
      const bytes = new Uint8Array(ab);
      const headEnd = findHeaderEnd(bytes);
      const head = new TextDecoder("latin1").decode(bytes.subarray(0, headEnd));
      const comments = lines.map((l) => `comment ${l}\n`).join("");
      const newHead = head.replace(/^(ply\nformat [^\n]*\n)/, `$1${comments}`);
      const headBytes = new TextEncoder().encode(newHead);
      const out = new Uint8Array(headBytes.length + bytes.length - headEnd);
      out.set(headBytes, 0);
      out.set(bytes.subarray(headEnd), headBytes.length);
      return out;
    }
    case "stl": {
      const view = new STLExporter().parse(object, { binary: true }) as DataView;
      const out = new Uint8Array(view.buffer, view.byteOffset, view.byteLength).slice();
      const o = mesh.offset.map((v) => formatNumber(v)).join(",");
      const text = `${TOOL_NAME} tube; unit ${meta.unit}; offset ${o}`.slice(0, 80);
      out.fill(0x20, 0, 80);
      for (let i = 0; i < text.length; ++i) out[i] = text.charCodeAt(i) & 0x7f;
      return out;
    }
    case "obj": {
      const text = new OBJExporter().parse(object);
      return new TextEncoder().encode(`${lines.map((l) => `# ${l}\n`).join("")}${text}`);
    }
    case "glb": {
      installFileReader();
      object.userData = {
        tool: `${TOOL_NAME} ${TOOL_VERSION}`,
        unit: meta.unit,
        offset: [...mesh.offset],
        radius: mesh.radius,
        radiusNote: meta.radiusNote,
        note: "tube around the fitted centre line (model geometry, not a measurement); numbers in `unit`, not metres; add `offset` to place the mesh",
      };
      const scene = new THREE.Scene();
      scene.add(object);
      const result = await new GLTFExporter().parseAsync(scene, { binary: true });
      if (!(result instanceof ArrayBuffer)) throw new Error("GLTFExporter did not return a binary buffer");
      return new Uint8Array(result);
    }
    default:
      throw new ParameterError("meshToBytes", "format", `must be one of ${MESH_FORMATS.join(", ")} (got ${JSON.stringify(format)})`);
  }
}

/** Byte index just after "end_header\n" of a PLY file. */
function findHeaderEnd(bytes: Uint8Array): number {
  const marker = new TextEncoder().encode("end_header\n");
  outer: for (let i = 0; i + marker.length <= Math.min(bytes.length, 65536); ++i) {
    for (let k = 0; k < marker.length; ++k) if (bytes[i + k] !== marker[k]) continue outer;
    return i + marker.length;
  }
  throw new Error("PLYExporter output has no end_header line");
}
