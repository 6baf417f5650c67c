/**
 * Time and memory of the network split on a large mesh (run by hand):
 *   npx tsx bench/network.ts [lattice=5] [spacing=100] [radiusVoxels=4]
 * An invented square lattice of wires (lattice x lattice nodes, `spacing` voxels apart, tube radius
 * in voxels), voxelised with correlated noise (0.3 voxel) and triangulated at the voxel edges'
 * midpoints (test/support/networks.ts), written as binary STL; then, timed: parse and weld
 * (parseStl), split (meshNetwork), and profile every branch (fitProfile with the default 200
 * bootstrap replicates). Prints each stage's wall time, the counts, and the peak resident set size
 * (process.resourceUsage().maxRSS). Target (issue 13): 1e6 triangles split and profiled in under 30 s
 * and 2 GB.
 */
import { fitProfile } from "../src/frame/profile.js";
import { meshNetwork } from "../src/import/mesh/meshNetwork.js";
import { parseStl } from "../src/import/mesh/parseStl.js";
import { latticeSkeleton, stlBinary, voxelNetworkMesh } from "../test/support/networks.js";

const n = Number(process.argv[2] ?? 5), spacing = Number(process.argv[3] ?? 100), rv = Number(process.argv[4] ?? 4);
const t0 = performance.now();
const sk = latticeSkeleton(n, n, spacing);
const bytes = stlBinary(voxelNetworkMesh(sk, rv, 1, 0.3, 7));
const t1 = performance.now();
console.log(`built a ${n} x ${n} lattice (spacing ${spacing} voxels, radius ${rv} voxels): ${(bytes.length - 84) / 50} triangles, ${(bytes.length / 2 ** 20).toFixed(1)} MiB of STL in ${((t1 - t0) / 1000).toFixed(1)} s (not part of the target)`);
const rss0 = process.resourceUsage().maxRSS / 1024;
const mesh = parseStl(bytes, "lattice.stl", { unit: "nm" });
const t2 = performance.now();
const net = meshNetwork(mesh, "lattice.stl", { unit: "nm" });
const t3 = performance.now();
let samples = 0, refused = 0;
for (const b of net.branches) {
  try {
    samples += fitProfile(b.trace).n;
  } catch {
    refused++;
  }
}
const t4 = performance.now();
const s = (a: number, b: number) => ((b - a) / 1000).toFixed(2);
console.log(`parse + weld ${s(t1, t2)} s; split ${s(t2, t3)} s (${net.junctions.length} junctions, ${net.branches.length} branches, ${net.ends.length} free ends, ${net.cycles} cycles; skeleton: ${sk.junctions.length} junctions, ${sk.branches} branches, ${sk.cycles} cycles)`);
console.log(`profile every branch (200 bootstrap replicates each): ${s(t3, t4)} s, ${samples} samples${refused > 0 ? `, ${refused} branches refused by the fit` : ""}`);
console.log(`total from STL bytes: ${s(t1, t4)} s; peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MiB (${rss0.toFixed(0)} MiB before parsing, mesh building included)`);
