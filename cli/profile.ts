/**
 * `twistline profile <input> --out <file>`: the geometry stage alone (trace -> kappa, tau with bands).
 * The input is any format of the import table: an ordered trace, a mesh, a point cloud or SVG path data.
 */
import { stat } from "node:fs/promises";
import { dirname, extname } from "node:path";
import type { Command } from "@commander-js/extra-typings";
import { ParameterError } from "../src/errors.js";
import { defaultOutputUnit } from "../src/export/outputUnit.js";
import { profileCsvChunks } from "../src/export/profileToCsv.js";
import { profileJsonChunks } from "../src/export/profileToJson.js";
import { sameFile } from "../src/export/sameFile.js";
import { writeFileAtomic, type FileData } from "../src/export/writeFileAtomic.js";
import { fsProblem } from "../src/import/fsProblem.js";
import { fitProfile, type ProfileOptions } from "../src/frame/profile.js";
import type { BranchPolicy } from "../src/import/mesh/types.js";
import { formatOfPath, readTraceFile, type ReadOneTraceOptions } from "../src/import/readTrace.js";
import { TRACE_READERS } from "../src/import/traceReaders.js";
import { DEFAULT_INPUT_UNIT } from "../src/import/types.js";
import { PER_METRE, type InputUnit, type LengthUnit, type Profile, type Trace } from "../src/types.js";
import type { Io } from "./io.js";
import {
  brief, withOptionNames, parseChoiceOption, parseCountOption, parseInputUnitOption, parseLengthOption, parseLengthUnitOption, parseSeedOption,
} from "./options.js";

/** Bootstrap replicates when --bootstrap is not given. */
export const DEFAULT_BOOTSTRAP = 200;
/** Bootstrap seed when --seed is not given. */
export const DEFAULT_SEED = 1;

/** A checked `profile` request; lengths in metres. */
export interface ProfileRequest {
  readonly input: string;
  /** A .csv or .json path, or "-" for CSV on stdout. */
  readonly out: string;
  readonly unit?: InputUnit;
  readonly pixelSize?: number;
  readonly closed?: boolean;
  readonly bootstrap: number;
  readonly seed: number;
  readonly step?: number;
  readonly coordinateError?: number;
  readonly outUnit?: LengthUnit;
  readonly format?: string;
  /** 1-based wire of a file that holds several (default 1). */
  readonly wire?: number;
  readonly branches?: BranchPolicy;
  readonly quiet: boolean;
}

/** What a profile run produced (for the summary table of `demo`). */
export interface ProfileOutcome {
  readonly trace: Trace;
  /** The fitted profile, with the import diagnostics merged into `diagnostics`. */
  readonly profile: Profile;
  readonly outUnit: LengthUnit;
}

/** Raw option values as commander hands them over (all text). */
export interface ProfileFlags {
  out: string;
  unit?: string;
  pixelSize?: string;
  closed?: true;
  open?: true;
  bootstrap?: string;
  seed?: string;
  step?: string;
  coordinateError?: string;
  outUnit?: string;
  format?: string;
  wire?: string;
  branches?: string;
  quiet?: true;
}

const WHERE = "profile";

/** The checked input options every command that reads a wire shares; lengths in metres. */
export interface InputRequest {
  readonly unit?: InputUnit;
  readonly pixelSize?: number;
  readonly format?: string;
  readonly wire?: number;
  readonly branches?: BranchPolicy;
}

/** Raw input option values (text), as commander hands them over. */
export interface InputFlags {
  unit?: string;
  pixelSize?: string;
  format?: string;
  wire?: string;
  branches?: string;
}

/** Choices of --branches. */
export const BRANCH_POLICIES: readonly BranchPolicy[] = ["error", "longest"];

/**
 * Checks --unit, --pixel-size, --format, --wire and --branches for `input`, the same way for every
 * command; throws ParameterError("<where>: --option: ...") on the first bad one. SVG drawings are in
 * user units: --pixel-size goes with them without --unit px, and --unit px may omit it (the root's
 * physical size calibrates the drawing). `splitAllowed`: the command also takes --branches split.
 */
export function checkInputFlags(where: string, input: string, flags: InputFlags, splitAllowed = false): InputRequest {
  const req: { -readonly [K in keyof InputRequest]: InputRequest[K] } = {};
  if (flags.unit !== undefined) req.unit = parseInputUnitOption(where, "--unit", flags.unit);
  if (flags.pixelSize !== undefined) req.pixelSize = parseLengthOption(where, "--pixel-size", flags.pixelSize);
  if (flags.format !== undefined) req.format = parseChoiceOption(where, "--format", flags.format, [...TRACE_READERS.keys()]);
  if (flags.wire !== undefined) {
    const wire = /^\s*\d+\s*$/.test(flags.wire) ? Number(flags.wire) : NaN;
    if (!(Number.isSafeInteger(wire) && wire >= 1)) throw new ParameterError(where, "--wire", `must be an integer >= 1 (got ${JSON.stringify(flags.wire)})`);
    req.wire = wire;
  }
  if (flags.branches !== undefined) {
    // commands that split networks take "split" too (they handle it before the input checks)
    const policy = parseChoiceOption(where, "--branches", flags.branches, splitAllowed ? [...BRANCH_POLICIES, "split"] : BRANCH_POLICIES);
    if (policy !== "split") req.branches = policy;
  }
  const format = req.format ?? (input === "-" ? null : formatOfPath(input));
  if (format === "svg") {
    if (req.unit !== undefined && req.unit !== "px") {
      throw new ParameterError(where, "--unit", `an SVG drawing is in user units: use --pixel-size (the size of one user unit, e.g. 2.5nm) or leave --unit out (got --unit ${req.unit})`);
    }
    return req;
  }
  if (req.unit === "px" && req.pixelSize === undefined && format !== "json") {
    throw new ParameterError(where, "--pixel-size", "is required with --unit px (e.g. --pixel-size 2.5nm)");
  }
  if (req.pixelSize !== undefined && req.unit !== undefined && req.unit !== "px") {
    throw new ParameterError(where, "--pixel-size", `only applies to --unit px (got --unit ${req.unit})`);
  }
  return req;
}

/** The reader options of a checked input request (plus closure and standard input). */
export function readOptionsOf(req: InputRequest, closed: boolean | undefined, io: Io): ReadOneTraceOptions {
  const o: { -readonly [K in keyof ReadOneTraceOptions]: ReadOneTraceOptions[K] } = {};
  if (req.unit !== undefined) o.unit = req.unit;
  if (req.pixelSize !== undefined) o.pixelSize = req.pixelSize;
  if (closed !== undefined) o.closed = closed;
  if (req.format !== undefined) o.format = req.format;
  if (req.wire !== undefined) o.wire = req.wire;
  if (req.branches !== undefined) o.branches = req.branches;
  if (io.readStdin !== undefined) o.io = { readStdin: io.readStdin };
  return o;
}

/** Checks every option; throws ParameterError("profile: --option: ...") on the first bad one. */
export function checkProfileFlags(input: string, flags: ProfileFlags): ProfileRequest {
  const req: { -readonly [K in keyof ProfileRequest]: ProfileRequest[K] } = {
    input,
    out: flags.out,
    bootstrap: flags.bootstrap === undefined ? DEFAULT_BOOTSTRAP : parseCountOption(WHERE, "--bootstrap", flags.bootstrap),
    seed: flags.seed === undefined ? DEFAULT_SEED : parseSeedOption(WHERE, "--seed", flags.seed),
    quiet: flags.quiet === true,
  };
  const inputs = checkInputFlags(WHERE, input, flags);
  if (inputs.unit !== undefined) req.unit = inputs.unit;
  if (inputs.pixelSize !== undefined) req.pixelSize = inputs.pixelSize;
  if (flags.closed && flags.open) throw new ParameterError(WHERE, "--closed/--open", "give one of them, not both");
  if (flags.closed) req.closed = true;
  if (flags.open) req.closed = false;
  if (flags.step !== undefined) req.step = parseLengthOption(WHERE, "--step", flags.step);
  if (flags.coordinateError !== undefined) req.coordinateError = parseLengthOption(WHERE, "--coordinate-error", flags.coordinateError);
  if (flags.outUnit !== undefined) req.outUnit = parseLengthUnitOption(WHERE, "--out-unit", flags.outUnit);
  if (inputs.format !== undefined) req.format = inputs.format;
  if (inputs.wire !== undefined) req.wire = inputs.wire;
  if (inputs.branches !== undefined) req.branches = inputs.branches;
  const ext = extname(req.out).toLowerCase();
  if (req.out === "") throw new ParameterError(WHERE, "--out", "must not be empty");
  if (req.out !== "-" && ext !== ".csv" && ext !== ".json") {
    throw new ParameterError(WHERE, "--out", `must end in .csv or .json, or be - for CSV on standard output (got ${JSON.stringify(req.out)})`);
  }
  return req;
}

/** Refuses an output that is the input, or whose folder is missing, before any work is done. */
export async function checkOutputPath(req: { readonly input: string; readonly out: string }, where: string): Promise<void> {
  if (req.out === "-") return;
  if (req.input !== "-" && (await sameFile(req.out, req.input))) {
    throw new ParameterError(where, "--out", `${JSON.stringify(req.out)} is the input file; refusing to overwrite it`);
  }
  const folder = dirname(req.out);
  const info = await stat(folder).catch(() => null);
  if (info === null || !info.isDirectory()) throw new ParameterError(where, "--out", `folder ${JSON.stringify(folder)} does not exist`);
  const existing = await stat(req.out).catch(() => null);
  if (existing?.isDirectory()) throw new ParameterError(where, "--out", `${JSON.stringify(req.out)} is a directory`);
}

/** Writes `text` to `out` atomically, never over `input`; file-system failures become ParameterError(where, "--out"). */
export async function writeOutput(out: string, data: FileData, input: string, where: string): Promise<void> {
  try {
    await writeFileAtomic(out, data, { protect: input === "-" ? [] : [input] });
  } catch (e) {
    const problem = fsProblem(e);
    if (problem !== null) throw new ParameterError(where, "--out", `cannot write ${JSON.stringify(out)}: ${problem}`);
    throw e;
  }
}

/** Fewest samples a --step may give: as many as a quintic fit needs points. */
export const MIN_STEP_SAMPLES = 6;

/**
 * Refuses a --step that leaves fewer than {@link MIN_STEP_SAMPLES} samples along the fitted wire
 * (a step longer than the wire used to give a one-row profile and exit 0).
 * @throws {ParameterError} "<where>: --step: 300 nm gives 1 sample along a wire 120 nm long; ..."
 */
export function checkStepSamples(where: string, step: number | undefined, profile: Profile, unit: LengthUnit): void {
  if (step === undefined || profile.n >= MIN_STEP_SAMPLES) return;
  const k = PER_METRE[unit];
  const most = profile.length / (profile.closed ? MIN_STEP_SAMPLES : MIN_STEP_SAMPLES - 1);
  throw new ParameterError(
    where, "--step",
    `${brief(step * k)} ${unit} gives ${profile.n} ${profile.n === 1 ? "sample" : "samples"} along a${profile.closed ? " closed" : ""} wire ${brief(profile.length * k)} ${unit} long; ` +
      `use at most ${brief(most * k)} ${unit} (${MIN_STEP_SAMPLES} samples or more)`,
  );
}

/**
 * Runs the profile stage: read the trace, fit, write CSV or JSON (by the `--out` extension)
 * atomically, and print a one-line summary on stderr unless quiet.
 * @throws InputError (bad data), ParameterError (bad option or output path); anything else is a bug.
 */
export async function runProfile(req: ProfileRequest, io: Io, where = WHERE): Promise<ProfileOutcome> {
  await checkOutputPath(req, where);

  const trace = await readTraceFile(req.input, readOptionsOf(req, req.closed, io));

  const fitOptions: { -readonly [K in keyof ProfileOptions]: ProfileOptions[K] } = { bootstrap: req.bootstrap, seed: req.seed };
  if (req.closed !== undefined) fitOptions.closed = req.closed;
  if (req.step !== undefined) fitOptions.step = req.step;
  if (req.coordinateError !== undefined) fitOptions.coordinateError = req.coordinateError;
  const fitted = withOptionNames(where, () => fitProfile(trace, fitOptions));
  const diagnostics = [...trace.diagnostics, ...fitted.diagnostics.filter((d) => !trace.diagnostics.includes(d))];
  const profile: Profile = { ...fitted, diagnostics };

  const outUnit = req.outUnit ?? defaultOutputUnit(trace.source);
  checkStepSamples(where, req.step, profile, outUnit);
  const json = req.out !== "-" && extname(req.out).toLowerCase() === ".json";
  const chunks = json ? profileJsonChunks(profile, { unit: outUnit, seed: req.seed }) : profileCsvChunks(profile, { unit: outUnit, seed: req.seed });
  if (req.out === "-") {
    const decoder = new TextDecoder();
    for (const chunk of chunks) io.stdout(decoder.decode(chunk, { stream: true }));
  } else {
    await writeOutput(req.out, chunks, req.input, where);
  }

  if (!req.quiet) {
    const k = PER_METRE[outUnit];
    const u = outUnit;
    const points = trace.xyz.length / 3;
    const d = profile.diagnostics.length;
    io.stderr(
      `twistline: ${trace.source.file}: ${points} points, length ${brief(profile.length * k)} ${u}, ` +
        `${Number.isNaN(profile.sigma) ? "noise not estimable" : `noise ${brief(profile.sigma * k)} ${u}`}, resolution ${brief(profile.resolution * k)} ${u}, ` +
        `${d} ${d === 1 ? "diagnostic" : "diagnostics"}${d > 0 ? " (in the output header)" : ""}` +
        `${req.out === "-" ? "" : `; wrote ${req.out}`}\n`,
    );
  }
  return { trace, profile, outUnit };
}

/** The accepted inputs, for help texts. */
export const INPUT_HELP =
  "ordered trace (.csv .tsv .txt .xyz .json), tube mesh (.stl .obj .ply), point cloud (.ply without faces, or --format cloud) or SVG path data (.svg)";

/** Help texts of the input options every reading command shares. */
export const HELP = {
  unit: `unit of the input numbers: nm, um, m, A (angstrom) or px (default: the unit the file declares, else ${DEFAULT_INPUT_UNIT})`,
  pixelSize:
    "size of one pixel (a voxel for meshes and clouds; one user unit for SVG), with its unit, e.g. 2.5nm " +
    "(required with --unit px; for SVG it replaces the drawing's own calibration)",
  format:
    `input format: ${[...TRACE_READERS.keys()].join(", ")} (default: from the file extension; ` +
    "cloud: unordered points in .csv .tsv .txt .xyz .json or the vertices of a .ply)",
  wire: "which wire of a file that holds several, from 1 (meshes: largest first; SVG: document order) (default: 1)",
  branches: "meshes: a branched wire is an error, or keep its longest path: error, longest (default: error)",
} as const;

/** Adds `profile` to the program. */
export function addProfileCommand(program: Command, io: Io): void {
  program
    .command("profile")
    .description(
      "fit a centre line to a traced wire and write curvature kappa(s) and torsion tau(s) with 95% bootstrap bands " +
        "(model estimates, not measurements)",
    )
    .argument("<input>", `${INPUT_HELP}, or - for standard input`)
    .requiredOption("--out <file>", "output: a .csv or .json file, or - for CSV on standard output")
    .option("--unit <unit>", HELP.unit)
    .option("--pixel-size <length>", HELP.pixelSize)
    .option("--closed", "fit a closed loop")
    .option("--open", "fit an open wire (default: the file's declaration, else detected from the ends)")
    .option("--bootstrap <n>", `bootstrap replicates for the 95% bands, 0 for none (default: ${DEFAULT_BOOTSTRAP})`)
    .option("--seed <n>", `seed of the bootstrap random stream, 0 to 4294967295 (default: ${DEFAULT_SEED})`)
    .option("--step <length>", "resample at this arc-length step, with its unit, e.g. 5nm (default: one sample per input point)")
    .option("--coordinate-error <length>", "the standard deviation of the coordinate error per coordinate, with its unit, e.g. 0.2A, when known: the noise is then not estimated (default: estimated from the trace)")
    .option("--out-unit <unit>", "length unit of the output, nm, um, m or A; kappa and tau in 1/unit (default: the input unit; for px the unit of the pixel size: nm below 1 um, else um)")
    .option("--format <format>", HELP.format)
    .option("--wire <n>", HELP.wire)
    .option("--branches <policy>", HELP.branches)
    .option("--quiet", "print no summary line")
    .action(async (input, flags) => {
      await runProfile(checkProfileFlags(input, flags), io);
    });
}
