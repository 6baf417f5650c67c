/**
 * `twistline demo [--out <dir>]`: `analyze` on the invented demo wires of fixtures/demo (a coil
 * with a pitch defect, a ring, a meander with a sharp bend) with the invented demo material, on
 * the batch's worker threads; prints a short table.
 */
import { existsSync } from "node:fs";
import { readdir } from "node:fs/promises";
import { availableParallelism } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import type { Command } from "@commander-js/extra-typings";
import { ParameterError } from "../src/errors.js";
import type { SummaryRow } from "../src/export/summaryToCsv.js";
import { summaryToCsv } from "../src/export/summaryToCsv.js";
import { writeFileAtomic } from "../src/export/writeFileAtomic.js";
import { checkPipelineFlags, PIPELINE_HELP, runAnalyze } from "./analyze.js";
import { reportFailures, runBatch, SUMMARY_NAME } from "./batch.js";
import type { Io } from "./io.js";
import { brief } from "./options.js";

/** Output folder of `demo` when --out is not given (relative to the working directory). */
export const DEFAULT_DEMO_DIR = "twistline-demo";
/** The invented demo material (a soft ferromagnet), in fixtures/demo. */
export const DEMO_MATERIAL = "material-invented-soft-ferro.json";
const WHERE = "demo";
/** The invented antiferromagnetic coil and its invented material (fixtures/demo/afm), analysed into its own folder. */
export const DEMO_AFM = { wire: "afm/afm-coil.csv", material: "afm/material-invented-afm.json", folder: "afm-coil" } as const;

/** The folder of demo wires: fixtures/demo next to cli/ (from source) or next to dist/ (built). */
export function demoDataDir(): string {
  for (const rel of ["../fixtures/demo/", "../../fixtures/demo/"]) {
    const dir = fileURLToPath(new URL(rel, import.meta.url));
    if (existsSync(join(dir, "make.ts"))) return dir;
  }
  throw new Error("demo: the demo wires (fixtures/demo) are not installed with this copy of twistline");
}

/** The demo wires, sorted by name: one .csv file each. */
export async function demoWires(dir = demoDataDir()): Promise<string[]> {
  const names = (await readdir(dir)).filter((f) => f.endsWith(".csv")).sort();
  return names.map((f) => join(dir, f));
}

function table(rows: readonly (readonly string[])[]): string {
  const widths = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  return rows.map((r) => r.map((cell, c) => (c === 0 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join("  ").trimEnd()).join("\n");
}

/** The demo's stdout table: one line per wire. */
export function demoTable(rows: readonly SummaryRow[]): string {
  const show = (v: number | null | undefined): string => (v === null || v === undefined || !Number.isFinite(v) ? "n/a" : brief(v));
  const out: string[][] = [["wire", "unit", "points", "length", "mean kappa", "max kappa", "mean |tau|", "stretches", "pinning", "deepest kT", "metastable"]];
  for (const r of rows) {
    const s = r.summary;
    if (s === null) { out.push([r.wire, "error", "", "", "", "", "", "", "", "", ""]); continue; }
    const st = s.stretches;
    const kinds = [[st.straight, "S"], [st.arc, "A"], [st.helix, "H"], [st.irregular, "I"]].filter(([c]) => Number(c) > 0).map(([c, l]) => `${c}${l}`).join(" ");
    out.push([
      r.wire, s.unit, String(s.points), show(s.length), show(s.kappaMean.value), show(s.kappaMax.value), show(s.tauAbsMean.value),
      kinds, show(s.pinningSites), show(s.deepestPinKT), show(s.metastableLength),
    ]);
  }
  return table(out);
}

/** Runs the demo; returns the summary rows (coil, meander, ring, then afm-coil). */
export async function runDemo(outDir: string, force: boolean, quiet: boolean, io: Io, jobs = availableParallelism()): Promise<SummaryRow[]> {
  const dir = demoDataDir();
  const wires = await demoWires(dir);
  const req = checkPipelineFlags(WHERE, wires[0], { material: join(dir, DEMO_MATERIAL), ...(force ? { force: true as const } : {}), ...(quiet ? { quiet: true as const } : {}) });
  const t0 = performance.now();
  const rows = await runBatch(wires, outDir, req, { jobs, ci: io.ci, where: WHERE }, io);
  // the invented antiferromagnetic coil, with its own invented material, into its own folder; then the summary with all rows
  const afm = join(dir, DEMO_AFM.wire);
  const ta = performance.now();
  const afmResult = await runAnalyze(afm, join(outDir, DEMO_AFM.folder), { ...checkPipelineFlags(WHERE, afm, { material: join(dir, DEMO_AFM.material) }), quiet: true }, io);
  rows.push({ wire: DEMO_AFM.folder, file: afm, summary: afmResult.summary, error: null, seconds: (performance.now() - ta) / 1000 });
  await writeFileAtomic(join(outDir, SUMMARY_NAME), summaryToCsv(rows));
  const seconds = (performance.now() - t0) / 1000;
  io.stdout(
    "invented demo wires and invented demo materials (a soft ferromagnet; an antiferromagnet for afm-coil): model estimates, not measurements\n" +
      "(length in unit, kappa and tau in 1/unit; stretches S straight, A arc, H helix, I irregular; deepest pinning site in k_B T at 300 K; metastable length in unit)\n" +
      `${demoTable(rows)}\n`,
  );
  const ok = rows.filter((r) => r.error === null);
  if (!quiet && ok.length > 0) {
    const first = ok.find((r) => r.wire === "coil") ?? ok[0];
    const others = ok.length > 1 ? " (and the others)" : "";
    const count = ok.length === rows.length ? `${rows.length}` : `${ok.length} of ${rows.length}`;
    io.stderr(`twistline: demo: ${count} wires in ${seconds.toFixed(1)} s; open ${join(outDir, first.wire, "report.html")}${others}; table in ${join(outDir, SUMMARY_NAME)}\n`);
  }
  reportFailures(rows, outDir, true, io, WHERE);
  return rows;
}

/** Adds `demo` to the program. */
export function addDemoCommand(program: Command, io: Io): void {
  program
    .command("demo")
    .description(
      "analyze the invented demo wires (a coil with a pitch defect, a ring, a meander with a sharp bend) with an invented soft-ferromagnet " +
        "material, and an invented antiferromagnetic coil with periodic and homogeneous stretches: one folder per wire with profile, model, chain, mesh and report, and a short table",
    )
    .option("--out <dir>", `output folder (default: ${DEFAULT_DEMO_DIR})`)
    .option("--force", PIPELINE_HELP.force)
    .option("--quiet", "print no summary line on stderr")
    .action(async (flags) => {
      if (flags.out === "") throw new ParameterError(WHERE, "--out", "must not be empty");
      await runDemo(flags.out ?? DEFAULT_DEMO_DIR, flags.force === true, flags.quiet === true, io);
    });
}
