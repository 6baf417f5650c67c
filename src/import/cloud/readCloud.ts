import type { Trace } from "../../types.js";
import { asText } from "../mesh/bytes.js";
import { parsePlyVertices } from "../mesh/parsePly.js";
import { orderCloud } from "./orderCloud.js";
import { parseCloudText } from "./parseCloudText.js";
import type { CloudOptions } from "./types.js";

/**
 * Reads an unordered point cloud from text (XYZ or CSV, see `parseCloudText`) and orders it into
 * one wire (`orderCloud`). The number of outliers left out is in the trace's diagnostics.
 * @example readCloudText(readFileSync("cloud.xyz"), "cloud.xyz", { unit: "nm" })[0].xyz
 */
export function readCloudText(data: Uint8Array | string, file: string, options: CloudOptions): Trace[] {
  const { xyz, dims } = parseCloudText(asText(data), file, options);
  return [orderCloud(xyz, file, { ...options, dims: options.dims ?? dims }).trace];
}

/** As `readCloudText`, for the vertices of a PLY file (ASCII or binary; faces ignored). */
export function readCloudPly(data: Uint8Array | string, file: string, options: CloudOptions): Trace[] {
  const { xyz, diagnostics } = parsePlyVertices(data, file, options);
  const { trace } = orderCloud(xyz, file, options);
  return [{ ...trace, diagnostics: [...diagnostics, ...trace.diagnostics] }];
}
