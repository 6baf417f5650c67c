import type { Trace } from "../../types.js";
import { meshCenterline } from "./meshCenterline.js";
import { parseObj } from "./parseObj.js";
import { parsePly } from "./parsePly.js";
import { parseStl } from "./parseStl.js";
import type { CenterlineOptions, MeshReadOptions } from "./types.js";

/** Options of the mesh-to-trace readers: how to read the file, and how to find the centre line. */
export type MeshTraceOptions = MeshReadOptions & CenterlineOptions;

/**
 * Reads an STL (binary or ASCII) tube mesh and returns one centre-line Trace per wire, with the
 * tube radius per sample. `parseStl` then `meshCenterline`; see both for the method and errors.
 * @example readStlTraces(readFileSync("wire.stl"), "wire.stl", { unit: "nm" })
 */
export function readStlTraces(data: Uint8Array | string, file: string, options: MeshTraceOptions): Trace[] {
  return meshCenterline(parseStl(data, file, options), file, options);
}

/** As `readStlTraces`, for Wavefront OBJ (`parseObj`). */
export function readObjTraces(data: Uint8Array | string, file: string, options: MeshTraceOptions): Trace[] {
  return meshCenterline(parseObj(data, file, options), file, options);
}

/** As `readStlTraces`, for PLY meshes, ASCII or binary (`parsePly`). A PLY without faces is a cloud: see `readCloudPly`. */
export function readPlyMeshTraces(data: Uint8Array | string, file: string, options: MeshTraceOptions): Trace[] {
  return meshCenterline(parsePly(data, file, options), file, options);
}
