/** File-system entry point of the import stage: read a file (or stdin), pick a reader, parse. */
import { readFile } from "node:fs/promises";
import { extname } from "node:path";
import { InputError, ParameterError } from "../errors.js";
import type { Trace } from "../types.js";
import { TRACE_READERS } from "./traceReaders.js";
import type { TraceReadOptions, TraceReader } from "./types.js";

/** The name used in messages for standard input. */
export const STDIN_NAME = "<stdin>";

/** Where bytes come from; defaults read the file system. Lets the CLI (and tests) supply stdin. */
export interface TraceIo {
  readFile?(path: string): Promise<Uint8Array>;
  readStdin?(): Promise<Uint8Array>;
}

/** Options of {@link readTraceFile}: the reader options plus format choice and I/O. */
export interface ReadTraceOptions extends TraceReadOptions {
  /** Format name (a key of `readers`, e.g. "csv" or "json"); default: from the file's extension. */
  readonly format?: string;
  readonly io?: TraceIo;
  /** Format table; default {@link TRACE_READERS}. */
  readonly readers?: ReadonlyMap<string, TraceReader>;
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

const FS_PROBLEMS: Readonly<Record<string, string>> = {
  ENOENT: "no such file",
  EISDIR: "is a directory, not a file",
  EACCES: "permission denied",
  EPERM: "permission denied",
  ENOTDIR: "a folder on the path is not a directory",
};

async function readBytes(path: string, io: TraceIo | undefined): Promise<Uint8Array> {
  if (path === "-") {
    if (io?.readStdin === undefined) throw new InputError(STDIN_NAME, null, "file", "standard input is not available here");
    return io.readStdin();
  }
  try {
    return await (io?.readFile ?? readFile)(path);
  } catch (e) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === "string" && Object.hasOwn(FS_PROBLEMS, code)) throw new InputError(path, null, "file", FS_PROBLEMS[code]);
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

/**
 * Reads an ordered trace from `path` ("-" reads `io.readStdin()`), with the reader chosen by
 * `options.format` or by the file's extension (`.csv .tsv .txt .xyz .json` built in). Standard input
 * without a format is read as JSON when its first non-blank character is "{", else as delimited text.
 * Messages name the file as given (`<stdin>` for "-").
 *
 * Cost: one read plus the reader's cost (linear in the file size for the built-in readers).
 * @throws {InputError} missing or unreadable file, unknown extension, non-UTF-8 text, or the
 *   reader's own errors. {@link ParameterError} for an unknown `options.format`.
 */
export async function readTraceFile(path: string, options: ReadTraceOptions = {}): Promise<Trace> {
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

  if (format === undefined) {
    // Standard input without a format: sniff.
    const text = decodeText(bytes, file);
    format = /^\s*\{/.test(text) && readers.has("json") ? "json" : "txt";
    const reader = readers.get(format);
    if (reader === undefined || reader.kind !== "text") throw new InputError(file, null, "format", "cannot tell the format of standard input; name it");
    return reader.parse(text, file, parseOptions);
  }
  const reader = readers.get(format) as TraceReader;
  if (reader.kind === "binary") return reader.parse(bytes, file, parseOptions);
  return reader.parse(decodeText(bytes, file), file, parseOptions);
}
