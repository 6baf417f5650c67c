/**
 * Time and memory against N (run by hand: `npx tsx bench/scaling.ts [maxN] [--repeat R] [--stages] [--cold-stages]`).
 * A noisy helix (radius 50 nm, pitch 2 pi 10 nm, 1% noise, 1 turn per 1000 points up to 40 turns
 * then denser sampling), profiled with 200 bootstrap replicates in a fresh child process per N so
 * that the peak RSS is that run's own. Prints N, wall and CPU time of fitProfile (the median of R
 * fresh children, default 1; CPU includes the garbage collector's helper threads), peak RSS, and the
 * load average before the runs (the machine is shared: compare figures at similar load).
 * `--stages` adds a second, separate run of the stages of the geometry core one by one in each child
 * (robust start, passes, curvature level and refit, sampling, levels, bands; as fitProfile with its
 * defaults) with the CPU milliseconds of each (warm: after the fit in the same process; CPU includes
 * the compiler's and collector's helper threads). `--cold-stages` runs the same stages in one more
 * fresh child per run before any fit, with the main thread's wall milliseconds of each: the figures
 * that add up to the fit's wall time, including the JIT's warm-up (at 1e5 points about 0.4 s of the
 * 1.05 s, measured 2026-12-03: cold minus warm per stage).
 * Invented synthetic data, seeded.
 */
import { execFileSync } from "node:child_process";
import { loadavg } from "node:os";
import { fileURLToPath } from "node:url";

const self = fileURLToPath(import.meta.url);

if (process.argv[2] === "--child") {
  const { fitProfile, robustStart } = await import("../src/frame/profile.js");
  const { runPasses } = await import("../src/frame/passes.js");
  const { chooseLevels, curvatureLevel } = await import("../src/frame/levels.js");
  const { fitBands } = await import("../src/frame/bands.js");
  const { arcAt } = await import("../src/frame/curve.js");
  const { scalingHelix } = await import("../test/support/speedCases.js");
  const n = Number(process.argv[3]);
  const R = 50e-9, c = 10e-9;
  const xyz = scalingHelix(n);
  const trace = { xyz, dims: 3 as const, source: { file: "bench", unit: "nm" as const }, diagnostics: [] };
  // The stages of fitProfile (src/frame/profile.ts) one by one, with its default settings; each
  // stage's figure from `measure` (CPU ms of the process, or wall ms of the main thread).
  const runStages = (measure: () => () => number): Record<string, number> => {
    const stages: Record<string, number> = {};
    const stage = <T>(name: string, f: () => T): T => {
      const done = measure();
      const v = f();
      stages[name] = done();
      return v;
    };
    const set = { replicates: 200, seed: 1, passes: n > 20_000 ? 2 : 3, torsionBalance: 1, keepSamples: false, adaptive: false };
    const diagnostics: string[] = [];
    const start = stage("robustStart", () => robustStart(trace, {}, diagnostics));
    let fit = stage("runPasses", () => runPasses(trace, start, set, diagnostics));
    const lv = stage("curvatureLevel", () => curvatureLevel(trace, start, fit, set.seed));
    if (Math.abs(lv.decades) > 1e-9) {
      const refit = stage("refit", () => runPasses(trace, start, { passes: 1, lambda: lv.lambda, segments: fit.basis.nseg }, diagnostics, { u: fit.u, w: fit.w, span: fit.table.length, sigma: fit.sel.sigma }));
      fit = { ...refit, sel: { ...refit.sel, sigmaFrom: fit.sel.sigmaFrom, rule: fit.sel.rule } };
    }
    const samples = stage("samples", () => {
      // As sampleAt in profile.ts for one sample per kept point.
      const u = fit.u, mm = u.length;
      const order = Uint32Array.from({ length: mm }, (_, i) => i).sort((a, b) => u[a] - u[b] || a - b);
      const su = new Float64Array(mm), s = new Float64Array(mm), traceIndex = new Int32Array(mm);
      for (let j = 0; j < mm; ++j) { su[j] = u[order[j]]; traceIndex[j] = start.kept[order[j]]; }
      const s0 = arcAt(fit.table, su[0], start.closed);
      for (let j = 0; j < mm; ++j) s[j] = Math.max(0, arcAt(fit.table, su[j], start.closed) - s0);
      return { u: su, traceIndex, s };
    });
    const levels = stage("chooseLevels", () => chooseLevels(trace, start, fit, samples, set, diagnostics));
    stage("fitBands", () => fitBands(trace, start, fit, levels, samples, set, diagnostics));
    return stages;
  };
  const cpuClock = () => { const s0 = process.cpuUsage(); return () => { const d = process.cpuUsage(s0); return (d.user + d.system) / 1000; }; };
  const wallClock = () => { const t = performance.now(); return () => performance.now() - t; };
  if (process.argv.includes("--cold-stages")) {
    // The stages before any fit in this process (cold: the JIT has compiled none of their loops), main-thread wall ms.
    console.log(JSON.stringify({ n, coldStages: runStages(wallClock) }));
    process.exit(0);
  }
  const t0 = performance.now(), c0 = process.cpuUsage();
  const p = fitProfile(trace, { bootstrap: 200 });
  const ms = performance.now() - t0, cpu = process.cpuUsage(c0);
  const rssMB = process.resourceUsage().maxRSS / 1024;
  const k0 = R / (R * R + c * c);
  let e = 0, m = 0;
  for (let j = 0; j < p.n; ++j) if (!(p.flags[j] & 4)) { e += (p.kappa[j] / k0 - 1) ** 2; ++m; }
  const stages = process.argv.includes("--stages") ? runStages(cpuClock) : {};
  console.log(JSON.stringify({ n, ms, cpuMs: (cpu.user + cpu.system) / 1000, rssMB, segments: p.segments, kappaRelRms: Math.sqrt(e / m), stages }));
} else {
  const args = process.argv.slice(2);
  const flag = (name: string) => { const k = args.indexOf(name); return k >= 0 ? args.splice(k, 2)[1] : undefined; };
  const repeat = Math.max(1, Number(flag("--repeat") ?? 1));
  const withStages = args.includes("--stages");
  const withCold = args.includes("--cold-stages");
  const maxN = Number(args.filter((a) => !a.startsWith("--"))[0] ?? 1e6);
  const median = (v: number[]) => { const s = [...v].sort((a, b) => a - b); return s.length % 2 ? s[s.length >> 1] : 0.5 * (s[s.length / 2 - 1] + s[s.length / 2]); };
  console.log(`median of ${repeat} run(s) per N`);
  console.log("N         wall_s   cpu_s  peak_MB  segments  kappa_rel_rms  load_1min" + (withStages ? "  stages (cpu ms)" : "") + (withCold ? "  | cold stages (wall ms)" : ""));
  for (let n = 1000; n <= maxN; n *= 10) {
    const load = loadavg()[0];
    const colds: Record<string, number>[] = [];
    const runs: { ms: number; cpuMs: number; rssMB: number; segments: number; kappaRelRms: number; stages: Record<string, number> }[] = [];
    for (let k = 0; k < repeat; ++k) {
      const out = execFileSync(process.execPath, ["--import", "tsx", self, "--child", String(n), ...(withStages ? ["--stages"] : [])], { encoding: "utf8" });
      runs.push(JSON.parse(out.trim().split("\n").pop()!));
      if (withCold) {
        const cold = execFileSync(process.execPath, ["--import", "tsx", self, "--child", String(n), "--cold-stages"], { encoding: "utf8" });
        colds.push(JSON.parse(cold.trim().split("\n").pop()!).coldStages);
      }
    }
    const r = runs[0];
    const coldText = withCold ? "  | " + Object.keys(colds[0]).map((s) => `${s} ${median(colds.map((x) => x[s])).toFixed(0)}`).join(", ") : "";
    const stageText = withStages ? "  " + Object.keys(r.stages).map((s) => `${s} ${median(runs.map((x) => x.stages[s])).toFixed(0)}`).join(", ") : "";
    console.log(`${String(n).padEnd(9)} ${(median(runs.map((x) => x.ms)) / 1000).toFixed(2).padStart(7)} ${(median(runs.map((x) => x.cpuMs)) / 1000).toFixed(2).padStart(6)}  ${median(runs.map((x) => x.rssMB)).toFixed(0).padStart(7)}  ${String(r.segments).padStart(8)}  ${r.kappaRelRms.toExponential(2).padStart(13)}  ${load.toFixed(2).padStart(9)}${stageText}${coldText}`);
  }
}
