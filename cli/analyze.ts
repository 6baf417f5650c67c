/**
 * `twistline analyze <input> --material <material.json> --out <dir>`: the whole pipeline for one wire.
 * Writes profile.csv, model.json, chain.csv, wire.<mesh> and report.html into <dir>, all at once
 * (a temporary folder renamed into place) or not at all.
 */
import { availableParallelism } from "node:os";
import { join } from "node:path";
import type { Command } from "@commander-js/extra-typings";
import { InputError, ParameterError } from "../src/errors.js";
import { MESH_FORMATS, type MeshFormat } from "../src/export/meshFormats.js";
import { stageOutputDir } from "../src/export/stageOutputDir.js";
import type { Material } from "../src/physics/types.js";
import { PER_METRE } from "../src/types.js";
import { SPLIT_BRANCHES_HELP } from "./centerline.js";
import type { Io } from "./io.js";
import { brief, parseChoiceOption, parseCountOption, parseLengthOption, parseLengthUnitOption, parseSeedOption } from "./options.js";
import { checkInputFlags, DEFAULT_BOOTSTRAP, DEFAULT_SEED, HELP, INPUT_HELP, readOptionsOf, type InputFlags, type InputRequest } from "./profile.js";
import type { PipelineSettings, WireJob, WireJobResult } from "./wireJob.js";

const WHERE = "analyze";

/** Mesh format when --mesh is not given. */
export const DEFAULT_MESH: MeshFormat = "ply";

/** Raw option values shared by analyze, batch and demo (text, as commander hands them over). */
export interface PipelineFlags extends InputFlags {
  material?: string;
  closed?: true;
  open?: true;
  bootstrap?: string;
  seed?: string;
  step?: string;
  coordinateError?: string;
  outUnit?: string;
  spacing?: string;
  mesh?: string;
  radius?: string;
  force?: true;
  quiet?: true;
  export?: string;
  grid?: string;
}

/** Checked pipeline options; lengths in metres. */
export interface PipelineRequest extends PipelineSettings {
  readonly inputs: InputRequest;
  readonly force: boolean;
  readonly quiet: boolean;
}

/** Checks the pipeline options; throws ParameterError("<where>: --option: ...") on the first bad one. */
export function checkPipelineFlags(where: string, input: string, flags: PipelineFlags): PipelineRequest {
  const req: { -readonly [K in keyof PipelineRequest]: PipelineRequest[K] } = {
    inputs: checkInputFlags(where, input, flags, true),
    materialFile: flags.material ?? null,
    bootstrap: flags.bootstrap === undefined ? DEFAULT_BOOTSTRAP : parseCountOption(where, "--bootstrap", flags.bootstrap),
    seed: flags.seed === undefined ? DEFAULT_SEED : parseSeedOption(where, "--seed", flags.seed),
    mesh: flags.mesh === undefined ? DEFAULT_MESH : parseChoiceOption(where, "--mesh", flags.mesh, MESH_FORMATS),
    force: flags.force === true,
    quiet: flags.quiet === true,
  };
  if (req.materialFile === "") throw new ParameterError(where, "--material", "must not be empty");
  if (flags.closed && flags.open) throw new ParameterError(where, "--closed/--open", "give one of them, not both");
  if (flags.closed) req.closed = true;
  if (flags.open) req.closed = false;
  if (flags.step !== undefined) req.step = parseLengthOption(where, "--step", flags.step);
  if (flags.coordinateError !== undefined) req.coordinateError = parseLengthOption(where, "--coordinate-error", flags.coordinateError);
  if (flags.outUnit !== undefined) req.outUnit = parseLengthUnitOption(where, "--out-unit", flags.outUnit);
  if (flags.spacing !== undefined) req.spacing = parseLengthOption(where, "--spacing", flags.spacing);
  if (flags.radius !== undefined) req.radius = parseLengthOption(where, "--radius", flags.radius);
  if (flags.export !== undefined) {
    const kinds = flags.export.split(",").map((x) => x.trim()).filter((x) => x !== "");
    const bad = kinds.find((x) => x !== "vtp" && x !== "ovf");
    if (bad !== undefined || kinds.length === 0) throw new ParameterError(where, "--export", `must be a comma list of vtp, ovf (got ${JSON.stringify(flags.export)})`);
    if (kinds.includes("vtp")) req.vtp = true;
    if (kinds.includes("ovf") && flags.grid === undefined) throw new ParameterError(where, "--export", "ovf needs --grid <length> (the cell size)");
  }
  if (flags.grid !== undefined) {
    req.grid = parseLengthOption(where, "--grid", flags.grid);
    if (req.materialFile === null) throw new ParameterError(where, "--grid", "the OVF texture needs --material (the relaxed texture comes from the model)");
  }
  if (req.bootstrap > 100_000) throw new ParameterError(where, "--bootstrap", `must be at most 100000 (got ${req.bootstrap})`);
  return req;
}

/** A job for one input of a checked request. */
export function jobOf(req: PipelineRequest, input: string, material: Material | null, dir: string, io: Io): WireJob {
  return {
    input,
    readOptions: readOptionsOf(req.inputs, req.closed, io),
    material,
    materialFile: req.materialFile,
    bootstrap: req.bootstrap,
    seed: req.seed,
    mesh: req.mesh,
    dir,
    ...(req.closed !== undefined ? { closed: req.closed } : {}),
    ...(req.step !== undefined ? { step: req.step } : {}),
    ...(req.coordinateError !== undefined ? { coordinateError: req.coordinateError } : {}),
    ...(req.outUnit !== undefined ? { outUnit: req.outUnit } : {}),
    ...(req.spacing !== undefined ? { spacing: req.spacing } : {}),
    ...(req.radius !== undefined ? { radius: req.radius } : {}),
    ...(req.argv !== undefined ? { argv: req.argv } : {}),
    ...(req.vtp !== undefined ? { vtp: req.vtp } : {}),
    ...(req.grid !== undefined ? { grid: req.grid } : {}),
  };
}

/** Pinning sites listed apart as indicative only (their windows reach into a periodic stretch). */
function indicativeCount(d: WireJobResult["outputs"]["document"]): number {
  return d.pinningMinor.filter((x) => x.note !== null && x.note.includes("indicative only")).length;
}

/** One line about a finished wire, for stderr. */
export function describeResult(name: string, r: WireJobResult): string {
  const d = r.outputs.document;
  const u = d.unit;
  const kinds = (["straight", "arc", "helix", "irregular"] as const)
    .map((k) => [k, d.segments.filter((g) => g.kind === k).length] as const)
    .filter(([, c]) => c > 0)
    .map(([k, c]) => `${c} ${k}`)
    .join(", ");
  const model = d.material !== null
    ? `; ${d.pinning.length} pinning ${d.pinning.length === 1 ? "site" : "sites"}${indicativeCount(d) > 0 ? ` (${indicativeCount(d)} more indicative only, next to a periodic stretch)` : ""}, ${d.segments.filter((g) => g.homogeneousStability === "metastable").length} metastable`
    : "; geometry only (no material)";
  return `${name}: length ${brief(d.geometry.length ?? NaN)} ${u}, ${d.segments.length} ${d.segments.length === 1 ? "stretch" : "stretches"} (${kinds})${model}`;
}

/**
 * Progress of one analysis on a terminal: one status line, redrawn at each stage with the time so
 * far, and erased at the end (nothing at all when stderr is not a terminal, or with --quiet).
 */
export function statusLine(terminal: boolean, io: Io, now: () => number = () => performance.now()): { stage(text: string): void; end(): void } {
  const t0 = now();
  let drawn = false;
  return {
    stage(text) {
      if (!terminal) return;
      io.stderr(`\rtwistline: analyze: ${text} (${((now() - t0) / 1000).toFixed(1)} s)\x1b[K`);
      drawn = true;
    },
    end() {
      if (drawn) io.stderr("\r\x1b[K");
      drawn = false;
    },
  };
}

/**
 * Runs analyze: checks the output folder first (refused when it exists and is not empty, unless
 * --force), reads the material and the wire, runs the pipeline, writes everything into a temporary
 * folder and renames it into place; on any error the temporary folder is removed and nothing is left.
 */
export async function runAnalyze(input: string, out: string, req: PipelineRequest, io: Io): Promise<WireJobResult> {
  const staged = await stageOutputDir(out, { force: req.force, protect: [input, ...(req.materialFile !== null ? [req.materialFile] : [])], where: WHERE });
  try {
    // the pipeline (three.js, ajv, the report bundle) loads only now, so --help and option errors stay quick
    const [{ readMaterialFile, runWireJob }, { viewerScript }] = await Promise.all([import("./wireJob.js"), import("../src/report/viewerScript.js")]);
    const material = req.materialFile !== null ? await readMaterialFile(req.materialFile) : null;
    const status = statusLine(req.quiet ? false : io.stderrIsTTY === true, io);
    let result: WireJobResult;
    try {
      result = await runWireJob(jobOf(req, input, material, staged.path, io), await viewerScript(), status.stage);
    } finally {
      status.end();
    }
    await staged.commit();
    if (!req.quiet) {
      const d = result.outputs.document;
      const k = PER_METRE[d.unit];
      io.stderr(
        `twistline: ${describeResult(d.source.file, result)}; chain spacing ${brief(result.outputs.chain.spacing * k)} ${d.unit} (${result.outputs.spacingNote}); wrote ${out}\n`,
      );
      if (d.material === null) io.stderr("twistline: no --material: add one for effective DMI and anisotropy, states, metastability and pinning sites\n");
    }
    return result;
  } catch (e) {
    await staged.abort();
    throw e;
  }
}

/** Help texts of the options analyze, batch and demo share. */
export const PIPELINE_HELP = {
  material: "material JSON (order; exchange in J/m and anisotropy in J/m^3, or magneticLength in m; optional thickness, latticeSpacing in m, temperature in K); without it: geometry only",
  spacing: "spacing of chain.csv sites, with its unit, e.g. 1nm (default: a quarter of the resolution length, and at most a quarter of the magnetic length with a material)",
  mesh: `tube mesh format: ${MESH_FORMATS.join(", ")} (default: ${DEFAULT_MESH})`,
  radius: "tube radius, with its unit (default: the radius measured at import for meshes, else half the material thickness, else 1% of the bounding-box diagonal)",
  force: "replace an existing output folder, only one twistline wrote (marked by its .twistline-owned.json) with nothing added since",
} as const;

/** The arguments the program was parsed from (commander keeps them as `rawArgs`, untyped), for model.json. */
function rawArgsOf(cmd: { readonly parent: unknown }): readonly string[] {
  const raw = (cmd.parent as { rawArgs?: unknown } | null)?.rawArgs;
  return Array.isArray(raw) && raw.every((x) => typeof x === "string") ? raw : [];
}

/** Adds `analyze` to the program. */
export function addAnalyzeCommand(program: Command, io: Io): void {
  program
    .command("analyze")
    .description(
      "the whole pipeline for one wire: profile with 95% bands, stretches, the curvilinear-magnet model (with --material), " +
        "a chain for solvers, a tube mesh and an HTML report, all written into one folder (model estimates, not measurements)",
    )
    .argument("<input>", `${INPUT_HELP}, or - for standard input`)
    .requiredOption("--out <dir>", "output folder (created; refused if it exists and is not empty, unless --force)")
    .option("--material <file>", PIPELINE_HELP.material)
    .option("--spacing <length>", PIPELINE_HELP.spacing)
    .option("--mesh <format>", PIPELINE_HELP.mesh)
    .option("--radius <length>", PIPELINE_HELP.radius)
    .option("--unit <unit>", HELP.unit)
    .option("--pixel-size <length>", HELP.pixelSize)
    .option("--closed", "fit a closed loop")
    .option("--open", "fit an open wire (default: the file's declaration, else detected from the ends)")
    .option("--bootstrap <n>", `bootstrap replicates for the 95% bands (default: ${DEFAULT_BOOTSTRAP})`)
    .option("--seed <n>", `seed of the bootstrap and the model's draws, 0 to 4294967295 (default: ${DEFAULT_SEED})`)
    .option("--step <length>", "profile sampling step, with its unit (default: one sample per input point)")
    .option("--coordinate-error <length>", "the standard deviation of the coordinate error per coordinate, with its unit, e.g. 0.2A, when known: the noise is then not estimated (default: estimated from the trace)")
    .option("--out-unit <unit>", "length unit of every output, nm, um, m or A (default: the input unit; for px the unit of the pixel size: nm below 1 um, else um)")
    .option("--format <format>", HELP.format)
    .option("--wire <n>", HELP.wire)
    .option("--branches <policy>", `${SPLIT_BRANCHES_HELP}: one analysis folder per branch (branch-1, branch-2, ...), network.json, network.html and summary.csv`)
    .option("--jobs <n>", `worker threads for --branches split (default: the number of cores, here ${availableParallelism()})`)
    .option("--export <list>", "files for other tools, comma list: vtp (centerline.vtp, tube.vtp: VTK XML PolyData), ovf (needs --grid)")
    .option("--grid <length>", "cell size, with its unit, of the OVF 2.0 texture exports (texture.ovf text, texture-binary8.ovf, mask.ovf); needs --material")
    .option("--force", PIPELINE_HELP.force)
    .option("--quiet", "print no summary line")
    .action(async (input, flags, cmd) => {
      if (flags.branches === "split") {
        const { branches: _policy, jobs: jobsFlag, ...rest } = flags;
        const req = { ...checkPipelineFlags(WHERE, input, rest), argv: rawArgsOf(cmd) };
        if (req.inputs.wire !== undefined) throw new ParameterError(WHERE, "--wire", "does not go with --branches split (every branch is analysed)");
        if (input === "-") throw new ParameterError(WHERE, "<input>", "--branches split reads a file, not standard input");
        const jobs = jobsFlag === undefined ? availableParallelism() : parseCountOption(WHERE, "--jobs", jobsFlag);
        if (jobs < 1) throw new ParameterError(WHERE, "--jobs", `must be at least 1 (got ${jobs})`);
        const { runNetworkAnalysis, NETWORK_PAGE } = await import("./analyzeNetwork.js");
        const run = await runNetworkAnalysis(input, flags.out, req, { jobs, ci: io.ci, where: WHERE }, io);
        const failed = run.rows.filter((r) => r.error !== null);
        const net = run.network;
        if (!req.quiet) {
          for (const r of failed) io.stderr(`twistline: ${WHERE}: ${r.wire}: ${r.error}\n`);
          io.stderr(
            `twistline: ${input}: a network of ${net.branches.length} branches, ${net.junctions.length} junctions, ${net.ends.length} free ends, ${net.cycles} independent cycles; ` +
              `analysed ${net.branches.length - failed.length} of ${net.branches.length} branches; wrote ${join(flags.out, NETWORK_PAGE)}\n`,
          );
        }
        if (failed.length > 0) {
          throw new InputError(join(flags.out, "summary.csv"), null, "branches", `${failed.length} of ${net.branches.length} failed (see the error column); the others were written`);
        }
        return;
      }
      if (flags.jobs !== undefined) throw new ParameterError(WHERE, "--jobs", "only goes with --branches split (one wire runs on one thread)");
      await runAnalyze(input, flags.out, { ...checkPipelineFlags(WHERE, input, flags), argv: rawArgsOf(cmd) }, io);
    });
}
