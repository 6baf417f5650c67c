/** One wire through the whole pipeline into a folder: shared by analyze, batch (in its workers) and demo. */
import { readFile } from "node:fs/promises";
import { join } from "node:path";
import { InputError, ParameterError } from "../src/errors.js";
import { analyzeTrace, type Analysis } from "../src/export/analyzeTrace.js";
import type { MeshFormat } from "../src/export/meshToBytes.js";
import { defaultOutputUnit } from "../src/export/outputUnit.js";
import { buildWireOutputs, type WireOutputs } from "../src/export/wireOutputs.js";
import { wireSummary, type WireSummary } from "../src/export/wireSummary.js";
import { writeFileAtomic } from "../src/export/writeFileAtomic.js";
import { fsProblem } from "../src/import/fsProblem.js";
import { readInputBytes } from "../src/import/readInputBytes.js";
import { readTraceFile, type ReadOneTraceOptions } from "../src/import/readTrace.js";
import { parseMaterial } from "../src/physics/parseMaterial.js";
import type { Material } from "../src/physics/types.js";
import { PER_METRE, type LengthUnit, type Trace } from "../src/types.js";
import { markJunctionZones, type JunctionZone } from "../src/import/network/junctionZones.js";
import { jsonErrorAt } from "./jsonErrorAt.js";
import { withOptionNames } from "./options.js";
import { checkStepSamples } from "./profile.js";

/** Everything needed to analyse one wire into a folder (plain data: it crosses to worker threads). */
/** Fit and output settings shared by the analyze command's request and a wire job; lengths in metres. */
export interface PipelineSettings {
  readonly materialFile: string | null;
  readonly closed?: boolean;
  readonly bootstrap: number;
  readonly seed: number;
  readonly step?: number;
  readonly coordinateError?: number;
  readonly outUnit?: LengthUnit;
  readonly spacing?: number;
  readonly mesh: MeshFormat;
  readonly radius?: number;
  /** The command line after the program name, as given (recorded in model.json); absent for demo and batch wires. */
  readonly argv?: readonly string[];
  /** Write the VTK PolyData exports. */
  readonly vtp?: boolean;
  /** Cell size (m) of the OVF exports. */
  readonly grid?: number;
}

export interface WireJob extends PipelineSettings {
  /** Input file as given ("-" for standard input, read by the caller's `readOptions.io`). */
  readonly input: string;
  /** A trace already read (batch: one wire of a multi-wire file); else `input` is read. */
  readonly trace?: Trace;
  readonly readOptions: ReadOneTraceOptions;
  readonly material: Material | null;
  /** Existing folder to write the files into. */
  readonly dir: string;
  /** Command name for messages (default "analyze"). */
  readonly where?: string;
  /** A branch of a wire network: the zones of the junctions at its ends (samples there are flagged). */
  readonly junctionZones?: readonly JunctionZone[];
}

/** What a finished job reports back. */
export interface WireJobResult {
  readonly analysis: Analysis;
  readonly outputs: WireOutputs;
  readonly summary: WireSummary;
}

/** Most bytes a material file may hold (it is a handful of numbers). */
export const MAX_MATERIAL_BYTES = 1024 * 1024;
/** Deepest nesting of arrays and objects accepted in a material file. */
export const MAX_MATERIAL_DEPTH = 32;

/**
 * The first value of `json` that JSON can write but a double cannot hold (1e400 reads as Infinity),
 * or that nests deeper than {@link MAX_MATERIAL_DEPTH}; walked without recursion.
 */
function firstUnreadable(json: unknown): { field: string; problem: "depth" | "range" } | null {
  const stack: { value: unknown; field: string; depth: number }[] = [{ value: json, field: "", depth: 0 }];
  while (stack.length > 0) {
    const { value, field, depth } = stack.pop() as { value: unknown; field: string; depth: number };
    if (typeof value === "number" && !Number.isFinite(value)) return { field: field || "material", problem: "range" };
    if (typeof value !== "object" || value === null) continue;
    if (depth >= MAX_MATERIAL_DEPTH) return { field: field || "material", problem: "depth" };
    const entries = Array.isArray(value) ? value.map((v, i) => [`${field}[${i}]`, v] as const) : Object.entries(value).map(([k, v]) => [field === "" ? k : `${field}.${k}`, v] as const);
    for (let i = entries.length - 1; i >= 0; --i) stack.push({ value: entries[i][1], field: entries[i][0], depth: depth + 1 });
  }
  return null;
}

/** The 1-based line of the first number literal in `text` that overflows a double, and the literal. */
function overflowingLiteral(text: string): { line: number; literal: string } | null {
  const re = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/g;
  for (let m = re.exec(text); m !== null; m = re.exec(text)) {
    if (!Number.isFinite(Number(m[0]))) return { line: text.slice(0, m.index).split(/\r\n|\r|\n/).length, literal: m[0] };
  }
  return null;
}

/**
 * Reads a material file (JSON, UTF-8 with or without a byte-order mark, at most 1 MiB) and
 * validates it (physics/parseMaterial).
 * @throws {InputError} unreadable file, JSON syntax error ("file:line: json: ..."), a number beyond
 *   the double range ("file:3: anisotropy: 1e400 is beyond ..."), nesting deeper than 32 levels, or
 *   schema violations.
 */
export async function readMaterialFile(path: string): Promise<Material> {
  const bytes = await readInputBytes(path, MAX_MATERIAL_BYTES);
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new InputError(path, null, "file", "not UTF-8 text (a material file is JSON)");
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    const at = jsonErrorAt(text);
    const problem = at !== null ? `not valid JSON (unexpected ${at.found})` : `not valid JSON (${(e as Error).message})`;
    throw new InputError(path, at?.line ?? null, "json", problem);
  }
  const bad = firstUnreadable(json);
  if (bad?.problem === "depth") throw new InputError(path, null, bad.field.split(/[.[]/)[0], `nested more than ${MAX_MATERIAL_DEPTH} levels deep`);
  if (bad?.problem === "range") {
    const at = overflowingLiteral(text);
    const shown = at !== null ? at.literal.length > 24 ? `${at.literal.slice(0, 20)}...` : at.literal : "a number";
    throw new InputError(path, at?.line ?? null, bad.field, `${shown} is beyond the range of a double (largest about 1.8e308)`);
  }
  return parseMaterial(json, path);
}

/** The `note` of a material file (its provenance), or null; the file was already read and checked. */
async function materialNote(path: string): Promise<string | null> {
  try {
    const json = JSON.parse(await readFile(path, "utf8")) as { note?: unknown };
    return typeof json.note === "string" ? json.note : null;
  } catch {
    return null;
  }
}

/**
 * Runs one wire: read (unless given), analyse (profile, stretches, model), build every output in
 * memory, then write the files into `job.dir`. The caller stages `job.dir` and commits or removes it.
 * @throws {InputError} bad data. {@link ParameterError} bad options. Anything else is a bug.
 */
export async function runWireJob(job: WireJob, viewerJs: string, onStage: (stage: string) => void = () => undefined): Promise<WireJobResult> {
  if (job.trace === undefined) onStage(`reading ${job.input === "-" ? "standard input" : job.input}`);
  const trace = job.trace ?? (await readTraceFile(job.input, job.readOptions));
  onStage(`fitting ${trace.xyz.length / 3} points${job.bootstrap > 0 ? ` with ${job.bootstrap} bootstrap replicates` : ""}, then stretches${job.material !== null ? " and the model" : ""}`);
  const options: Parameters<typeof analyzeTrace>[1] = {
    bootstrap: job.bootstrap,
    seed: job.seed,
    material: job.material,
    ...(job.closed !== undefined ? { closed: job.closed } : {}),
    ...(job.step !== undefined ? { step: job.step } : {}),
    ...(job.coordinateError !== undefined ? { coordinateError: job.coordinateError } : {}),
  };
  const fitted = withOptionNames(job.where ?? "analyze", () => analyzeTrace(trace, options));
  const analysis = job.junctionZones !== undefined && job.junctionZones.length > 0
    ? { ...fitted, profile: markJunctionZones(fitted.profile, job.junctionZones) }
    : fitted;
  const unit = job.outUnit ?? defaultOutputUnit(trace.source);
  const k = PER_METRE[unit];
  checkStepSamples(job.where ?? "analyze", job.step, analysis.profile, unit);
  onStage("building the chain, mesh and report");
  let outputs: WireOutputs;
  try {
    outputs = await buildWireOutputs(analysis, {
      unit,
      mesh: job.mesh,
      materialFile: job.materialFile,
      materialNote: job.materialFile !== null ? await materialNote(job.materialFile) : null,
      run: {
        argv: job.argv ?? null,
        options: {
          input: job.input, inputUnit: trace.source.unit, pixelSize: trace.source.pixelSize !== undefined ? trace.source.pixelSize * k : null,
          step: job.step !== undefined ? job.step * k : null,
        },
      },
      viewerScript: viewerJs,
      ...(job.spacing !== undefined ? { spacing: job.spacing } : {}),
      ...(job.radius !== undefined ? { radius: job.radius } : {}),
      ...(job.vtp !== undefined ? { vtp: job.vtp } : {}),
      ...(job.grid !== undefined ? { grid: job.grid } : {}),
    });
  } catch (e) {
    // the default spacing comes from the fit: a check on it failing is about the data, not an option the user gave
    if (e instanceof ParameterError && e.where === "resampleWire") {
      const problem = e.message.replace(/^resampleWire: spacing: /, "");
      if (job.spacing !== undefined) throw new ParameterError(job.where ?? "analyze", "--spacing", problem);
      throw new InputError(trace.source.file, null, "profile", `the fit gives no usable chain spacing (${problem}); check the trace, or give --spacing`);
    }
    throw e;
  }
  onStage("writing the files");
  for (const f of outputs.files) {
    try {
      await writeFileAtomic(join(job.dir, f.name), f.data);
    } catch (e) {
      const problem = fsProblem(e);
      if (problem === null) throw e;
      throw new ParameterError(job.where ?? "analyze", "--out", `cannot write ${f.name}: ${problem}`);
    }
  }
  return { analysis, outputs, summary: wireSummary(analysis, outputs.document) };
}
