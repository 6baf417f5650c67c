/** File-system entry point of the import stage: read a file (or stdin), pick a reader, parse into one trace per wire. */
import { extname } from "node:path";
import { InputError, ParameterError } from "../errors.js";
import type { Trace } from "../types.js";
import { fsProblem } from "./fsProblem.js";
import { readInputBytes, STDIN_NAME } from "./readInputBytes.js";
import { TRACE_READERS } from "./traceReaders.js";
import type { TraceReadOptions, TraceReader } from "./types.js";

export { STDIN_NAME };

/** Where bytes come from; defaults read the file system. Lets the CLI (and tests) supply stdin. */
export interface TraceIo {
  readFile?(path: string): Promise<Uint8Array>;
  readStdin?(): Promise<Uint8Array>;
}

/** Options of {@link readTracesFile} and {@link readTraceFile}: the reader options plus format choice and I/O. */
export interface ReadTraceOptions extends TraceReadOptions {
  /** Format name (a key of `readers`, e.g. "csv", "stl" or "cloud"); default: from the file's extension. */
  readonly format?: string;
  readonly io?: TraceIo;
  /** Format table; default {@link TRACE_READERS}. */
  readonly readers?: ReadonlyMap<string, TraceReader>;
}

/** Options of {@link readTraceFile}: which wire to return when the file holds several. */
export interface ReadOneTraceOptions extends ReadTraceOptions {
  /** 1-based index of the wire (in the reader's order: meshes largest first, SVG in document order); default 1. */
  readonly wire?: number;
}

function extensionList(readers: ReadonlyMap<string, TraceReader>): string {
  return [...readers.values()].flatMap((r) => r.extensions).join(", ");
}

/** The format whose reader claims the file's extension (case-insensitive), or null. */
export function formatOfPath(path: string, readers: ReadonlyMap<string, TraceReader> = TRACE_READERS): string | null {
  const ext = extname(path).toLowerCase();
  if (ext === "") return null;
  for (const [name, reader] of readers) if (reader.extensions.includes(ext)) return name;
  return null;
}

async function readBytes(path: string, io: TraceIo | undefined): Promise<Uint8Array> {
  if (path === "-") {
    if (io?.readStdin === undefined) throw new InputError(STDIN_NAME, null, "file", "standard input is not available here");
    return io.readStdin();
  }
  if (io?.readFile === undefined) return readInputBytes(path);
  try {
    return await io.readFile(path);
  } catch (e) {
    const problem = fsProblem(e);
    if (problem !== null) throw new InputError(path, null, "file", problem);
    throw e;
  }
}

function decodeText(bytes: Uint8Array, file: string): string {
  try {
    return new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new InputError(file, null, "file", "not UTF-8 text (a binary file, or the wrong format?)");
  }
}

/** The format of standard input read without a name: PLY, SVG or JSON by their first bytes, else delimited text. */
function sniffFormat(bytes: Uint8Array, readers: ReadonlyMap<string, TraceReader>): string | undefined {
  const head = new TextDecoder("latin1").decode(bytes.subarray(0, 256)).replace(/^\uFEFF|^\u00EF\u00BB\u00BF/, "");
  const pick = (name: string): string | undefined => (readers.has(name) ? name : undefined);
  if (/^ply\r?\n/.test(head)) return pick("ply");
  if (/^\s*</.test(head)) return pick("svg");
  if (/^\s*\{/.test(head)) return pick("json");
  return pick("txt");
}

/**
 * Reads every wire in `path` ("-" reads `io.readStdin()`), with the reader chosen by
 * `options.format` or by the file's extension: ordered traces `.csv .tsv .txt .xyz .json` (one
 * wire), meshes `.stl .obj` and `.ply` with faces (one wire per tube, with its radius), `.ply`
 * without faces (an unordered cloud of its vertices), `.svg` (one planar projection per path), and
 * the format "cloud" (unordered points in delimited text, JSON or PLY) by name only. Standard input
 * without a format is told apart by its first bytes: "ply", "<" (SVG), "{" (JSON), else delimited text.
 * Messages name the file as given (`<stdin>` for "-").
 *
 * Cost: one read plus the reader's cost (linear in the file size for the ordered readers; see
 * `meshCenterline` and `orderCloud` for meshes and clouds).
 * @throws {InputError} missing or unreadable file, unknown extension, non-UTF-8 text, or the
 *   reader's own errors. {@link ParameterError} for an unknown `options.format`.
 * @example (await readTracesFile("two-wires.stl", { unit: "nm" })).length // 2
 */
export async function readTracesFile(path: string, options: ReadTraceOptions = {}): Promise<Trace[]> {
  const readers = options.readers ?? TRACE_READERS;
  const file = path === "-" ? STDIN_NAME : path;
  let format = options.format;
  if (format !== undefined && !readers.has(format)) {
    throw new ParameterError("readTraceFile", "format", `must be one of ${[...readers.keys()].join(", ")} (got ${JSON.stringify(format)})`);
  }
  if (format === undefined && path !== "-") {
    format = formatOfPath(path, readers) ?? undefined;
    if (format === undefined) {
      const ext = extname(path);
      const what = ext === "" ? "no file extension" : `unknown file extension "${ext}"`;
      throw new InputError(file, null, "format", `${what} (accepted: ${extensionList(readers)}; or name the format)`);
    }
  }

  const bytes = await readBytes(path, options.io);
  const parseOptions: { -readonly [K in keyof TraceReadOptions]: TraceReadOptions[K] } = {};
  if (options.unit !== undefined) parseOptions.unit = options.unit;
  if (options.pixelSize !== undefined) parseOptions.pixelSize = options.pixelSize;
  if (options.closed !== undefined) parseOptions.closed = options.closed;
  if (options.branches !== undefined) parseOptions.branches = options.branches;

  if (format === undefined) {
    format = sniffFormat(bytes, readers);
    if (format === undefined) throw new InputError(file, null, "format", "cannot tell the format of standard input; name it");
  }
  const reader = readers.get(format) as TraceReader;
  const traces = await (reader.kind === "binary" ? reader.parse(bytes, file, parseOptions) : reader.parse(decodeText(bytes, file), file, parseOptions));
  if (traces.length === 0) throw new InputError(file, null, "wires", "none found");
  return traces;
}

/**
 * Wire `wire` (1-based) of the traces read from `file`.
 * @throws {InputError} "file: wire: asked for wire 3, but the file has 1 wire" beyond the count.
 */
export function pickWire(traces: readonly Trace[], file: string, wire: number): Trace {
  const n = traces.length;
  if (wire > n) throw new InputError(file, null, "wire", `asked for wire ${wire}, but the file has ${n === 1 ? "1 wire" : `${n} wires`}`);
  return traces[wire - 1];
}

/**
 * Reads one wire of `path`: {@link readTracesFile}, then wire `options.wire` (1-based, default 1).
 * When the file holds several wires the trace's diagnostics start with "file has N wires; using
 * wire k", followed by "(--wire to choose)" when no wire was asked for.
 *
 * Cost: as {@link readTracesFile} (every wire of the file is read).
 * @throws {InputError} as {@link readTracesFile}, and "file: wire: asked for wire 3, but the file has
 *   1 wire" when `options.wire` is beyond the count. {@link ParameterError} for a wire that is not
 *   an integer >= 1.
 */
export async function readTraceFile(path: string, options: ReadOneTraceOptions = {}): Promise<Trace> {
  const wire = options.wire;
  if (wire !== undefined && !(Number.isSafeInteger(wire) && wire >= 1)) {
    throw new ParameterError("readTraceFile", "wire", `must be an integer >= 1 (got ${wire})`);
  }
  const traces = await readTracesFile(path, options);
  const k = wire ?? 1;
  const trace = pickWire(traces, path === "-" ? STDIN_NAME : path, k);
  const n = traces.length;
  if (n === 1) return trace;
  const note = `file has ${n} wires; using wire ${k}${wire === undefined ? " (--wire to choose)" : ""}`;
  return { ...trace, diagnostics: [note, ...trace.diagnostics] };
}
