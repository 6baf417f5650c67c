/**
 * The table of trace formats: format name -> reader. Adding a format (mesh, cloud, SVG path data)
 * is one entry here; `readTraceFile` picks a reader by `--format` or by the file's extension.
 */
import { parseDelimited } from "./parseDelimited.js";
import { parsePolylineJson } from "./parsePolylineJson.js";
import type { TraceReader } from "./types.js";

const delimited = (extension: string): TraceReader => ({ kind: "text", extensions: [extension], parse: parseDelimited });

/** Built-in readers, in the order they are listed in messages. */
export const TRACE_READERS: ReadonlyMap<string, TraceReader> = new Map<string, TraceReader>([
  ["csv", delimited(".csv")],
  ["tsv", delimited(".tsv")],
  ["txt", delimited(".txt")],
  ["xyz", delimited(".xyz")],
  ["json", { kind: "text", extensions: [".json"], parse: parsePolylineJson }],
]);
