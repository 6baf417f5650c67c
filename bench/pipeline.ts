/**
 * Benchmark of the whole pipeline (run by hand, prints figures; no assertions):
 *
 *   npx tsx bench/pipeline.ts            # all parts
 *   npx tsx bench/pipeline.ts quick      # demo wires only
 *
 * 1. Each invented demo wire with the invented demo material: stage times (fit, segmentation,
 *    model, outputs) and output sizes.
 * 2. Time against the number of points for an invented noisy helix, geometry only and with the model.
 * 3. A batch of 6 wires (the demo wires twice) on 1 and on 2 worker threads: wall time.
 * Invented data throughout.
 */
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { availableParallelism, tmpdir } from "node:os";
import { join } from "node:path";
import { checkPipelineFlags } from "../cli/analyze.js";
import { runBatch } from "../cli/batch.js";
import { DEMO_MATERIAL, demoDataDir, demoWires } from "../cli/demo.js";
import { readMaterialFile } from "../cli/wireJob.js";
import { analyzeTrace } from "../src/export/analyzeTrace.js";
import { buildWireOutputs } from "../src/export/wireOutputs.js";
import { readTraceFile } from "../src/import/readTrace.js";
import { viewerScript } from "../src/report/viewerScript.js";
import { normalStream } from "../test/support/rng.js";

const quiet = { stdout: () => undefined, stderr: () => undefined };
const ms = (t: number): string => `${t.toFixed(0)} ms`;
const kib = (b: number): string => `${(b / 1024).toFixed(0)} KiB`;

async function demoStages(): Promise<void> {
  const dir = demoDataDir();
  const material = await readMaterialFile(join(dir, DEMO_MATERIAL));
  const t0 = performance.now();
  const js = await viewerScript();
  process.stdout.write(`viewer bundle: ${kib(js.length)} in ${ms(performance.now() - t0)}\n`);
  process.stdout.write("wire      points  fit      segment  model    outputs  report   chain    mesh(ply)\n");
  for (const file of await demoWires(dir)) {
    const trace = await readTraceFile(file);
    const a = analyzeTrace(trace, { material });
    const t1 = performance.now();
    const out = await buildWireOutputs(a, { unit: "nm", viewerScript: js });
    const t2 = performance.now();
    const size = (name: string): number => {
      const d = out.files.find((f) => f.name === name)!.data;
      if (typeof d === "string") return Buffer.byteLength(d);
      if (d instanceof Uint8Array) return d.byteLength;
      let n = 0;
      for (const c of d) n += c.byteLength;
      return n;
    };
    const name = file.split("/").pop()!.replace(".csv", "");
    process.stdout.write(
      `${name.padEnd(9)} ${String(trace.xyz.length / 3).padStart(6)}  ${ms(a.timings.profile).padEnd(8)} ${ms(a.timings.segment).padEnd(8)} ` +
        `${ms(a.timings.model).padEnd(8)} ${ms(t2 - t1).padEnd(8)} ${kib(size("report.html")).padEnd(8)} ${kib(size("chain.csv")).padEnd(8)} ${kib(size("wire.ply"))}\n`,
    );
  }
}

async function scaling(): Promise<void> {
  const material = await readMaterialFile(join(demoDataDir(), DEMO_MATERIAL));
  process.stdout.write("\ninvented helix (radius 40 nm, pitch 2 pi 10 nm, noise 0.3 nm), 120 points per turn\n");
  process.stdout.write("points  turns  fit (geometry only)  fit + segment + model\n");
  for (const turns of [2, 8, 32]) {
    const n = Math.round(turns * 120);
    const g = normalStream(9);
    const xyz = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) {
      const t = (2 * Math.PI * turns * i) / (n - 1);
      xyz.set([(40 * Math.cos(t) + 0.3 * g()) * 1e-9, (40 * Math.sin(t) + 0.3 * g()) * 1e-9, (10 * t + 0.3 * g()) * 1e-9], 3 * i);
    }
    const trace = { xyz, dims: 3 as const, source: { file: "invented-helix", unit: "nm" as const }, diagnostics: [] };
    const geo = analyzeTrace(trace, {});
    const full = analyzeTrace(trace, { material });
    process.stdout.write(`${String(n).padStart(6)}  ${String(turns).padStart(5)}  ${ms(geo.timings.profile).padEnd(19)}  ${ms(full.timings.profile + full.timings.segment + full.timings.model)}\n`);
  }
}

async function batch(): Promise<void> {
  const dir = demoDataDir();
  const tmp = mkdtempSync(join(tmpdir(), "twistline-bench-"));
  try {
    const files: string[] = [];
    for (const f of await demoWires(dir)) {
      for (const k of [1, 2]) {
        const copy = join(tmp, `${k}-${f.split("/").pop()}`);
        writeFileSync(copy, await import("node:fs/promises").then((m) => m.readFile(f)));
        files.push(copy);
      }
    }
    const req = checkPipelineFlags("batch", files[0], { material: join(dir, DEMO_MATERIAL), quiet: true });
    process.stdout.write(`\nbatch of ${files.length} wires (demo wires twice, with the demo material); ${availableParallelism()} cores\n`);
    for (const jobs of [1, 2]) {
      const t0 = performance.now();
      await runBatch(files, join(tmp, `out-${jobs}`), req, { jobs, ci: undefined }, quiet);
      process.stdout.write(`jobs ${jobs}: ${ms(performance.now() - t0)}\n`);
    }
  } finally {
    rmSync(tmp, { recursive: true, force: true });
  }
}

await demoStages();
if (process.argv[2] !== "quick") {
  await scaling();
  await batch();
}
