/**
 * I/O against the fit (run by hand: `npx tsx bench/io.ts [n ...]`, default 100000). For each n, a
 * noisy helix (invented synthetic data, seeded) is written as CSV, then timed stage by stage:
 * read + parse, fit with 200 bootstrap replicates, write the profile CSV with the streaming writer,
 * and the same table built the old way (toPrecision per number, one string). Then the number
 * formatter alone: ns per number for `String(Number(v.toPrecision(12)))` against `writeNumber`.
 * Finally, unless --no-cli, the whole `profile` command end to end from the shell on the built
 * program (dist/cli/bin.js; `npm run build` first), wall time and peak RSS from /usr/bin/time.
 * Wall times on a shared machine are noisy: each figure is the best of three.
 */
import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { formatNumber, writeNumber } from "../src/export/formatNumber.js";
import { profileColumns } from "../src/export/profileTable.js";
import { profileCsvChunks } from "../src/export/profileToCsv.js";
import { writeFileAtomic } from "../src/export/writeFileAtomic.js";
import { fitProfile } from "../src/frame/profile.js";
import { readTraceFile } from "../src/import/readTrace.js";
import { normalStream } from "../test/support/rng.js";

const args = process.argv.slice(2);
const cli = !args.includes("--no-cli");
const sizes = args.filter((a) => /^\d/.test(a)).map(Number);
const dir = mkdtempSync(join(tmpdir(), "twistline-bench-io-"));
const bin = fileURLToPath(new URL("../dist/cli/bin.js", import.meta.url));

async function best<T>(runs: number, f: () => Promise<T> | T): Promise<{ ms: number; value: T }> {
  let ms = Infinity, value: T | undefined;
  for (let r = 0; r < runs; ++r) {
    const t0 = performance.now();
    value = await f();
    ms = Math.min(ms, performance.now() - t0);
  }
  return { ms, value: value as T };
}

function helixCsv(n: number): string {
  const g = normalStream(11);
  const turns = Math.min(40, Math.max(2, n / 1000));
  const rows: string[] = ["# invented synthetic helix for bench/io.ts (not a measurement)", "# unit: nm", "x,y,z"];
  for (let i = 0; i < n; ++i) {
    const t = (2 * Math.PI * turns * i) / (n - 1);
    rows.push(`${(50 * Math.cos(t) + 0.5 * g()).toFixed(4)},${(50 * Math.sin(t) + 0.5 * g()).toFixed(4)},${(10 * t + 0.5 * g()).toFixed(4)}`);
  }
  return `${rows.join("\n")}\n`;
}

const fmt = (ms: number): string => (ms >= 1000 ? `${(ms / 1000).toFixed(2)} s` : `${ms.toFixed(0)} ms`).padStart(9);

console.log("n        read+parse    fit(200)   write CSV  old CSV build  CSV MB");
for (const n of sizes.length > 0 ? sizes : [100_000]) {
  const file = join(dir, `helix-${n}.csv`);
  writeFileSync(file, helixCsv(n));
  const read = await best(3, () => readTraceFile(file));
  const fit = await best(1, () => fitProfile(read.value, { bootstrap: 200, seed: 1 }));
  const profile = fit.value;
  const out = join(dir, "p.csv");
  const write = await best(3, () => writeFileAtomic(out, profileCsvChunks(profile, { unit: "nm", seed: 1 })));
  let bytes = 0;
  for (const c of profileCsvChunks(profile, { unit: "nm", seed: 1 })) bytes += c.byteLength;
  // the old way: every number through toPrecision, rows joined into one string
  const old = await best(3, () => {
    const cols = profileColumns(profile, "nm");
    const lines: string[] = [];
    const row = new Array<string>(cols.length);
    for (let i = 0; i < profile.n; ++i) {
      for (let c = 0; c < cols.length; ++c) row[c] = String(Number(cols[c][i].toPrecision(12)));
      lines.push(row.join(","));
    }
    return lines.join("\n").length;
  });
  console.log(`${String(n).padEnd(8)} ${fmt(read.ms)} ${fmt(fit.ms)}   ${fmt(write.ms)}     ${fmt(old.ms)}   ${(bytes / 1e6).toFixed(1)}`);

  if (cli && existsSync(bin)) {
    for (const [label, extra] of [["profile --bootstrap 200", []], ["profile --bootstrap 0", ["--bootstrap", "0"]]] as const) {
      let wall = Infinity, rss = 0;
      for (let r = 0; r < 3; ++r) {
        const report = spawnSync("/usr/bin/time", ["-f", "%e %M", process.execPath, bin, "profile", file, "--out", out, "--quiet", ...extra], { encoding: "utf8" });
        const [e, m] = report.stderr.trim().split("\n").pop()!.split(" ").map(Number);
        if (e * 1000 < wall) { wall = e * 1000; rss = m; }
      }
      console.log(`         end to end (${label}): ${fmt(wall)}, peak RSS ${(rss / 1024).toFixed(0)} MiB`);
    }
  }
}
for (const label of ["--help"]) {
  if (!cli || !existsSync(bin)) break;
  let wall = Infinity;
  for (let r = 0; r < 3; ++r) {
    const t0 = performance.now();
    execFileSync(process.execPath, [bin, label], { stdio: "ignore" });
    wall = Math.min(wall, performance.now() - t0);
  }
  console.log(`\`twistline ${label}\`: ${fmt(wall)}`);
}

// the formatter alone: 2e6 numbers of the kinds a profile holds (lengths, unit vectors, curvatures)
const g = normalStream(5);
const values = Float64Array.from({ length: 2_000_000 }, (_, i) => g() * 10 ** ((i % 9) - 4));
const buffer = new Uint8Array(1 << 16);
const reference = await best(3, () => {
  let length = 0;
  for (let i = 0; i < values.length; ++i) length += String(Number(values[i].toPrecision(12))).length;
  return length;
});
const asString = await best(3, () => {
  let length = 0;
  for (let i = 0; i < values.length; ++i) length += formatNumber(values[i]).length;
  return length;
});
const asBytes = await best(3, () => {
  let pos = 0, length = 0;
  for (let i = 0; i < values.length; ++i) {
    pos = writeNumber(buffer, pos, values[i], "NaN");
    if (pos > 65000) { length += pos; pos = 0; }
  }
  return length + pos;
});
if (reference.value !== asString.value || reference.value !== asBytes.value) throw new Error("formatter texts differ in length");
const ns = (ms: number): string => `${((ms * 1e6) / values.length).toFixed(0)} ns`;
console.log(
  `number formatting, per number: toPrecision ${ns(reference.ms)}, formatNumber ${ns(asString.ms)} (x${(reference.ms / asString.ms).toFixed(1)}), ` +
    `writeNumber ${ns(asBytes.ms)} (x${(reference.ms / asBytes.ms).toFixed(1)})`,
);
rmSync(dir, { recursive: true, force: true });
