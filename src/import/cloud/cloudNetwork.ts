import { InputError, ParameterError } from "../../errors.js";
import { dijkstra, UnionFind, type Adjacency } from "../mesh/topology.js";
import { formatLength, formatPoint, makeSource } from "../mesh/units.js";
import { assembleNetwork, type RawBranch, type RawJunction } from "../network/assembleNetwork.js";
import { splitGraph, type Terminal } from "../network/splitGraph.js";
import type { WireNetwork } from "../network/types.js";
import { KdTree } from "./kdTree.js";
import { orderCloud } from "./orderCloud.js";
import type { CloudOptions } from "./types.js";
import { polylineLength } from "../mesh/polyline.js";
import { median } from "../median.js";

/** Options of `cloudNetwork`: the cloud options plus the width of the distance bins. */
export interface CloudNetworkOptions extends CloudOptions {
  /** Width of the graph-distance bins (m) [2 x the median distance to the k-th neighbour]. */
  readonly bin?: number;
}


/**
 * Splits an unordered point cloud sampled along a network of wires into branches, junctions and
 * free ends: the cloud's counterpart of `meshNetwork`.
 *
 * Method (Verroust & Lazarus 2000, "Extracting skeletal curves from 3D scattered data", The Visual
 * Computer 16:15): the k-nearest-neighbour graph (gross outliers left out as in `orderCloud`); the
 * graph distance from a point at one end (the farthest point from the farthest point of an
 * arbitrary start, two Dijkstra sweeps); the points binned by that distance every `bin`; the
 * connected pieces of each bin are the skeleton's nodes (at their centroids), joined where a kNN
 * edge joins two pieces. `splitGraph` prunes spurs shorter than 4 bins, merges junction nodes within
 * 3 bins, and cuts the rest into branches. Each branch's points (less those within 1.5 bins of a
 * junction) are ordered by `orderCloud` (side branches tolerated, with a note), and turned to run
 * from its start terminal to its end. Junction positions, angles and zones (radius 2 bins):
 * `assembleNetwork`.
 *
 * Units: metres in and out. Cost O(n log n) plus the orderings.
 * @throws {InputError} as `orderCloud` for too few or non-finite points, and "file: points: no
 *   branch long enough" when nothing is left.
 */
export function cloudNetwork(xyz: Readonly<Float64Array>, file: string, options: CloudNetworkOptions): WireNetwork {
  const n = xyz.length / 3;
  if (!Number.isInteger(n)) throw new ParameterError("cloudNetwork", "xyz", `length must be a multiple of 3 (got ${xyz.length})`);
  for (let i = 0; i < xyz.length; i++) {
    if (!Number.isFinite(xyz[i])) throw new InputError(file, null, `point ${Math.floor(i / 3) + 1}`, `${"xyz"[i % 3]}: not a finite number (${xyz[i]})`);
  }
  if (n < 8) throw new InputError(file, null, "points", `need at least 8 for a network, got ${n}`);
  const fmtP = (x: number, y: number, z: number) => formatPoint(x, y, z, options.unit, options.pixelSize);
  const fmtL = (v: number) => formatLength(v, options.unit, options.pixelSize);
  const notes: string[] = [];
  const k = Math.min(options.k ?? 10, n - 1);
  const tree = new KdTree(xyz);
  const ids = new Uint32Array(k), d2 = new Float64Array(k);
  const knn = new Uint32Array(n * k), knnD = new Float64Array(n * k), dq = new Float64Array(n), dk = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const c = tree.knn(xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2], k, ids, d2, i);
    for (let j = 0; j < k; j++) {
      knn[i * k + j] = j < c ? ids[j] : i;
      knnD[i * k + j] = j < c ? Math.sqrt(d2[j]) : 0;
    }
    dq[i] = knnD[i * k + Math.min(5, k) - 1];
    dk[i] = knnD[i * k + k - 1];
  }
  const factor = options.outlierFactor ?? 6;
  const medDq = median(dq);
  const outlier = new Uint8Array(n);
  let isolated = 0;
  for (let i = 0; i < n; i++) if (medDq > 0 && dq[i] > factor * medDq) (outlier[i] = 1), isolated++;
  // symmetric kNN graph (CSR)
  const deg = new Uint32Array(n + 1);
  for (let i = 0; i < n; i++) {
    if (outlier[i]) continue;
    for (let j = 0; j < k; j++) {
      const q = knn[i * k + j];
      if (q === i || outlier[q]) continue;
      deg[i + 1]++;
      deg[q + 1]++;
    }
  }
  for (let i = 0; i < n; i++) deg[i + 1] += deg[i];
  const fill = deg.slice(0, n), to = new Uint32Array(deg[n]), len = new Float64Array(deg[n]);
  const uf = new UnionFind(n);
  for (let i = 0; i < n; i++) {
    if (outlier[i]) continue;
    for (let j = 0; j < k; j++) {
      const q = knn[i * k + j];
      if (q === i || outlier[q]) continue;
      to[fill[i]] = q;
      len[fill[i]++] = knnD[i * k + j];
      to[fill[q]] = i;
      len[fill[q]++] = knnD[i * k + j];
      uf.union(i, q);
    }
  }
  const adj: Adjacency = { start: deg, to, len };
  const pieces = new Map<number, number[]>();
  for (let i = 0; i < n; i++) {
    if (outlier[i]) continue;
    const r = uf.find(i);
    const p = pieces.get(r);
    if (p) p.push(i);
    else pieces.set(r, [i]);
  }
  const kept = n - isolated;
  const big = [...pieces.values()].filter((p) => p.length >= 0.05 * kept).sort((a, b) => b.length - a.length);
  const small = kept - big.reduce((s, p) => s + p.length, 0);
  if (isolated + small > 0) notes.push(`left out ${isolated + small} gross outliers (${isolated} isolated, ${small} in small separate pieces)`);
  const h = options.bin ?? 2 * median(dk);
  if (!(h > 0)) throw new InputError(file, null, "points", "all points coincide");
  // graph distance from one end of each piece
  const sources: number[] = [];
  for (const p of big) {
    const d0 = dijkstra(adj, n, [p[0]]);
    let far = p[0];
    for (const i of p) if (d0[i] > d0[far]) far = i;
    sources.push(far);
  }
  const d = dijkstra(adj, n, sources);
  // nodes: connected pieces of each distance bin
  const bin = new Int32Array(n).fill(-1);
  const inBig = new Uint8Array(n);
  for (const p of big) for (const i of p) (inBig[i] = 1), (bin[i] = Math.floor(d[i] / h));
  const nodeUf = new UnionFind(n);
  for (let i = 0; i < n; i++) {
    if (!inBig[i]) continue;
    for (let s = deg[i]; s < deg[i + 1]; s++) if (bin[to[s]] === bin[i]) nodeUf.union(i, to[s]);
  }
  const nodeOf = new Int32Array(n).fill(-1), rootNode = new Map<number, number>();
  const members: number[][] = [];
  for (let i = 0; i < n; i++) {
    if (!inBig[i]) continue;
    const r = nodeUf.find(i);
    let v = rootNode.get(r);
    if (v === undefined) {
      rootNode.set(r, (v = members.length));
      members.push([]);
    }
    nodeOf[i] = v;
    members[v].push(i);
  }
  const nN = members.length;
  const nodePos = new Float64Array(3 * nN);
  members.forEach((m, v) => {
    for (const i of m) for (let c = 0; c < 3; c++) nodePos[3 * v + c] += xyz[3 * i + c] / m.length;
  });
  const pairs = new Map<number, [number, number]>();
  for (let i = 0; i < n; i++) {
    if (!inBig[i]) continue;
    for (let s = deg[i]; s < deg[i + 1]; s++) {
      const a = nodeOf[i], b = nodeOf[to[s]];
      if (a < b) pairs.set(a * nN + b, [a, b]);
    }
  }
  const list = [...pairs.values()];
  const edgeA = Uint32Array.from(list, (p) => p[0]), edgeB = Uint32Array.from(list, (p) => p[1]);
  const edgePos = new Float64Array(3 * list.length);
  list.forEach(([a, b], e) => {
    for (let c = 0; c < 3; c++) edgePos[3 * e + c] = 0.5 * (nodePos[3 * a + c] + nodePos[3 * b + c]);
  });
  const split = splitGraph({ nodes: nN, nodePos, edgeA, edgeB, edgePos }, 4 * h, 3 * h);
  if (split.pruned > 0) notes.push(`pruned ${split.pruned} side spurs of the distance-bin graph (longest ${fmtL(split.prunedMax)})`);
  const inJunction = new Uint8Array(nN);
  for (const j of split.junctions) for (const v of j.nodes) inJunction[v] = 1;
  const jPos = split.junctions.map((j) => [j.x, j.y, j.z] as const);
  const raw: RawBranch[] = [];
  let skipped = 0;
  const pieceOf = (i: number) => big.findIndex((p) => uf.find(p[0]) === uf.find(i));
  for (const chain of split.chains) {
    const at = (t: Terminal | null) => (t?.kind === "junction" ? jPos[t.index] : null);
    const J0 = at(chain.from), J1 = at(chain.to);
    const pts: number[] = [];
    for (const v of chain.nodes) {
      if (inJunction[v]) continue;
      for (const i of members[v]) {
        const near = (J: readonly number[] | null) => J !== null && Math.hypot(xyz[3 * i] - J[0], xyz[3 * i + 1] - J[1], xyz[3 * i + 2] - J[2]) < 1.5 * h;
        if (!near(J0) && !near(J1)) pts.push(xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2]);
      }
    }
    if (pts.length < 3 * 12) {
      skipped++;
      continue;
    }
    let ordered;
    try {
      ordered = orderCloud(Float64Array.from(pts), file, { unit: options.unit, ...(options.pixelSize !== undefined ? { pixelSize: options.pixelSize } : {}), closed: chain.closed, allowBranches: true, dims: 3 });
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      skipped++;
      continue;
    }
    let p = ordered.trace.xyz;
    // run from the start terminal: the end nearer the chain's first node goes first
    const first = chain.nodes[0];
    const m = p.length / 3;
    const dStart = Math.hypot(p[0] - nodePos[3 * first], p[1] - nodePos[3 * first + 1], p[2] - nodePos[3 * first + 2]);
    const dEnd = Math.hypot(p[3 * m - 3] - nodePos[3 * first], p[3 * m - 2] - nodePos[3 * first + 1], p[3 * m - 1] - nodePos[3 * first + 2]);
    if (!chain.closed && dEnd < dStart) {
      const r = new Float64Array(p.length);
      for (let i = 0; i < m; i++) r.set(p.subarray(3 * (m - 1 - i), 3 * (m - i)), 3 * i);
      p = r;
    }
    raw.push({ xyz: p, length: polylineLength(ordered.path, chain.closed), from: chain.from, to: chain.to, closed: chain.closed, component: Math.max(0, pieceOf(members[chain.nodes[1] ?? first][0])), diagnostics: ordered.trace.diagnostics });
  }
  if (skipped > 0) notes.push(`${skipped} branches with too few points (under 12 beyond the junction zones) left out`);
  if (raw.length === 0) throw new InputError(file, null, "points", "no branch long enough for a wire");
  notes.push(`${split.junctions.length} junctions, ${raw.length} branches, ${split.skeletonCycles} independent cycles in the distance-bin graph (bins of ${fmtL(h)}, ${k} neighbours)`);
  const junctions: RawJunction[] = split.junctions.map((j) => ({ x: j.x, y: j.y, z: j.z, scale: h }));
  return assembleNetwork(raw, junctions, { source: makeSource(file, options.unit, options.pixelSize), zoneRadii: 2, fmtP, fmtL, diagnostics: notes });
}

