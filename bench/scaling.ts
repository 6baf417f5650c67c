/**
 * Time and memory against N (run by hand: `npx tsx bench/scaling.ts [maxN]`).
 * A noisy helix (radius 50 nm, pitch 2 pi 10 nm, 1% noise, 1 turn per 1000 points up to 40 turns
 * then denser sampling), profiled with 200 bootstrap replicates in a fresh child process per N so
 * that the peak RSS is that run's own. Prints N, wall time of fitProfile, and peak RSS.
 * Invented synthetic data, seeded.
 */
import { execFileSync } from "node:child_process";
import { fileURLToPath } from "node:url";

const self = fileURLToPath(import.meta.url);

if (process.argv[2] === "--child") {
  const { fitProfile } = await import("../src/frame/profile.js");
  const { normalStream } = await import("../test/support/rng.js");
  const n = Number(process.argv[3]);
  const R = 50e-9, c = 10e-9, turns = Math.min(40, Math.max(2, n / 1000)), noise = 0.01;
  const g = normalStream(7);
  const xyz = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    const t = (2 * Math.PI * turns * i) / (n - 1);
    xyz[3 * i] = R * Math.cos(t) + noise * R * g();
    xyz[3 * i + 1] = R * Math.sin(t) + noise * R * g();
    xyz[3 * i + 2] = c * t + noise * R * g();
  }
  const t0 = performance.now(), c0 = process.cpuUsage();
  const p = fitProfile({ xyz, dims: 3, source: { file: "bench", unit: "nm" }, diagnostics: [] }, { bootstrap: 200 });
  const ms = performance.now() - t0, cpu = process.cpuUsage(c0);
  const k0 = R / (R * R + c * c);
  let e = 0, m = 0;
  for (let j = 0; j < p.n; ++j) if (!(p.flags[j] & 4)) { e += (p.kappa[j] / k0 - 1) ** 2; ++m; }
  console.log(JSON.stringify({ n, ms, cpuMs: (cpu.user + cpu.system) / 1000, rssMB: process.resourceUsage().maxRSS / 1024, segments: p.segments, kappaRelRms: Math.sqrt(e / m) }));
} else {
  const maxN = Number(process.argv[2] ?? 1e6);
  console.log("N         wall_s   cpu_s  peak_MB  segments  kappa_rel_rms");
  for (let n = 1000; n <= maxN; n *= 10) {
    const out = execFileSync(process.execPath, ["--import", "tsx", self, "--child", String(n)], { encoding: "utf8" });
    const r = JSON.parse(out.trim().split("\n").pop()!);
    console.log(`${String(n).padEnd(9)} ${(r.ms / 1000).toFixed(2).padStart(7)} ${(r.cpuMs / 1000).toFixed(2).padStart(6)}  ${r.rssMB.toFixed(0).padStart(7)}  ${String(r.segments).padStart(8)}  ${r.kappaRelRms.toExponential(2)}`);
  }
}
