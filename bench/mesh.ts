/**
 * Benchmark (run by hand): a 1e6-triangle binary STL of a helical tube, generated into os.tmpdir(),
 * read, welded and reduced to a centre line. Prints the time of each stage, the peak RSS and the
 * accuracy against the known centre line. Target: under 10 s and 2 GB in all.
 *
 *   npx tsx bench/mesh.ts [triangles=1000000]
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { meshCenterline } from "../src/import/mesh/meshCenterline.js";
import { parseStl } from "../src/import/mesh/parseStl.js";
import { distancesToTruth, helixCurve, threeTube, toStlBinary, truthPolyline } from "../test/support/tubes.js";

const generate = process.argv[2] === "--generate";
const triangles = Number((generate ? process.argv[4] : process.argv[2]) ?? 1e6);
const radial = 50;
const tubular = Math.round(triangles / (2 * radial));
// invented test object: a 5-turn helix of radius 300 nm, pitch 250 nm, tube radius 40 nm
const curve = helixCurve(300, 250, 5);
const r = 40;

if (generate) {
  // child process: write the file, so that its memory does not count in the parent's peak RSS
  writeFileSync(process.argv[3], toStlBinary(threeTube(curve, r, tubular, radial, false)));
  process.exit(0);
}
const dir = mkdtempSync(join(tmpdir(), "twistline-bench-"));
const file = join(dir, "helix.stl");
let t = performance.now();
const child = spawnSync(process.execPath, [...process.execArgv, fileURLToPath(import.meta.url), "--generate", file, String(triangles)], { stdio: "inherit" });
if (child.status !== 0) throw new Error("generating the STL failed");
const tGen = performance.now() - t;

t = performance.now();
const start = performance.now();
const bytes = readFileSync(file);
const mesh = parseStl(bytes, file, { unit: "nm" });
const tRead = performance.now() - t;
t = performance.now();
const [trace] = meshCenterline(mesh, file, { unit: "nm" });
const tLine = performance.now() - t;
const total = performance.now() - start;
const peak = process.resourceUsage().maxRSS * 1024; // bytes; the OS's high-water mark of this process
rmSync(dir, { recursive: true, force: true });

const { dist, foot } = distancesToTruth(trace.xyz, truthPolyline(curve, 20000, 1e-9));
let maxD = 0, maxR = 0;
for (let i = 0; i < dist.length; i++) {
  if (foot[i] <= 0 || foot[i] >= 1 - 1 / 20000) continue;
  maxD = Math.max(maxD, dist[i]);
  maxR = Math.max(maxR, Math.abs((trace.radius as Float64Array)[i] - r * 1e-9));
}
const fmt = (ms: number) => `${(ms / 1000).toFixed(2)} s`;
console.log(`triangles            ${mesh.index.length / 3} (${bytes.byteLength} bytes, ${mesh.positions.length / 3} vertices after welding)`);
console.log(`generate + export    ${fmt(tGen)} (not counted)`);
console.log(`read + parse + weld  ${fmt(tRead)}`);
console.log(`centre line          ${fmt(tLine)} (${trace.xyz.length / 3} samples)`);
console.log(`total                ${fmt(total)}   target < 10 s`);
console.log(`peak RSS             ${(peak / 2 ** 20).toFixed(0)} MiB   target < 2048 MiB (process high-water mark; the file is generated in a child)`);
console.log(`max centre-line error / tube radius  ${(maxD / (r * 1e-9)).toExponential(2)}`);
console.log(`max radius error / tube radius       ${(maxR / (r * 1e-9)).toExponential(2)}`);
