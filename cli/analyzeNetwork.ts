/**
 * `analyze <mesh-or-cloud> --branches split --out <dir>` (and `batch` with --branches split): every
 * branch of a wire network analysed into its own folder (`branch-<k>`, k = branch id, longest first)
 * on the batch's worker threads, with its progress, plus `network.json` (the graph, each branch's
 * folder and outcome), `network.html` (the network page) and `summary.csv` (one row per branch).
 */
import { mkdir, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { ParameterError } from "../src/errors.js";
import { defaultOutputUnit } from "../src/export/outputUnit.js";
import { networkToJson } from "../src/export/networkDocument.js";
import { stageOutputDir } from "../src/export/stageOutputDir.js";
import { summaryToCsv, type SummaryRow } from "../src/export/summaryToCsv.js";
import { TOOL_NAME, TOOL_VERSION } from "../src/export/version.js";
import { fsProblem } from "../src/import/fsProblem.js";
import { zonesOfBranch } from "../src/import/network/junctionZones.js";
import { readNetworkFile } from "../src/import/network/readNetwork.js";
import type { WireNetwork } from "../src/import/network/types.js";
import type { Material } from "../src/physics/types.js";
import type { BranchView } from "../src/report/branchView.js";
import type { PipelineRequest } from "./analyze.js";
import { progressMode, progressReporter, runPool, SUMMARY_NAME } from "./batch.js";
import type { WorkerReply, WorkerSetup, WorkerTask } from "./batchWorker.js";
import { networkReadOptions } from "./centerline.js";
import type { Io } from "./io.js";

/** Names of the network's files in its folder. */
export const NETWORK_JSON = "network.json";
export const NETWORK_PAGE = "network.html";

/** One analysed network: the graph, a summary row and a view per branch. */
export interface NetworkRun {
  readonly network: WireNetwork;
  readonly rows: SummaryRow[];
  readonly views: (BranchView | null)[];
}

/** The branch tasks of a network whose folder is `root` (ids from `firstId`). */
export function branchTasks(net: WireNetwork, input: string, root: string, firstId: number): WorkerTask[] {
  return net.branches.map((b, i) => ({ id: firstId + i, input, name: `branch-${b.id}`, root, trace: b.trace, junctionZones: zonesOfBranch(net, b) }));
}

/** Writes network.json and network.html of a finished network into `dir`. */
export async function writeNetworkFiles(dir: string, net: WireNetwork, rows: readonly SummaryRow[], views: readonly (BranchView | null)[], req: PipelineRequest, where: string): Promise<void> {
  const unit = req.outUnit ?? defaultOutputUnit(net.source);
  const extras = net.branches.map((b, i) => ({
    file: `branch-${b.id}`,
    analysed: rows[i].error === null,
    error: rows[i].error,
    stretches: views[i]?.stretches ?? null,
    pinningSites: views[i]?.hasModel === true ? views[i]?.pinning.length ?? null : null,
    pinningSitesInJunctionZones: views[i]?.hasModel === true ? views[i]?.pinning.filter((p) => p.inZone).length ?? null : null,
  }));
  const { buildNetworkPage } = await import("../src/report/networkReport.js");
  const page = buildNetworkPage(net, net.branches.map((b, i) => ({ folder: `branch-${b.id}`, view: views[i], error: rows[i].error })), {
    unit,
    title: `Wire network: ${net.source.file}`,
    tool: `${TOOL_NAME} ${TOOL_VERSION}`,
  });
  for (const [name, text] of [[NETWORK_JSON, networkToJson(net, unit, extras)], [NETWORK_PAGE, page]] as const) {
    await writeFile(join(dir, name), text).catch((e: unknown) => {
      const problem = fsProblem(e);
      if (problem === null) throw e;
      throw new ParameterError(where, "--out", `cannot write ${name}: ${problem}`);
    });
  }
}

/**
 * Runs analyze on a network: stages `out` (refused when it exists and is not empty, unless
 * --force), splits the input, analyses every branch on `jobs` worker threads (progress on stderr
 * when it is a terminal or under CI), writes network.json, network.html and summary.csv, and moves
 * the folder into place. A branch that fails gets its error in summary.csv and network.json; the
 * others are still written.
 */
export async function runNetworkAnalysis(
  input: string,
  out: string,
  req: PipelineRequest,
  options: { jobs: number; ci: string | undefined; where: string },
  io: Io,
): Promise<NetworkRun> {
  const staged = await stageOutputDir(out, { force: req.force, protect: [input, ...(req.materialFile !== null ? [req.materialFile] : [])], where: options.where });
  try {
    const net = await readNetworkFile(input, networkReadOptions(req.inputs));
    const [{ readMaterialFile }, { viewerScript }] = await Promise.all([import("./wireJob.js"), import("../src/report/viewerScript.js")]);
    const material: Material | null = req.materialFile !== null ? await readMaterialFile(req.materialFile) : null;
    const setup: WorkerSetup = { twistlineBatch: true, viewerJs: await viewerScript(), material, request: req, where: options.where };
    const tasks = branchTasks(net, input, staged.path, 0);
    const replies: WorkerReply[] = [];
    const progress = progressReporter(req.quiet ? "none" : progressMode(io.stderrIsTTY, options.ci), tasks.length, io);
    await runPool(tasks, setup, options.jobs, (r) => {
      replies.push(r);
      progress.tick(replies.length, tasks[r.id].name);
    });
    progress.end();
    replies.sort((a, b) => a.id - b.id);
    const rows = replies.flatMap((r) => r.rows);
    const views = replies.map((r) => r.view ?? null);
    await writeNetworkFiles(staged.path, net, rows, views, req, options.where);
    await writeFile(join(staged.path, SUMMARY_NAME), summaryToCsv(rows)).catch((e: unknown) => {
      const problem = fsProblem(e);
      if (problem === null) throw e;
      throw new ParameterError(options.where, "--out", `cannot write ${SUMMARY_NAME}: ${problem}`);
    });
    await staged.commit();
    return { network: net, rows, views };
  } catch (e) {
    await staged.abort();
    throw e;
  }
}

/** Makes a network's folder inside a batch folder. */
export async function makeNetworkFolder(path: string, where: string): Promise<void> {
  await mkdir(path).catch((e: unknown) => {
    const problem = fsProblem(e);
    if (problem === null) throw e;
    throw new ParameterError(where, "--out", `cannot make the folder ${path}: ${problem}`);
  });
}

/**
 * `batch --branches split`: every input is split into a network and analysed into its own folder
 * (named as batch names wire folders), which holds branch-<k> folders, network.json and
 * network.html; one summary.csv at the top with a row per branch (`<folder>/branch-<k>`). A file
 * that cannot be split gets one error row; the batch goes on.
 */
export async function runNetworkBatch(
  files: readonly string[],
  out: string,
  req: PipelineRequest,
  options: { jobs: number; ci: string | undefined; where: string },
  io: Io,
): Promise<SummaryRow[]> {
  const staged = await stageOutputDir(out, { force: req.force, protect: [...files, ...(req.materialFile !== null ? [req.materialFile] : [])], where: options.where });
  try {
    const { folderNames } = await import("./batch.js");
    const { errorLine } = await import("./batchWorker.js");
    const [{ readMaterialFile }, { viewerScript }] = await Promise.all([import("./wireJob.js"), import("../src/report/viewerScript.js")]);
    const material: Material | null = req.materialFile !== null ? await readMaterialFile(req.materialFile) : null;
    const setup: WorkerSetup = { twistlineBatch: true, viewerJs: await viewerScript(), material, request: req, where: options.where };
    const names = folderNames(files);
    const nets: { name: string; net: WireNetwork | null; first: number; error: SummaryRow | null }[] = [];
    const tasks: WorkerTask[] = [];
    for (let f = 0; f < files.length; f++) {
      const t0 = performance.now();
      try {
        const net = await readNetworkFile(files[f], networkReadOptions(req.inputs));
        const dir = join(staged.path, names[f]);
        await makeNetworkFolder(dir, options.where);
        nets.push({ name: names[f], net, first: tasks.length, error: null });
        tasks.push(...branchTasks(net, files[f], dir, tasks.length));
      } catch (e) {
        nets.push({ name: names[f], net: null, first: tasks.length, error: { wire: names[f], file: files[f], summary: null, error: errorLine(e), seconds: (performance.now() - t0) / 1000 } });
      }
    }
    const replies: WorkerReply[] = [];
    const progress = progressReporter(req.quiet ? "none" : progressMode(io.stderrIsTTY, options.ci), Math.max(1, tasks.length), io);
    await runPool(tasks, setup, options.jobs, (r) => {
      replies.push(r);
      progress.tick(replies.length, `${tasks[r.id].input} ${tasks[r.id].name}`);
    });
    progress.end();
    replies.sort((a, b) => a.id - b.id);
    const rows: SummaryRow[] = [];
    for (const n of nets) {
      if (n.net === null) {
        rows.push(n.error as SummaryRow);
        continue;
      }
      const mine = replies.slice(n.first, n.first + n.net.branches.length);
      const own = mine.flatMap((r) => r.rows);
      await writeNetworkFiles(join(staged.path, n.name), n.net, own, mine.map((r) => r.view ?? null), req, options.where);
      rows.push(...own.map((r) => ({ ...r, wire: `${n.name}/${r.wire}` })));
    }
    await writeFile(join(staged.path, SUMMARY_NAME), summaryToCsv(rows)).catch((e: unknown) => {
      const problem = fsProblem(e);
      if (problem === null) throw e;
      throw new ParameterError(options.where, "--out", `cannot write ${SUMMARY_NAME}: ${problem}`);
    });
    await staged.commit();
    return rows;
  } catch (e) {
    await staged.abort();
    throw e;
  }
}
