/** File-system entry point for networks: read a branched mesh or cloud into a {@link WireNetwork}. */
import { extname } from "node:path";
import { InputError } from "../../errors.js";
import type { InputUnit } from "../../types.js";
import { fsProblem } from "../fsProblem.js";
import { readInputBytes } from "../readInputBytes.js";
import { DEFAULT_INPUT_UNIT } from "../types.js";
import type { WireNetwork } from "./types.js";

/** Options of {@link readNetworkFile}. Lengths in metres. */
export interface ReadNetworkOptions {
  readonly unit?: InputUnit;
  readonly pixelSize?: number;
  /** "stl", "obj", "ply" or "cloud"; default from the extension (.stl .obj .ply). */
  readonly format?: string;
  /** Bytes of the file (tests, standard input); default: read `path`. */
  readonly readFile?: (path: string) => Promise<Uint8Array>;
}

const MESH_FORMATS = new Set(["stl", "obj", "ply"]);

/**
 * Reads `path` and splits it into a network of wires: a triangle mesh (STL, OBJ, PLY with faces)
 * through `meshNetwork`, an unordered cloud (format "cloud": x y z text, one point per line, or PLY vertices; or a
 * PLY without faces) through `cloudNetwork`. Heavy modules load on first use.
 * @throws {InputError} unreadable file, a format that holds no network ("file: format: ..."), or
 *   the splitters' own errors.
 */
export async function readNetworkFile(path: string, options: ReadNetworkOptions = {}): Promise<WireNetwork> {
  const format = options.format ?? extname(path).toLowerCase().slice(1);
  if (!MESH_FORMATS.has(format) && format !== "cloud") {
    throw new InputError(path, null, "format", `a network is split from a tube mesh (.stl, .obj, .ply) or an unordered cloud (--format cloud), not from ${format === "" ? "a file without extension" : `"${format}"`}`);
  }
  let bytes: Uint8Array;
  try {
    bytes = options.readFile !== undefined ? await options.readFile(path) : await readInputBytes(path);
  } catch (e) {
    const problem = fsProblem(e);
    if (problem !== null) throw new InputError(path, null, "file", problem);
    throw e;
  }
  const unit = options.unit ?? DEFAULT_INPUT_UNIT;
  if (unit === "px" && options.pixelSize === undefined) throw new InputError(path, null, "pixelSize", 'unit "px" needs a pixel size (metres per pixel)');
  const units = options.pixelSize !== undefined && unit === "px" ? { unit, pixelSize: options.pixelSize } : { unit };
  const isPly = bytes.length >= 4 && bytes[0] === 0x70 && bytes[1] === 0x6c && bytes[2] === 0x79;
  let plyFaces = false;
  if (isPly) {
    const { parsePlyHeader } = await import("../mesh/plyHeader.js");
    const face = parsePlyHeader(bytes, path).elements.find((e) => e.name === "face");
    plyFaces = face !== undefined && face.count > 0;
  }
  if (format === "cloud" || (format === "ply" && !plyFaces)) {
    const { cloudNetwork } = await import("../cloud/cloudNetwork.js");
    let xyz: Float64Array;
    const notes: string[] = [];
    if (isPly) {
      const { parsePlyVertices } = await import("../mesh/parsePly.js");
      const read = parsePlyVertices(bytes, path, units);
      xyz = read.xyz;
      notes.push(...read.diagnostics);
    } else {
      const { parseCloudText } = await import("../cloud/parseCloudText.js");
      let text: string;
      try {
        text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
      } catch {
        throw new InputError(path, null, "file", "not UTF-8 text (a binary file, or the wrong format?)");
      }
      xyz = parseCloudText(text, path, units).xyz;
    }
    const net = cloudNetwork(xyz, path, units);
    return { ...net, diagnostics: [...notes, ...net.diagnostics] };
  }
  const parse = format === "stl"
    ? (await import("../mesh/parseStl.js")).parseStl
    : format === "obj"
      ? (await import("../mesh/parseObj.js")).parseObj
      : (await import("../mesh/parsePly.js")).parsePly;
  const mesh = parse(bytes, path, units);
  const { meshNetwork } = await import("../mesh/meshNetwork.js");
  return meshNetwork(mesh, path, units);
}
