/**
 * Worker thread of `twistline batch`: receives one file at a time, analyses every wire in it into
 * its own folder, and posts back one summary row per wire. Errors of a file become rows, never a
 * crash of the worker, so one bad file does not stop the batch.
 */
import { mkdir, rm } from "node:fs/promises";
import { join } from "node:path";
import { parentPort, workerData } from "node:worker_threads";
import { InputError, ParameterError } from "../src/errors.js";
import type { SummaryRow } from "../src/export/summaryToCsv.js";
import { fsProblem } from "../src/import/fsProblem.js";
import { readTracesFile } from "../src/import/readTrace.js";
import type { Material } from "../src/physics/types.js";
import type { Trace } from "../src/types.js";
import type { JunctionZone } from "../src/import/network/junctionZones.js";
import { branchView, type BranchView } from "../src/report/branchView.js";
import { jobOf, type PipelineRequest } from "./analyze.js";
import { messageLine } from "./options.js";
import { runWireJob } from "./wireJob.js";

/** What the batch hands every worker once. */
export interface WorkerSetup {
  /** Marks a batch worker (so importing this module elsewhere never starts listening). */
  readonly twistlineBatch: true;
  readonly viewerJs: string;
  readonly material: Material | null;
  readonly request: PipelineRequest;
  /** Command name for messages ("batch" or "demo"). */
  readonly where?: string;
}

/** One file to do: read it, then write its wires under `root`/`name` (or `name-w<k>` for several wires). */
export interface WorkerTask {
  readonly id: number;
  readonly input: string;
  readonly name: string;
  readonly root: string;
  /** A branch of a wire network, already read (analyze/batch with --branches split): analysed as is, no file read. */
  readonly trace?: Trace;
  /** The zones of the junctions at the branch's ends. */
  readonly junctionZones?: readonly JunctionZone[];
}

/** The reply to a task. */
export interface WorkerReply {
  readonly id: number;
  readonly rows: SummaryRow[];
  /** For a network branch: what the network page shows of it (null when it failed). */
  readonly view?: BranchView | null;
}

/** One-line message of an error; bugs are marked as such (the batch goes on either way). */
export function errorLine(e: unknown): string {
  if (e instanceof InputError || e instanceof ParameterError) return messageLine(e.message);
  const problem = fsProblem(e);
  if (problem !== null) return `cannot write the output: ${problem}`;
  return `internal error (a bug; please report it): ${e instanceof Error ? e.message : String(e)}`.replace(/[\r\n]+/g, " ");
}

/** Runs one task (exported for in-process use and tests). */
export async function runTask(task: WorkerTask, setup: WorkerSetup): Promise<WorkerReply> {
  const t0 = performance.now();
  const noIo = { stdout: () => undefined, stderr: () => undefined };
  let traces: Trace[];
  if (task.trace !== undefined) return runBranchTask(task, task.trace, setup);
  try {
    const { wire: _ignored, ...read } = jobOf(setup.request, task.input, setup.material, "", noIo).readOptions;
    traces = await readTracesFile(task.input, read);
  } catch (e) {
    return { id: task.id, rows: [{ wire: task.name, file: task.input, summary: null, error: errorLine(e), seconds: (performance.now() - t0) / 1000 }] };
  }
  const rows: SummaryRow[] = [];
  for (let w = 0; w < traces.length; ++w) {
    const t1 = performance.now();
    const name = traces.length === 1 ? task.name : `${task.name}-w${w + 1}`;
    const dir = join(task.root, name);
    try {
      await mkdir(dir).catch((e: unknown) => {
        const problem = fsProblem(e);
        if (problem === null) throw e;
        throw new ParameterError(setup.where ?? "batch", "--out", `cannot make the folder ${name}: ${problem}`);
      });
      const trace = traces.length === 1 ? traces[0] : { ...traces[w], diagnostics: [`file has ${traces.length} wires; this is wire ${w + 1}`, ...traces[w].diagnostics] };
      const job = { ...jobOf(setup.request, task.input, setup.material, dir, noIo), trace, where: setup.where ?? "batch" };
      const r = await runWireJob(job, setup.viewerJs);
      rows.push({ wire: name, file: task.input, summary: r.summary, error: null, seconds: (performance.now() - t1) / 1000 });
    } catch (e) {
      await rm(dir, { recursive: true, force: true });
      rows.push({ wire: name, file: task.input, summary: null, error: errorLine(e), seconds: (performance.now() - t1) / 1000 });
    }
  }
  return { id: task.id, rows };
}

/** One network branch into `root`/`name`, with its junction zones flagged; the reply carries its view. */
async function runBranchTask(task: WorkerTask, trace: Trace, setup: WorkerSetup): Promise<WorkerReply> {
  const t0 = performance.now();
  const noIo = { stdout: () => undefined, stderr: () => undefined };
  const dir = join(task.root, task.name);
  try {
    await mkdir(dir).catch((e: unknown) => {
      const problem = fsProblem(e);
      if (problem === null) throw e;
      throw new ParameterError(setup.where ?? "analyze", "--out", `cannot make the folder ${task.name}: ${problem}`);
    });
    const job = {
      ...jobOf(setup.request, task.input, setup.material, dir, noIo),
      trace,
      where: setup.where ?? "analyze",
      ...(task.junctionZones !== undefined ? { junctionZones: task.junctionZones } : {}),
    };
    const r = await runWireJob(job, setup.viewerJs);
    const view = branchView(r.analysis.profile, r.analysis.segments.length, r.analysis.model?.pinning ?? null);
    return { id: task.id, rows: [{ wire: task.name, file: task.input, summary: r.summary, error: null, seconds: (performance.now() - t0) / 1000 }], view };
  } catch (e) {
    await rm(dir, { recursive: true, force: true });
    return { id: task.id, rows: [{ wire: task.name, file: task.input, summary: null, error: errorLine(e), seconds: (performance.now() - t0) / 1000 }], view: null };
  }
}

const setupData = workerData as Partial<WorkerSetup> | null;
if (parentPort !== null && setupData?.twistlineBatch === true) {
  const port = parentPort;
  const setup = setupData as WorkerSetup;
  port.on("message", (task: WorkerTask) => {
    void runTask(task, setup).then((reply) => port.postMessage(reply));
  });
}
