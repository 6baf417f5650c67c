/** `twistline demo [--out <dir>]`: the profile stage on the invented demo wires of fixtures/demo. */
import { existsSync } from "node:fs";
import { mkdir, readdir, stat } from "node:fs/promises";
import { basename, join } from "node:path";
import { fileURLToPath } from "node:url";
import type { Command } from "@commander-js/extra-typings";
import { max, mean } from "d3-array";
import { ParameterError } from "../src/errors.js";
import { PER_METRE } from "../src/types.js";
import type { Io } from "./io.js";
import { brief } from "./options.js";
import { DEFAULT_BOOTSTRAP, DEFAULT_SEED, runProfile, type ProfileOutcome } from "./profile.js";

/** Output folder of `demo` when --out is not given (relative to the working directory). */
export const DEFAULT_DEMO_DIR = "twistline-demo";
const WHERE = "demo";

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

async function checkOutDir(dir: string, force: boolean): Promise<void> {
  const info = await stat(dir).catch(() => null);
  if (info === null) return;
  if (!info.isDirectory()) throw new ParameterError(WHERE, "--out", `${JSON.stringify(dir)} exists and is not a folder`);
  if (!force && (await readdir(dir)).length > 0) {
    throw new ParameterError(WHERE, "--out", `folder ${JSON.stringify(dir)} exists and is not empty (add --force to write into it)`);
  }
}

function table(rows: readonly (readonly string[])[]): string {
  const widths = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  return rows.map((r) => r.map((cell, c) => (c === 0 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join("  ").trimEnd()).join("\n");
}

function row(name: string, o: ProfileOutcome): string[] {
  const k = PER_METRE[o.outUnit];
  const p = o.profile;
  // d3-array mean/max skip NaN (tau is NaN where undefined).
  const meanKappa = mean(p.kappa) ?? NaN;
  const maxKappa = max(p.kappa) ?? NaN;
  const meanAbsTau = mean(p.tau, Math.abs) ?? NaN;
  const show = (v: number): string => (Number.isFinite(v) ? brief(v) : "n/a");
  return [
    name, o.outUnit, String(o.trace.xyz.length / 3), show(p.length * k),
    show(meanKappa / k), show(maxKappa / k), show(meanAbsTau / k),
  ];
}

/** Runs the demo; returns the outcomes by wire name. */
export async function runDemo(outDir: string, force: boolean, quiet: boolean, io: Io): Promise<Map<string, ProfileOutcome>> {
  await checkOutDir(outDir, force);
  const wires = await demoWires();
  await mkdir(outDir, { recursive: true });
  const outcomes = new Map<string, ProfileOutcome>();
  for (const input of wires) {
    const name = basename(input, ".csv");
    await mkdir(join(outDir, name), { recursive: true });
    const out = join(outDir, name, "profile.csv");
    outcomes.set(name, await runProfile({ input, out, bootstrap: DEFAULT_BOOTSTRAP, seed: DEFAULT_SEED, quiet: true }, io, WHERE));
  }
  const rows: string[][] = [["wire", "unit", "points", "length", "mean kappa", "max kappa", "mean |tau|"]];
  for (const [name, o] of outcomes) rows.push(row(name, o));
  io.stdout(
    "invented demo wires: model estimates, not measurements (length in unit, kappa and tau in 1/unit)\n" +
      `${table(rows)}\n`,
  );
  if (!quiet) io.stderr(`twistline: demo: wrote ${outcomes.size} profiles under ${outDir}\n`);
  return outcomes;
}

/** Adds `demo` to the program. */
export function addDemoCommand(program: Command, io: Io): void {
  program
    .command("demo")
    .description("run the profile stage on the invented demo wires (a coil with a pitch defect, a ring, a meander) and print a table")
    .option("--out <dir>", `output folder; gets <wire>/profile.csv per wire (default: ${DEFAULT_DEMO_DIR})`)
    .option("--force", "write into the output folder even if it is not empty")
    .option("--quiet", "print no summary line on stderr")
    .action(async (flags) => {
      if (flags.out === "") throw new ParameterError(WHERE, "--out", "must not be empty");
      await runDemo(flags.out ?? DEFAULT_DEMO_DIR, flags.force === true, flags.quiet === true, io);
    });
}
