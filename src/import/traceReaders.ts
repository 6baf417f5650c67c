/**
 * The table of input formats: format name -> reader. Every reader returns `Trace[]`, one trace per
 * wire in the file (the ordered-trace formats always one). `readTracesFile` picks a reader by
 * `--format` or by the file's extension; a new format is one entry here.
 *
 * | format | extensions | what |
 * |---|---|---|
 * | csv tsv txt xyz | .csv .tsv .txt .xyz | ordered trace, delimited text (`parseDelimited`) |
 * | json | .json | ordered trace, JSON polyline (`parsePolylineJson`) |
 * | stl obj | .stl .obj | triangle mesh of one or more tubes -> centre line and radius per wire (`meshCenterline`) |
 * | ply | .ply | a mesh when it has faces, else an unordered cloud of its vertices (`orderCloud`) |
 * | svg | .svg | SVG path data traced on a micrograph: one planar projection per path (`parseSvgPaths`) |
 * | cloud | (by name only) | unordered point cloud: delimited text, JSON polyline or the vertices of a PLY |
 */
import { InputError } from "../errors.js";
import type { InputUnit, Trace } from "../types.js";
import type { CloudOptions } from "./cloud/types.js";
import type { Mesh, MeshReadOptions } from "./mesh/types.js";
import type { MeshTraceOptions } from "./mesh/readMesh.js";
import type { BuildTraceOptions } from "./buildTrace.js";
import { parseDelimited } from "./parseDelimited.js";
import type { SvgOptions } from "./svg/types.js";

// Only the delimited-text reader is loaded up front: the others pull in three.js (meshes), ajv
// (JSON) or the cloud and SVG code, which a run on a CSV file never needs. They load on first use.
const lazy = {
  json: () => import("./parsePolylineJson.js"),
  mesh: () => import("./mesh/meshCenterline.js"),
  stl: () => import("./mesh/parseStl.js"),
  obj: () => import("./mesh/parseObj.js"),
  ply: () => import("./mesh/parsePly.js"),
  plyHeader: () => import("./mesh/plyHeader.js"),
  orderCloud: () => import("./cloud/orderCloud.js"),
  readCloud: () => import("./cloud/readCloud.js"),
  svg: () => import("./svg/parseSvgPaths.js"),
};
import { DEFAULT_INPUT_UNIT, type TraceReadOptions, type TraceReader } from "./types.js";

type Mutable<T> = { -readonly [K in keyof T]: T[K] };

/** The ordered readers' options: unit, pixel size and closure only (meshes' `branches` means nothing to them). */
function orderedOptions(options: TraceReadOptions): TraceReadOptions {
  const out: Mutable<TraceReadOptions> = {};
  if (options.unit !== undefined) out.unit = options.unit;
  if (options.pixelSize !== undefined) out.pixelSize = options.pixelSize;
  if (options.closed !== undefined) out.closed = options.closed;
  return out;
}

const delimited = (extension: string): TraceReader => ({
  kind: "text",
  extensions: [extension],
  parse: (text, file, options) => [parseDelimited(text, file, orderedOptions(options))],
});

/**
 * Unit and pixel size of a file that declares none (meshes, PLY clouds): the caller's unit, else
 * {@link DEFAULT_INPUT_UNIT}; the same rules as `buildTrace` (a pixel size goes with "px" only).
 */
function undeclaredUnit(file: string, options: TraceReadOptions): { unit: InputUnit; pixelSize?: number } {
  const unit = options.unit ?? DEFAULT_INPUT_UNIT;
  const pixelSize = options.pixelSize;
  if (pixelSize !== undefined && !(Number.isFinite(pixelSize) && pixelSize > 0)) {
    throw new InputError(file, null, "pixelSize", `must be a positive length in metres (got ${pixelSize})`);
  }
  if (unit === "px" && pixelSize === undefined) throw new InputError(file, null, "pixelSize", 'unit "px" needs a pixel size (metres per pixel)');
  if (unit !== "px" && pixelSize !== undefined) throw new InputError(file, null, "pixelSize", `only applies to unit "px" (the unit is "${unit}")`);
  return pixelSize === undefined ? { unit } : { unit, pixelSize };
}

/** The caller's closure over what the reader found, with a note when they disagree. */
function withClosure(trace: Trace, closed: boolean | undefined, found: string): Trace {
  if (closed === undefined || trace.closed === closed) return trace;
  const note = `treated as ${closed ? "closed" : "open"} as asked, although the ${found} says ${trace.closed === true ? "closed" : "open"}`;
  return { ...trace, closed, diagnostics: [...trace.diagnostics, note] };
}

/**
 * Gives every wire the file-wide notes, which the readers attach to the first wire only, so that
 * any one wire read alone keeps them. `isFileWide` tells them apart among the first wire's notes.
 */
function spreadFileNotes(traces: Trace[], isFileWide: (note: string, index: number) => boolean): Trace[] {
  if (traces.length < 2) return traces;
  const shared = traces[0].diagnostics.filter(isFileWide);
  if (shared.length === 0) return traces;
  return traces.map((t, i) => (i === 0 ? t : { ...t, diagnostics: [...shared, ...t.diagnostics] }));
}

type MeshParser = (data: Uint8Array | string, file: string, options: MeshReadOptions) => Mesh;

/** One reader per mesh format: parse (welded, in metres), then the centre line of every wire. */
function meshReader(kind: "text" | "binary", extension: string, load: () => Promise<MeshParser>): TraceReader {
  const read = async (data: Uint8Array | string, file: string, options: TraceReadOptions): Promise<Trace[]> => readMesh(data, file, options, await load());
  return kind === "text" ? { kind: "text", extensions: [extension], parse: read } : { kind: "binary", extensions: [extension], parse: read };
}

async function readMesh(data: Uint8Array | string, file: string, options: TraceReadOptions, parse: MeshParser): Promise<Trace[]> {
  const units = undeclaredUnit(file, options);
  const meshOptions: Mutable<MeshTraceOptions> = { ...units };
  if (options.branches !== undefined) meshOptions.branches = options.branches;
  const mesh = parse(data, file, meshOptions);
  const { meshCenterline } = await lazy.mesh();
  const traces = meshCenterline(mesh, file, meshOptions);
  // The first wire carries the mesh's own notes (welding, ...) and those about skipped components.
  const own = mesh.diagnostics.length;
  const spread = spreadFileNotes(traces, (note, i) => i < own || note.includes(": skipped"));
  return spread.map((t) => withClosure(t, options.closed, "mesh topology"));
}

/** A PLY file with at least one face. */
async function plyHasFaces(bytes: Uint8Array, file: string): Promise<boolean> {
  const { parsePlyHeader } = await lazy.plyHeader();
  const face = parsePlyHeader(bytes, file).elements.find((e) => e.name === "face");
  return face !== undefined && face.count > 0;
}

function cloudOptions(units: { unit: InputUnit; pixelSize?: number }, closed: boolean | undefined, dims?: 2 | 3): CloudOptions {
  const out: Mutable<CloudOptions> = { ...units };
  if (closed !== undefined) out.closed = closed;
  if (dims !== undefined) out.dims = dims;
  return out;
}

async function readPlyCloud(bytes: Uint8Array, file: string, options: TraceReadOptions): Promise<Trace[]> {
  const { readCloudPly } = await lazy.readCloud();
  return readCloudPly(bytes, file, cloudOptions(undeclaredUnit(file, options), options.closed));
}

/** `# closed: true|false` in delimited text (already checked by parseDelimited). */
function declaredClosed(text: string): boolean | undefined {
  const m = /^[ \t]*#[ \t]*closed[ \t]*:[ \t]*(true|false|yes|no)[ \t]*\r?$/im.exec(text);
  if (m === null) return undefined;
  const v = m[1].toLowerCase();
  return v === "true" || v === "yes";
}

/**
 * An unordered point cloud in text: read like an ordered trace (delimited text, or a JSON polyline
 * when the text starts with "{"), so units, headers and messages are the same, then ordered along
 * the wire by `orderCloud`. The file's closure declaration holds unless the caller overrides it;
 * a repeated last point means nothing in a cloud, so it is not taken as closure.
 */
async function readTextCloud(text: string, file: string, options: TraceReadOptions): Promise<Trace> {
  const json = /^\uFEFF?\s*\{/.test(text);
  const parsePolylineJson = json ? (await lazy.json()).parsePolylineJson : null;
  const { orderCloud } = await lazy.orderCloud();
  const read: Mutable<BuildTraceOptions> = { ...orderedOptions(options), closed: false, orderCheck: false };
  const points = parsePolylineJson !== null ? parsePolylineJson(text, file, read) : parseDelimited(text, file, read);
  let fileClosed: boolean | undefined;
  if (json) {
    const c = (JSON.parse(text.replace(/^\uFEFF/, "")) as { closed?: unknown }).closed;
    if (typeof c === "boolean") fileClosed = c;
  } else fileClosed = declaredClosed(text);
  const units = points.source.pixelSize === undefined
    ? { unit: points.source.unit }
    : { unit: points.source.unit, pixelSize: points.source.pixelSize };
  const { trace } = orderCloud(points.xyz, file, cloudOptions(units, options.closed ?? fileClosed, points.dims));
  const result: Mutable<Trace> = { ...trace, diagnostics: [...points.diagnostics, ...trace.diagnostics] };
  if (points.planarProjection !== undefined) result.planarProjection = points.planarProjection;
  return result;
}

function isPly(bytes: Uint8Array): boolean {
  return bytes.length >= 4 && bytes[0] === 0x70 && bytes[1] === 0x6c && bytes[2] === 0x79 && (bytes[3] === 0x0a || bytes[3] === 0x0d);
}

function decodeUtf8(bytes: Uint8Array, file: string): string {
  try {
    return new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new InputError(file, null, "file", "not UTF-8 text (a binary file, or the wrong format?)");
  }
}

async function readSvg(text: string, file: string, options: TraceReadOptions): Promise<Trace[]> {
  if (options.unit !== undefined && options.unit !== "px") {
    throw new InputError(
      file, null, "unit",
      `an SVG drawing is in user units (px), not "${options.unit}": calibrate it with --pixel-size (the size of one user unit, e.g. 2.5nm) or a physical width on its root <svg>`,
    );
  }
  const svgOptions: Mutable<SvgOptions> = {};
  if (options.pixelSize !== undefined) {
    if (!(Number.isFinite(options.pixelSize) && options.pixelSize > 0)) {
      throw new InputError(file, null, "pixelSize", `must be a positive length in metres (got ${options.pixelSize})`);
    }
    svgOptions.pixelSize = options.pixelSize;
  }
  const { parseSvgPaths } = await lazy.svg();
  const traces = parseSvgPaths(text, file, svgOptions);
  // A wire's own note names its element and line ("path#a (line 4)..."); the rest is file-wide.
  const own = /^\S+(?: \d+)? \(line \d+\)/;
  return spreadFileNotes(traces, (note) => !own.test(note)).map((t) => withClosure(t, options.closed, "path data"));
}

/** Built-in readers, in the order they are listed in messages. */
export const TRACE_READERS: ReadonlyMap<string, TraceReader> = new Map<string, TraceReader>([
  ["csv", delimited(".csv")],
  ["tsv", delimited(".tsv")],
  ["txt", delimited(".txt")],
  ["xyz", delimited(".xyz")],
  ["json", { kind: "text", extensions: [".json"], parse: async (text, file, options) => [(await lazy.json()).parsePolylineJson(text, file, orderedOptions(options))] }],
  ["stl", meshReader("binary", ".stl", async () => (await lazy.stl()).parseStl)],
  ["obj", meshReader("text", ".obj", async () => (await lazy.obj()).parseObj)],
  [
    "ply",
    {
      kind: "binary",
      extensions: [".ply"],
      parse: async (data, file, options) => ((await plyHasFaces(data, file)) ? readMesh(data, file, options, (await lazy.ply()).parsePly) : readPlyCloud(data, file, options)),
    },
  ],
  ["svg", { kind: "text", extensions: [".svg"], parse: readSvg }],
  [
    "cloud",
    {
      kind: "binary",
      extensions: [],
      parse: async (data, file, options) => (isPly(data) ? readPlyCloud(data, file, options) : [await readTextCloud(decodeUtf8(data, file), file, options)]),
    },
  ],
]);
