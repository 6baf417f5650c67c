/**
 * `twistline centerline <input> --out <trace.csv|->`: the import stage alone. Reduces a tube mesh,
 * an unordered point cloud or SVG path data (an ordered trace passes through) to ordered centre
 * lines, one CSV per wire, which `twistline profile` reads back.
 */
import { basename, dirname, extname, join } from "node:path";
import type { Command } from "@commander-js/extra-typings";
import { ParameterError } from "../src/errors.js";
import { defaultOutputUnit } from "../src/export/outputUnit.js";
import { formatNumber } from "../src/export/formatNumber.js";
import { TOOL_NAME, TOOL_VERSION } from "../src/export/version.js";
import { formatOfPath, pickWire, readTracesFile, STDIN_NAME } from "../src/import/readTrace.js";
import { readNetworkFile, type ReadNetworkOptions } from "../src/import/network/readNetwork.js";
import { networkToJson } from "../src/export/networkDocument.js";
import { PER_METRE, type LengthUnit, type Trace } from "../src/types.js";
import type { Io } from "./io.js";
import { brief, parseLengthUnitOption } from "./options.js";
import { checkInputFlags, checkOutputPath, HELP, INPUT_HELP, readOptionsOf, writeOutput, type InputRequest } from "./profile.js";

const WHERE = "centerline";

/** A checked `centerline` request. */
export interface CenterlineRequest extends InputRequest {
  readonly input: string;
  /** A .csv path, or "-" for standard output (one wire only). */
  readonly out: string;
  readonly outUnit?: LengthUnit;
  readonly quiet: boolean;
  /** --branches split: one CSV per branch of a network, plus <stem>-network.json. */
  readonly split?: boolean;
}

/** Raw option values as commander hands them over (all text). */
export interface CenterlineFlags {
  out: string;
  unit?: string;
  pixelSize?: string;
  format?: string;
  wire?: string;
  branches?: string;
  outUnit?: string;
  quiet?: true;
}

/** Checks every option; throws ParameterError("centerline: --option: ...") on the first bad one. */
export function checkCenterlineFlags(input: string, flags: CenterlineFlags): CenterlineRequest {
  const split = flags.branches === "split";
  const { branches: _policy, ...rest } = flags;
  const inputFlags: CenterlineFlags = split ? rest : flags;
  const req: { -readonly [K in keyof CenterlineRequest]: CenterlineRequest[K] } = {
    ...checkInputFlags(WHERE, input, inputFlags, true),
    input,
    out: flags.out,
    quiet: flags.quiet === true,
  };
  if (flags.outUnit !== undefined) req.outUnit = parseLengthUnitOption(WHERE, "--out-unit", flags.outUnit);
  if (req.out === "") throw new ParameterError(WHERE, "--out", "must not be empty");
  if (req.out !== "-" && extname(req.out).toLowerCase() !== ".csv") {
    throw new ParameterError(WHERE, "--out", `must end in .csv, or be - for standard output (got ${JSON.stringify(req.out)})`);
  }
  if (split) {
    if (req.out === "-") throw new ParameterError(WHERE, "--out", "--branches split writes several files: give a file name (net.csv writes net-1.csv, ... and net-network.json)");
    if (req.wire !== undefined) throw new ParameterError(WHERE, "--wire", "does not go with --branches split (every branch is written)");
    if (input === "-") throw new ParameterError(WHERE, "<input>", "--branches split reads a file, not standard input");
    req.split = true;
  }
  return req;
}

/**
 * Output paths for `count` wires: `out` itself for one wire (or one chosen with --wire), else
 * `<stem>-<k>.csv` beside it for k = 1..count (`trace.csv` -> `trace-1.csv`, `trace-2.csv`).
 */
export function wirePaths(out: string, count: number): string[] {
  if (count === 1) return [out];
  const ext = extname(out);
  const stem = basename(out, ext);
  return Array.from({ length: count }, (_, k) => join(dirname(out), `${stem}-${k + 1}${ext}`));
}

/** How the centre line was obtained, by the kind of input (for the CSV header). */
function methodOf(trace: Trace, format: string | null): string | null {
  if (trace.radius !== undefined) {
    return "centre line of a triangle-mesh tube (level sets of the geodesic distance from one end, refined by cross-sections normal to the line); " +
      "radius: mean distance of the cross-section outline from its centroid; radius_spread: its standard deviation";
  }
  if (format === "cloud" || format === "ply") return "unordered points ordered along the wire (path through their minimum spanning tree); gross outliers left out";
  if (format === "svg") return "SVG path data, flattened; a planar projection of the wire (torsion is not measurable from it)";
  if (format !== null) return "ordered trace, as read";
  return null;
}

/** Keeps one header line one line. */
const oneLine = (text: string): string => text.replace(/[\r\n]+/g, " ");

/**
 * The CSV text of one wire: `#` header lines, then `x,y,z` (and `radius,radius_spread` for a mesh)
 * in `unit`, 12 significant digits. The `# unit:` and `# closed:` lines are the directives that
 * `twistline profile` reads back; the extra columns are ignored there (with a diagnostic).
 */
export function centerlineToCsv(trace: Trace, options: { unit: LengthUnit; wire: number; wires: number; format: string | null }): string {
  const u = options.unit;
  const k = PER_METRE[u];
  const n = trace.xyz.length / 3;
  const src = trace.source;
  const pixel = src.unit === "px" && src.pixelSize !== undefined ? `, pixel size ${formatNumber(src.pixelSize * k)} ${u}` : "";
  const mesh = trace.radius !== undefined && trace.radiusSpread !== undefined;
  const lines = [
    `# ${TOOL_NAME} ${TOOL_VERSION}: centre line`,
    `# source: ${oneLine(src.file)} (unit ${src.unit}${pixel})`,
  ];
  const method = methodOf(trace, options.format);
  if (method !== null) lines.push(`# method: ${method}`);
  lines.push(`# wire: ${options.wire} of ${options.wires}`);
  lines.push(`# unit: ${u}`);
  if (trace.closed !== undefined) lines.push(`# closed: ${trace.closed}`);
  else lines.push("# closure: not known (the profile fit detects it from the ends)");
  lines.push(`# points: ${n}`);
  lines.push(`# dimensions: ${trace.dims}${trace.dims === 2 ? " (z = 0)" : ""}`);
  lines.push(`# planar projection: ${trace.planarProjection === true}`);
  lines.push(`# columns: x y z${mesh ? " radius radius_spread" : ""} in ${u}`);
  for (const d of trace.diagnostics) lines.push(`# diagnostic: ${oneLine(d)}`);
  lines.push(mesh ? "x,y,z,radius,radius_spread" : "x,y,z");
  const p = trace.xyz;
  for (let i = 0; i < n; ++i) {
    let row = `${formatNumber(p[3 * i] * k)},${formatNumber(p[3 * i + 1] * k)},${formatNumber(p[3 * i + 2] * k)}`;
    if (mesh) row += `,${formatNumber((trace.radius as Float64Array)[i] * k)},${formatNumber((trace.radiusSpread as Float64Array)[i] * k)}`;
    lines.push(row);
  }
  return `${lines.join("\n")}\n`;
}

function length(trace: Trace): number {
  const p = trace.xyz;
  let s = 0;
  for (let i = 3; i < p.length; i += 3) s += Math.hypot(p[i] - p[i - 3], p[i + 1] - p[i - 2], p[i + 2] - p[i - 1]);
  return s;
}

function medianOf(values: Float64Array): number {
  const s = Float64Array.from(values).sort();
  const n = s.length;
  return n % 2 ? s[(n - 1) >> 1] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
}

/** What a centerline run produced. */
export interface CenterlineOutcome {
  /** The wires written, in order, and where ("-" for standard output). */
  readonly traces: readonly Trace[];
  readonly paths: readonly string[];
  readonly outUnit: LengthUnit;
}

/**
 * Runs the centerline stage: read every wire (or the one --wire names), render each as CSV, check
 * every output path, then write each atomically (temporary file, then rename); never over the input.
 * @throws InputError (bad data), ParameterError (bad option or output path); anything else is a bug.
 */
export async function runCenterline(req: CenterlineRequest, io: Io): Promise<CenterlineOutcome> {
  await checkOutputPath(req, WHERE);
  if (req.split === true) return runNetworkCenterline(req, io);
  const all = await readTracesFile(req.input, readOptionsOf(req, undefined, io));
  const file = req.input === "-" ? STDIN_NAME : req.input;
  const chosen = req.wire !== undefined
    ? [{ trace: pickWire(all, file, req.wire), index: req.wire }]
    : all.map((trace, i) => ({ trace, index: i + 1 }));
  if (req.out === "-" && chosen.length > 1) {
    throw new ParameterError(
      WHERE, "--out",
      `${file} has ${all.length} wires and standard output takes one: add --wire <n>, or give a file name (trace.csv writes trace-1.csv to trace-${all.length}.csv)`,
    );
  }
  const outUnit = req.outUnit ?? defaultOutputUnit(chosen[0].trace.source);
  const format = req.format ?? (req.input === "-" ? null : formatOfPath(req.input));
  const texts = chosen.map(({ trace, index }) => centerlineToCsv(trace, { unit: outUnit, wire: index, wires: all.length, format }));
  const paths = req.out === "-" ? ["-"] : wirePaths(req.out, chosen.length);
  if (req.out !== "-") {
    for (const path of paths) {
      if (path !== req.out) await checkOutputPath({ input: req.input, out: path }, WHERE);
    }
  }
  if (req.out === "-") io.stdout(texts[0]);
  else for (let i = 0; i < paths.length; ++i) await writeOutput(paths[i], texts[i], req.input, WHERE);

  if (!req.quiet) {
    const k = PER_METRE[outUnit];
    const parts = chosen.map(({ trace, index }, i) => {
      const r = trace.radius !== undefined ? `, median radius ${brief(medianOf(trace.radius) * k)} ${outUnit}` : "";
      const where = paths[i] === "-" ? "" : ` -> ${paths[i]}`;
      return `wire ${index}: ${trace.xyz.length / 3} points, length ${brief(length(trace) * k)} ${outUnit}${r}, ${trace.diagnostics.length} diagnostics${where}`;
    });
    io.stderr(`${TOOL_NAME}: ${file}: ${all.length === 1 ? "1 wire" : `${all.length} wires`}; ${parts.join("; ")}\n`);
  }
  return { traces: chosen.map((c) => c.trace), paths, outUnit };
}

/** `<stem>-network.json` beside `out` (net.csv -> net-network.json). */
export function networkJsonPath(out: string): string {
  const ext = extname(out);
  return join(dirname(out), `${basename(out, ext)}-network.json`);
}

/**
 * --branches split: reads the network, checks every output path, then writes each branch's CSV
 * (`<stem>-<k>.csv`, k = branch id: longest first) and `<stem>-network.json`, each atomically.
 */
async function runNetworkCenterline(req: CenterlineRequest, io: Io): Promise<CenterlineOutcome> {
  const net = await readNetworkFile(req.input, networkReadOptions(req));
  const traces = net.branches.map((b) => b.trace);
  const outUnit = req.outUnit ?? defaultOutputUnit(traces[0].source);
  const format = req.format ?? formatOfPath(req.input);
  const ext = extname(req.out);
  const stem = basename(req.out, ext);
  const paths = net.branches.map((b) => join(dirname(req.out), `${stem}-${b.id}${ext}`));
  const jsonPath = networkJsonPath(req.out);
  for (const path of [...paths, jsonPath]) await checkOutputPath({ input: req.input, out: path }, WHERE);
  const texts = traces.map((trace, i) => centerlineToCsv(trace, { unit: outUnit, wire: i + 1, wires: traces.length, format }));
  const json = networkToJson(net, outUnit, paths.map((p) => ({ file: basename(p) })));
  for (let i = 0; i < paths.length; ++i) await writeOutput(paths[i], texts[i], req.input, WHERE);
  await writeOutput(jsonPath, json, req.input, WHERE);
  if (!req.quiet) {
    const k = PER_METRE[outUnit];
    io.stderr(
      `${TOOL_NAME}: ${req.input}: a network of ${net.branches.length} ${net.branches.length === 1 ? "branch" : "branches"}, ${net.junctions.length} junctions, ` +
        `${net.ends.length} free ends, ${net.cycles} independent cycles; branch lengths ${net.branches.map((b) => brief(b.length * k)).join(", ")} ${outUnit} -> ${paths[0]}${paths.length > 1 ? ` ... ${basename(paths[paths.length - 1])}` : ""}, ${jsonPath}\n`,
    );
  }
  return { traces, paths: [...paths, jsonPath], outUnit };
}

/** The network reader's options from a checked request. */
export function networkReadOptions(req: InputRequest): ReadNetworkOptions {
  const o: { -readonly [K in keyof ReadNetworkOptions]: ReadNetworkOptions[K] } = {};
  if (req.unit !== undefined) o.unit = req.unit;
  if (req.pixelSize !== undefined) o.pixelSize = req.pixelSize;
  if (req.format !== undefined) o.format = req.format;
  return o;
}

/** Help of --branches for the commands that split networks. */
export const SPLIT_BRANCHES_HELP =
  "a branched mesh or cloud: an error, keep its longest path, or split it into a network of wires: error, longest, split (default: error); " +
  "split writes one output per branch (longest first) and a network.json of junctions, free ends and branches";

/** Adds `centerline` to the program. */
export function addCenterlineCommand(program: Command, io: Io): void {
  program
    .command("centerline")
    .description(
      "reduce a tube mesh, a point cloud or SVG path data to ordered centre lines (with the local tube radius for meshes), " +
        "one CSV per wire that `profile` reads back",
    )
    .argument("<input>", `${INPUT_HELP} (an ordered trace passes through), or - for standard input (STL and OBJ need --format there)`)
    .requiredOption(
      "--out <file>",
      "output .csv file, or - for standard output (one wire); with several wires, trace.csv writes trace-1.csv, trace-2.csv, ... " +
        "(wire order: meshes largest first, SVG document order)",
    )
    .option("--unit <unit>", HELP.unit)
    .option("--pixel-size <length>", HELP.pixelSize)
    .option("--format <format>", HELP.format)
    .option("--wire <n>", "write only this wire, from 1, to the --out file itself (default: every wire)")
    .option("--branches <policy>", `${SPLIT_BRANCHES_HELP} (net.csv -> net-1.csv, net-2.csv, ... and net-network.json)`)
    .option("--out-unit <unit>", "length unit of the output, nm, um, m or A (default: the input unit; for px the unit of the pixel size: nm below 1 um, else um)")
    .option("--quiet", "print no summary line")
    .action(async (input, flags) => {
      await runCenterline(checkCenterlineFlags(input, flags), io);
    });
}
