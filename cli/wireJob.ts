/** One wire through the whole pipeline into a folder: shared by analyze, batch (in its workers) and demo. */
import { readFile, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { InputError } from "../src/errors.js";
import { analyzeTrace, type Analysis } from "../src/export/analyzeTrace.js";
import type { MeshFormat } from "../src/export/meshToBytes.js";
import { defaultOutputUnit } from "../src/export/outputUnit.js";
import { buildWireOutputs, type WireOutputs } from "../src/export/wireOutputs.js";
import { wireSummary, type WireSummary } from "../src/export/wireSummary.js";
import { readTraceFile, type ReadOneTraceOptions } from "../src/import/readTrace.js";
import { parseMaterial } from "../src/physics/parseMaterial.js";
import type { Material } from "../src/physics/types.js";
import { PER_METRE, type LengthUnit, type Trace } from "../src/types.js";
import { jsonErrorAt } from "./jsonErrorAt.js";

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
}

/** What a finished job reports back. */
export interface WireJobResult {
  readonly analysis: Analysis;
  readonly outputs: WireOutputs;
  readonly summary: WireSummary;
}

/**
 * Reads a material file (JSON) and validates it (physics/parseMaterial).
 * @throws {InputError} unreadable file, JSON syntax error ("file:line: json: ..."), or schema violations.
 */
export async function readMaterialFile(path: string): Promise<Material> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (e) {
    const code = (e as { code?: unknown }).code;
    const problem = code === "ENOENT" ? "no such file" : code === "EISDIR" ? "is a directory, not a file" : code === "EACCES" ? "permission denied" : (e as Error).message;
    throw new InputError(path, null, "file", problem);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    const at = jsonErrorAt(text);
    const problem = at !== null ? `not valid JSON (unexpected ${at.found})` : `not valid JSON (${(e as Error).message})`;
    throw new InputError(path, at?.line ?? null, "json", problem);
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
export async function runWireJob(job: WireJob, viewerJs: string): Promise<WireJobResult> {
  const trace = job.trace ?? (await readTraceFile(job.input, job.readOptions));
  const options: Parameters<typeof analyzeTrace>[1] = {
    bootstrap: job.bootstrap,
    seed: job.seed,
    material: job.material,
    ...(job.closed !== undefined ? { closed: job.closed } : {}),
    ...(job.step !== undefined ? { step: job.step } : {}),
    ...(job.coordinateError !== undefined ? { coordinateError: job.coordinateError } : {}),
  };
  const analysis = analyzeTrace(trace, options);
  const unit = job.outUnit ?? defaultOutputUnit(trace.source);
  const k = PER_METRE[unit];
  const outputs = await buildWireOutputs(analysis, {
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
  for (const f of outputs.files) await writeFile(join(job.dir, f.name), f.data);
  return { analysis, outputs, summary: wireSummary(analysis, outputs.document) };
}
