/**
 * `twistline batch <files, folders or globs...> --out <dir>`: many wires on worker threads, one
 * folder per wire and one summary.csv; a bad file becomes a row with its error and the batch goes on.
 */
import { readdir, stat, writeFile } from "node:fs/promises";
import { availableParallelism } from "node:os";
import { basename, dirname, extname, join } from "node:path";
import { createRequire } from "node:module";
import { pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import type { Command } from "@commander-js/extra-typings";
import { InputError, ParameterError } from "../src/errors.js";
import { OWNER_MARKER, stageOutputDir } from "../src/export/stageOutputDir.js";
import { summaryToCsv, type SummaryRow } from "../src/export/summaryToCsv.js";
import { fsProblem } from "../src/import/fsProblem.js";
import { TRACE_READERS } from "../src/import/traceReaders.js";
import type { Material } from "../src/physics/types.js";
import { checkPipelineFlags, PIPELINE_HELP, type PipelineFlags, type PipelineRequest } from "./analyze.js";
import type { WorkerReply, WorkerSetup, WorkerTask } from "./batchWorker.js";
import type { Io } from "./io.js";
import { parseCountOption } from "./options.js";
import { DEFAULT_BOOTSTRAP, DEFAULT_SEED, HELP } from "./profile.js";

const WHERE = "batch";

/** Name of the summary table in the batch folder. */
export const SUMMARY_NAME = "summary.csv";

/** Extensions `batch` picks up from a folder. */
export function traceExtensions(): Set<string> {
  return new Set([...TRACE_READERS.values()].flatMap((r) => r.extensions.map((e) => e.toLowerCase())));
}

function globToRegExp(pattern: string): RegExp {
  const body = pattern.replace(/[.+^${}()|[\]\\]/g, "\\$&").replace(/\*/g, "[^/]*").replace(/\?/g, "[^/]");
  return new RegExp(`^${body}$`);
}

/**
 * The input files of a batch, in a stable order: a file as given; a folder's files whose extension
 * a reader claims (not recursive, sorted by name); a pattern with * or ? in its last part matched
 * against its folder's files (for shells that do not expand it). Duplicates are dropped.
 * @throws {ParameterError} a path that does not exist, or no input files at all.
 */
export async function expandInputs(args: readonly string[]): Promise<string[]> {
  const exts = traceExtensions();
  const out: string[] = [];
  const seen = new Set<string>();
  const add = (p: string): void => {
    if (!seen.has(p)) { seen.add(p); out.push(p); }
  };
  for (const arg of args) {
    if (arg === "-") throw new ParameterError(WHERE, "<inputs>", "standard input is not accepted by batch; name files or folders");
    const base = basename(arg);
    if (/[*?]/.test(base) && !/[*?]/.test(dirname(arg))) {
      const dir = dirname(arg);
      const re = globToRegExp(base);
      const names = await readdir(dir).catch(() => null);
      if (names === null) throw new ParameterError(WHERE, "<inputs>", `folder ${JSON.stringify(dir)} of the pattern ${JSON.stringify(arg)} does not exist`);
      for (const n of names.filter((x) => re.test(x)).sort()) {
        const info = await stat(join(dir, n)).catch(() => null);
        if (info?.isFile()) add(join(dir, n));
      }
      continue;
    }
    const info = await stat(arg).catch((e: unknown) => {
      const problem = fsProblem(e);
      if (problem === null || (e as { code?: unknown }).code === "ENOENT") return null;
      throw new ParameterError(WHERE, "<inputs>", `${JSON.stringify(arg)}: ${problem}`);
    });
    if (info === null) throw new ParameterError(WHERE, "<inputs>", `${JSON.stringify(arg)} does not exist`);
    if (info.isDirectory()) {
      for (const n of (await readdir(arg)).sort()) {
        if (!exts.has(extname(n).toLowerCase())) continue;
        const f = join(arg, n);
        if ((await stat(f).catch(() => null))?.isFile()) add(f);
      }
    } else {
      add(arg);
    }
  }
  if (out.length === 0) throw new ParameterError(WHERE, "<inputs>", `no input files found (extensions read: ${[...exts].join(" ")})`);
  return out;
}

/** Bytes kept of a file's stem for its folder name: room for "-<n>" and "-w<k>" within 255 bytes. */
const MAX_STEM_BYTES = 200;

/**
 * Folder names for the inputs, all reserved before any folder is made, so no two wires can ever
 * write into one folder: the file name without extension, made safe (and cut to 200 bytes), with
 * -2, -3, ... where needed. A file holding several wires writes `<name>-w1`, `<name>-w2`, ..., so
 * each name also reserves every `<name>-w<k>`; the batch's own `summary.csv` and marker are
 * reserved too. Names are compared without case (case-insensitive file systems).
 * @example folderNames(["a.csv", "a.tsv", "a-2.csv", "b.svg", "b-w1.csv"]) // ["a", "a-2", "a-2-2", "b", "b-w1-2"]
 */
export function folderNames(files: readonly string[]): string[] {
  const taken: string[] = [SUMMARY_NAME.toLowerCase(), OWNER_MARKER.toLowerCase()];
  const clashes = (name: string): boolean => {
    const n = name.toLowerCase();
    return taken.some((t) => t === n || (n.startsWith(`${t}-w`) && /^\d+$/.test(n.slice(t.length + 2))) || (t.startsWith(`${n}-w`) && /^\d+$/.test(t.slice(n.length + 2))));
  };
  return files.map((f) => {
    let stem = basename(f, extname(f)).replace(/[^A-Za-z0-9._-]+/g, "_").replace(/^\.+/, "_") || "wire";
    if (stem.length > MAX_STEM_BYTES) stem = stem.slice(0, MAX_STEM_BYTES); // ASCII after the replacement above
    let name = stem;
    for (let k = 2; clashes(name); ++k) name = `${stem}-${k}`;
    taken.push(name.toLowerCase());
    return name;
  });
}

/** How progress is shown: a redrawn bar (stderr is a terminal), plain periodic lines (CI), or nothing. */
export type ProgressMode = "bar" | "lines" | "none";

export function progressMode(stderrIsTTY: boolean | undefined, ci: string | undefined): ProgressMode {
  if (stderrIsTTY === true) return "bar";
  return ci !== undefined && ci !== "" && ci !== "0" && ci.toLowerCase() !== "false" ? "lines" : "none";
}

/** Seconds between plain progress lines under CI. */
export const LINE_INTERVAL_S = 5;

/** A progress reporter on stderr (never stdout). */
export function progressReporter(mode: ProgressMode, total: number, io: Io, now: () => number = () => performance.now()): { tick(done: number, label: string): void; end(): void } {
  const t0 = now();
  let last = t0;
  let drawn = false;
  return {
    tick(done, label) {
      if (mode === "bar") {
        const width = 24, fill = Math.round((done / total) * width);
        const name = label.length > 30 ? `${label.slice(0, 29)}\u2026` : label;
        io.stderr(`\r[${"#".repeat(fill)}${"-".repeat(width - fill)}] ${done}/${total} ${name}\x1b[K`);
        drawn = true;
      } else if (mode === "lines") {
        const t = now();
        if (done === total || (t - last) / 1000 >= LINE_INTERVAL_S) {
          last = t;
          io.stderr(`twistline: batch: ${done}/${total} files done (${((t - t0) / 1000).toFixed(0)} s)\n`);
        }
      }
    },
    end() {
      if (drawn) io.stderr("\n");
    },
  };
}

/**
 * How to start a worker: from dist, the compiled batchWorker.js; from source (tsx, vitest), a small
 * bootstrap that loads tsx's loader inside the worker and then imports batchWorker.ts (Node 20 does
 * not apply `--import tsx` in a worker's execArgv to the worker's own entry file).
 */
function workerEntry(): { entry: URL | string; eval: boolean } {
  if (!import.meta.url.endsWith(".ts")) return { entry: new URL("./batchWorker.js", import.meta.url), eval: false };
  // tsx's ESM API (register() installs its hooks in the calling thread); its package maps only the .cjs for require
  const api = pathToFileURL(createRequire(import.meta.url).resolve("tsx/esm/api").replace(/\.cjs$/, ".mjs")).href;
  const worker = new URL("./batchWorker.ts", import.meta.url).href;
  return { entry: `import(${JSON.stringify(api)}).then((m) => { m.register(); return import(${JSON.stringify(worker)}); });`, eval: true };
}

/**
 * Runs `tasks` on `jobs` worker threads (in-process when jobs is 1), calling `onReply` as each file
 * finishes. A worker that dies takes only its current file with it: that file gets an error row
 * and a fresh worker takes the rest.
 */
export async function runPool(tasks: readonly WorkerTask[], setup: WorkerSetup, jobs: number, onReply: (r: WorkerReply) => void): Promise<void> {
  if (jobs <= 1 || tasks.length <= 1) {
    const { runTask } = await import("./batchWorker.js");
    for (const t of tasks) onReply(await runTask(t, setup));
    return;
  }
  const entry = workerEntry();
  let next = 0;
  const runWorker = async (): Promise<void> => {
    while (next < tasks.length) {
      const worker = new Worker(entry.entry, { workerData: setup, eval: entry.eval, stdout: true, stderr: true });
      worker.stdout.resume();
      worker.stderr.resume();
      try {
        for (;;) {
          if (next >= tasks.length) return;
          const task = tasks[next++];
          const reply = await new Promise<WorkerReply>((resolve) => {
            const onMessage = (r: WorkerReply): void => { cleanup(); resolve(r); };
            const onError = (e: Error): void => {
              cleanup();
              resolve({ id: task.id, rows: [{ wire: task.name, file: task.input, summary: null, error: `internal error (worker failed): ${e.message}`.replace(/[\r\n]+/g, " "), seconds: 0 }] });
            };
            const onExit = (code: number): void => onError(new Error(`worker exited with code ${code}`));
            const cleanup = (): void => { worker.off("message", onMessage); worker.off("error", onError); worker.off("exit", onExit); };
            worker.on("message", onMessage);
            worker.on("error", onError);
            worker.on("exit", onExit);
            worker.postMessage(task);
          });
          onReply(reply);
          if (reply.rows.some((r) => r.error?.startsWith("internal error (worker failed)"))) break; // start a fresh worker
        }
      } finally {
        await worker.terminate();
      }
    }
  };
  await Promise.all(Array.from({ length: Math.min(jobs, tasks.length) }, runWorker));
}

/** Options of {@link runBatch} beyond the pipeline request. */
export interface BatchOptions {
  readonly jobs: number;
  /** The value of the CI environment variable (progress lines when stderr is not a terminal). */
  readonly ci: string | undefined;
  /** Command name in messages (default "batch"). */
  readonly where?: string;
}

/**
 * Runs a batch: expands the inputs, stages the output folder (refused when it exists and is not
 * empty, unless --force), reads the material once, runs every file on the worker pool, writes
 * summary.csv and moves the folder into place. Returns the rows in input order.
 */
export async function runBatch(files: readonly string[], out: string, req: PipelineRequest, options: BatchOptions, io: Io, material?: Material | null): Promise<SummaryRow[]> {
  const staged = await stageOutputDir(out, { force: req.force, protect: [...files, ...(req.materialFile !== null ? [req.materialFile] : [])], where: options.where ?? WHERE });
  try {
    const [{ readMaterialFile }, { viewerScript }] = await Promise.all([import("./wireJob.js"), import("../src/report/viewerScript.js")]);
    const mat = material !== undefined ? material : req.materialFile !== null ? await readMaterialFile(req.materialFile) : null;
    const setup: WorkerSetup = { twistlineBatch: true, viewerJs: await viewerScript(), material: mat, request: req, where: options.where ?? WHERE };
    const names = folderNames(files);
    const tasks: WorkerTask[] = files.map((input, id) => ({ id, input, name: names[id], root: staged.path }));
    const replies: WorkerReply[] = [];
    const progress = progressReporter(req.quiet ? "none" : progressMode(io.stderrIsTTY, options.ci), tasks.length, io);
    await runPool(tasks, setup, options.jobs, (r) => {
      replies.push(r);
      progress.tick(replies.length, tasks[r.id].input);
    });
    progress.end();
    const rows = replies.sort((a, b) => a.id - b.id).flatMap((r) => r.rows);
    const where = options.where ?? WHERE;
    await writeFile(join(staged.path, SUMMARY_NAME), summaryToCsv(rows)).catch((e: unknown) => {
      const problem = fsProblem(e);
      if (problem === null) throw e;
      throw new ParameterError(where, "--out", `cannot write ${SUMMARY_NAME}: ${problem}; nothing was written to ${JSON.stringify(out)}`);
    });
    await staged.commit();
    return rows;
  } catch (e) {
    await staged.abort();
    throw e;
  }
}

/**
 * Throws (exit code 1) when wires failed, after everything was written; else prints a summary line.
 * When no wire was analysed the line says so: only summary.csv (with the errors) was written.
 */
export function reportFailures(rows: readonly SummaryRow[], out: string, quiet: boolean, io: Io, where = WHERE): void {
  const failed = rows.filter((r) => r.error !== null);
  const done = rows.length - failed.length;
  if (!quiet) {
    for (const r of failed) io.stderr(`twistline: ${where}: ${r.wire}: ${r.error}\n`);
    io.stderr(
      done > 0
        ? `twistline: ${where}: ${done} of ${rows.length} wires analysed; wrote ${join(out, SUMMARY_NAME)} and one folder per analysed wire under ${out}\n`
        : `twistline: ${where}: no wire was analysed; wrote only ${join(out, SUMMARY_NAME)} with the errors\n`,
    );
  }
  if (failed.length > 0) {
    const rest = done > 0 ? "the others were written" : "no wire folder was written";
    throw new InputError(join(out, SUMMARY_NAME), null, "wires", `${failed.length} of ${rows.length} failed (see the error column); ${rest}`);
  }
}

/** Adds `batch` to the program. */
export function addBatchCommand(program: Command, io: Io): void {
  program
    .command("batch")
    .description(
      "analyze many wires on worker threads: one folder per wire (as analyze writes) and one summary.csv; " +
        "a bad file is reported in the summary and does not stop the batch (exit code 1 if any failed)",
    )
    .argument("<inputs...>", "input files, folders (their trace, mesh, cloud and SVG files) or patterns such as 'traces/*.csv'")
    .requiredOption("--out <dir>", "output folder (created; refused if it exists and is not empty, unless --force)")
    .option("--material <file>", PIPELINE_HELP.material)
    .option("--jobs <n>", `worker threads (default: the number of cores, here ${availableParallelism()})`)
    .option("--spacing <length>", PIPELINE_HELP.spacing)
    .option("--mesh <format>", PIPELINE_HELP.mesh)
    .option("--radius <length>", PIPELINE_HELP.radius)
    .option("--unit <unit>", HELP.unit)
    .option("--pixel-size <length>", HELP.pixelSize)
    .option("--closed", "fit closed loops")
    .option("--open", "fit open wires (default: each file's declaration, else detected)")
    .option("--bootstrap <n>", `bootstrap replicates for the 95% bands (default: ${DEFAULT_BOOTSTRAP})`)
    .option("--seed <n>", `seed of the bootstrap and the model's draws (default: ${DEFAULT_SEED})`)
    .option("--step <length>", "profile sampling step, with its unit (default: one sample per input point)")
    .option("--coordinate-error <length>", "the standard deviation of the coordinate error per coordinate, with its unit, e.g. 0.2A, when known: the noise is then not estimated (default: estimated from the trace)")
    .option("--out-unit <unit>", "length unit of every output (default: each input's unit; for px the unit of the pixel size: nm below 1 um, else um)")
    .option("--format <format>", HELP.format)
    .option("--branches <policy>", `${HELP.branches}; or split: every input (a mesh, or a cloud with --format cloud) becomes a folder of its network, one branch-<k> folder per branch with network.json and network.html`)
    .option("--force", PIPELINE_HELP.force)
    .option("--quiet", "no progress and no summary line")
    .action(async (inputs, flags: PipelineFlags & { out: string; jobs?: string }) => {
      const jobs = flags.jobs === undefined ? availableParallelism() : parseCountOption(WHERE, "--jobs", flags.jobs);
      if (jobs < 1) throw new ParameterError(WHERE, "--jobs", `must be at least 1 (got ${jobs})`);
      const files = await expandInputs(inputs);
      if (flags.branches === "split") {
        const { branches: _policy, ...rest } = flags;
        const req = checkPipelineFlags(WHERE, files[0], rest);
        const { runNetworkBatch } = await import("./analyzeNetwork.js");
        const rows = await runNetworkBatch(files, flags.out, req, { jobs, ci: io.ci, where: WHERE }, io);
        reportFailures(rows, flags.out, req.quiet, io);
        return;
      }
      const req = checkPipelineFlags(WHERE, files[0], flags);
      const rows = await runBatch(files, flags.out, req, { jobs, ci: io.ci }, io);
      reportFailures(rows, flags.out, req.quiet, io);
    });
}
