import { InputError, ParameterError } from "../../errors.js";
import { makeSource, formatLength, formatPoint } from "../mesh/units.js";
import { UnionFind } from "../mesh/topology.js";
import { KdTree } from "./kdTree.js";
import type { CloudOptions, OrderedCloud, SideBranch } from "./types.js";
import { polylineLength } from "../mesh/polyline.js";
import { median } from "../median.js";
import { GAP_LIMIT } from "../../frame/fitGuard.js";
import { symEigen3 } from "../../frame/symEigen3.js";


/**
 * Orders an unordered point cloud sampled along one wire into a curve, leaving out gross outliers.
 *
 * Method (Lee 2000, "Curve reconstruction from unorganized points", Computer Aided Geometric Design
 * 17:161, with the recipe of NUMERICS.md section 5 step 1):
 * 0. Exact repeats of a point are merged into its first copy (a note says how many).
 * 1. k nearest neighbours (k-d tree); points whose 5th-neighbour distance is over `outlierFactor`
 *    times the median, and over as many times the lower quartile of their neighbours' 5th-neighbour
 *    distances, are isolated gross outliers (local, so a stretch sampled more sparsely stays). A run of 10 or more such points, or of a
 *    small piece in step 2, that is elongated (a line, not a clump) is refused, naming its ends.
 * 2. Euclidean minimum spanning tree of the kNN graph (Kruskal). Pieces with under 5% of the points
 *    are outliers; if a larger second piece remains after doubling k up to 40, the cloud is not one
 *    wire (an error).
 * 3. The tree's diameter path (two sweeps of tree distance) is the curve's skeleton; a running mean
 *    over `smoothFraction` of its vertices smooths it. The curve is closed when the gap between its
 *    ends is under `closeGap` of its length and no other part of the path lies near the step between
 *    them (`closingStep`); then the mean wraps around. The centre and outer end of an open spiral,
 *    with its other turns between them, stay open.
 * 4. Each point's parameter is the arc length of its foot point on the smoothed path; the points
 *    are sorted by it. Side branches of the tree that reach far from the path are either a few
 *    stray points (outliers, left out, and the steps repeat once without them) or real structure
 *    (a self-crossing or a branch): those are kept and reported in `sideBranches` and the
 *    diagnostics, since the ordering is not to be trusted there.
 *
 * 5. A density change that the fit would take for gaps (see `densityCheck`) is refused, naming
 *    where the sparse stretch starts and ends; so are strands side by side (`strandCheck` in 3D,
 *    `planarStrandCheck` in a plane: the ordered points zigzag between them) and a path that runs
 *    back along itself with no points in its turn or legs under 6 spacings apart (`foldCheck`: two
 *    strands read up one and down the other, or a hairpin tighter than the points resolve).
 *
 * Units: metres in and out. Cost O(n log n) plus sorting the kNN edges (about k n log n).
 * Degenerate input: fewer than 4 points, or non-finite coordinates, raise InputError.
 * @throws {InputError} "file: points: need at least 4, got 2", "file: point 7: y: not a finite number",
 *   "file: points: the cloud falls into 2 separate pieces of 400 and 380 points ...".
 * @example orderCloud(shuffledHelix, "wire.xyz", { unit: "nm" }).trace // the helix points, in order
 */
export function orderCloud(xyz: Readonly<Float64Array>, file: string, options: CloudOptions): OrderedCloud {
  const all = xyz.length / 3;
  if (!Number.isInteger(all)) throw new ParameterError("orderCloud", "xyz", `length must be a multiple of 3 (got ${xyz.length})`);
  for (let i = 0; i < xyz.length; i++) {
    if (!Number.isFinite(xyz[i])) throw new InputError(file, null, `point ${Math.floor(i / 3) + 1}`, `${"xyz"[i % 3]}: not a finite number (${xyz[i]})`);
  }
  if (all < 4) throw new InputError(file, null, "points", `need at least 4, got ${all}`);
  // Exact repeats of a point carry nothing in a cloud (there is no order to keep): the first copy stays.
  const firstOf = new Map<string, number>();
  const distinct: number[] = [];
  for (let i = 0; i < all; i++) {
    const key = `${xyz[3 * i]},${xyz[3 * i + 1]},${xyz[3 * i + 2]}`;
    if (!firstOf.has(key)) {
      firstOf.set(key, i);
      distinct.push(i);
    }
  }
  if (distinct.length === all) return orderDistinct(xyz, file, options);
  const sub = new Float64Array(3 * distinct.length);
  distinct.forEach((i, j) => sub.set(xyz.subarray(3 * i, 3 * i + 3), 3 * j));
  if (distinct.length < 4) throw new InputError(file, null, "points", `need at least 4 distinct points, got ${distinct.length} (and ${all - distinct.length} exact repeats)`);
  const r = orderDistinct(sub, file, options);
  const order = Uint32Array.from(r.order, (j) => distinct[j]);
  const note = `merged ${all - distinct.length} exact repeats of points into their first copy (${distinct.length} distinct points of ${all})`;
  return {
    ...r,
    trace: { ...r.trace, diagnostics: [note, ...r.trace.diagnostics], rows: Int32Array.from(order, (i) => i + 1) },
    outlierIndices: Uint32Array.from(r.outlierIndices, (j) => distinct[j]),
    order,
  };
}

function orderDistinct(xyz: Readonly<Float64Array>, file: string, options: CloudOptions): OrderedCloud {
  const n = xyz.length / 3;
  if (n < 4) throw new InputError(file, null, "points", `need at least 4, got ${n}`);
  const factor = options.outlierFactor ?? 6;
  const closeGap = options.closeGap ?? 0.05;
  const smoothFraction = options.smoothFraction ?? 0.02;
  const fmtP = (x: number, y: number, z: number) => formatPoint(x, y, z, options.unit, options.pixelSize);
  const fmtL = (v: number) => formatLength(v, options.unit, options.pixelSize);
  const diagnostics: string[] = [];
  const outlier = new Uint8Array(n);
  const tree = new KdTree(xyz);
  let k = Math.min(options.k ?? 10, n - 1);
  let knnIds = new Uint32Array(0), knnD2 = new Float64Array(0);
  const findNeighbours = () => {
    knnIds = new Uint32Array(n * k);
    knnD2 = new Float64Array(n * k).fill(Infinity);
    const ids = new Uint32Array(k), d2 = new Float64Array(k);
    for (let i = 0; i < n; i++) {
      const c = tree.knn(xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2], k, ids, d2, i);
      knnIds.set(ids.subarray(0, c), i * k);
      knnD2.set(d2.subarray(0, c), i * k);
    }
  };
  findNeighbours();
  // 1. isolated points
  const q = Math.min(5, k) - 1;
  const dq = new Float64Array(n), d1 = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    dq[i] = Math.sqrt(knnD2[i * k + q]);
    d1[i] = Math.sqrt(knnD2[i * k]);
  }
  const medDq = median(dq), medD1 = median(d1);
  // Judged against the whole cloud and against the point's own neighbourhood (the lower quartile
  // of its neighbours' 5th-neighbour distances), so a stretch sampled more sparsely than the rest
  // is not taken for outliers, while a stray with a few other strays among its neighbours is.
  let isolated = 0;
  const local = new Float64Array(k);
  for (let i = 0; i < n; i++) {
    if (!(dq[i] > factor * medDq && medDq > 0)) continue;
    let c = 0;
    for (let j = 0; j < k; j++) if (Number.isFinite(knnD2[i * k + j])) local[c++] = dq[knnIds[i * k + j]];
    const near = local.subarray(0, c).sort()[Math.floor((c - 1) / 4)];
    if (dq[i] > factor * near && near > 0) {
      outlier[i] = 1;
      isolated++;
    }
  }
  // Isolated points that hang together in a long run continue a wire: not outliers.
  {
    const uf = new UnionFind(n);
    for (let i = 0; i < n; i++) {
      if (!outlier[i]) continue;
      for (let j = 0; j < k; j++) {
        const e = i * k + j;
        if (Number.isFinite(knnD2[e]) && outlier[knnIds[e]]) uf.union(i, knnIds[e]);
      }
    }
    const groups = new Map<number, number[]>();
    for (let i = 0; i < n; i++) {
      if (!outlier[i]) continue;
      const g = groups.get(uf.find(i));
      if (g) g.push(i);
      else groups.set(uf.find(i), [i]);
    }
    for (const g of groups.values()) refuseRun(xyz, g, file, fmtP, "isolated from the rest");
  }
  let smallPieces = 0, strays = 0;
  let result: ReturnType<typeof orderOnce> | undefined;
  for (let iteration = 0; iteration < 2; iteration++) {
    // 2. spanning tree, growing k if the graph falls apart into big pieces
    let mst = spanningForest(n, k, knnIds, knnD2, outlier);
    while (mst.pieces.length > 1 && mst.pieces[1].length >= 0.05 * mst.kept && k < Math.min(40, n - 1)) {
      k = Math.min(2 * k, 40, n - 1);
      findNeighbours();
      mst = spanningForest(n, k, knnIds, knnD2, outlier);
    }
    if (mst.pieces.length > 1 && mst.pieces[1].length >= 0.05 * mst.kept) {
      throw new InputError(
        file, null, "points",
        `the cloud falls into ${mst.pieces.length} separate pieces of ${mst.pieces.slice(0, 4).map((p) => p.length).join(", ")} points (even with ${k} neighbours per point): give one wire per file`,
      );
    }
    for (const piece of mst.pieces.slice(1)) refuseRun(xyz, piece, file, fmtP, "apart from the rest of the cloud");
    for (const piece of mst.pieces.slice(1)) {
      for (const i of piece) outlier[i] = 1;
      smallPieces += piece.length;
    }
    result = orderOnce(xyz, mst, outlier, smoothFraction, closeGap, options.closed);
    // 4. stray points in small side branches far from the curve
    const medRho = median(result.rho);
    const thr = Math.max(factor * medRho, 3 * medD1);
    let found = 0;
    for (const b of result.branches) {
      if (b.maxRho > thr && b.members.length <= Math.max(3, 0.005 * n)) {
        for (const i of b.members) {
          if (result.rhoOf(i) > thr) {
            outlier[i] = 1;
            found++;
          }
        }
      }
    }
    strays += found;
    if (found === 0) break;
  }
  const r = result as NonNullable<typeof result>;
  const medRho = median(r.rho);
  const thr = Math.max(factor * medRho, 3 * medD1);
  const sideBranches: SideBranch[] = r.branches
    .filter((b) => b.maxRho > thr && b.members.length > Math.max(3, 0.005 * n))
    .map((b) => ({ x: r.pathXyz[3 * b.attach], y: r.pathXyz[3 * b.attach + 1], z: r.pathXyz[3 * b.attach + 2], extent: b.maxRho, points: b.members.length }));
  const outlierIndices: number[] = [];
  for (let i = 0; i < n; i++) if (outlier[i]) outlierIndices.push(i);
  if (outlierIndices.length > 0) {
    diagnostics.push(`left out ${outlierIndices.length} gross outliers (${isolated} isolated, ${smallPieces} in small separate pieces, ${strays} stray points off the curve)`);
  }
  diagnostics.push(
    `ordered ${r.order.length} points along ${r.closed ? "a closed" : "an open"} curve of length ${fmtL(r.length)} (end gap ${fmtL(r.gap)}; ${k} neighbours, running mean over ${2 * r.half + 1} path points)`,
  );
  if (options.closed === undefined && r.closure !== undefined && !r.closed) {
    const v = 3 * r.closure.nearest;
    diagnostics.push(
      `taken as open although its ends are within ${+(100 * closeGap).toFixed(2)}% of its length: another part of the wire passes between them, near ${fmtP(r.raw[v], r.raw[v + 1], r.raw[v + 2])}, across the ${fmtL(r.gap)} step that would join them; declare the wire closed to join them`,
    );
  }
  if (sideBranches.length > 0 && !options.allowBranches) {
    const b = sideBranches[0];
    throw new InputError(file, null, "points",
      `the cloud crosses itself or branches near ${fmtP(b.x, b.y, b.z)} (a side branch of ${b.points} points reaching ${fmtL(b.extent)} from the path${sideBranches.length > 1 ? `; ${sideBranches.length - 1} more such places` : ""}): the order along one wire is ambiguous there; trace the wire as an ordered polyline, or split it into its wires (--branches split)`);
  }
  // after the branch check: along a branched tree the ordered spacing means nothing
  if (sideBranches.length === 0 && !allZ0(xyz)) strandCheck(xyz, r.offAll, r.order, medD1, file, fmtP, fmtL);
  if (sideBranches.length === 0 && allZ0(xyz)) planarStrandCheck(xyz, r.order, medD1, file, fmtP, fmtL);
  if (sideBranches.length === 0) foldCheck(xyz, r.pathXyz, r.closed, r.order, r.s, medD1, file, fmtP, fmtL);
  if (sideBranches.length === 0) densityCheck(xyz, r.order, r.s, r.closed, r.length, file, fmtP, fmtL);
  for (const b of sideBranches.slice(0, 5)) {
    diagnostics.push(`long side branch of ${b.points} points reaching ${fmtL(b.extent)} from the curve near ${fmtP(b.x, b.y, b.z)}: a self-crossing or a branch; the ordering may be wrong there`);
  }
  if (sideBranches.length > 5) diagnostics.push(`${sideBranches.length - 5} more long side branches`);
  const allZero = allZ0(xyz);
  const out = new Float64Array(3 * r.order.length);
  r.order.forEach((i, j) => out.set(xyz.subarray(3 * i, 3 * i + 3), 3 * j));
  return {
    trace: {
      xyz: out,
      closed: r.closed,
      dims: options.dims ?? (allZero ? 2 : 3),
      source: makeSource(file, options.unit, options.pixelSize),
      cloudOrder: { across: medRho, spacing: medD1 },
      diagnostics,
      rows: Int32Array.from(r.order, (i) => i + 1),
    },
    outliers: outlierIndices.length,
    outlierIndices: Uint32Array.from(outlierIndices),
    order: r.order,
    s: r.s,
    path: r.pathXyz,
    closed: r.closed,
    sideBranches,
  };
}

interface Forest {
  /** Points of each piece, largest first. */
  readonly pieces: number[][];
  readonly kept: number;
  /** Tree adjacency (CSR over all n points). */
  readonly start: Uint32Array;
  readonly to: Uint32Array;
  readonly len: Float64Array;
}

/** Kruskal's minimum spanning forest of the kNN graph over the points not marked as outliers. */
function spanningForest(n: number, k: number, ids: Uint32Array, d2: Float64Array, outlier: Uint8Array): Forest {
  const cand: number[] = [];
  for (let i = 0; i < n; i++) {
    if (outlier[i]) continue;
    for (let j = 0; j < k; j++) {
      const e = i * k + j;
      if (Number.isFinite(d2[e]) && !outlier[ids[e]]) cand.push(e);
    }
  }
  const order = Uint32Array.from(cand).sort((a, b) => d2[a] - d2[b]);
  const uf = new UnionFind(n);
  const ea: number[] = [], eb: number[] = [], el: number[] = [];
  for (const e of order) {
    const a = Math.floor(e / k), b = ids[e];
    if (uf.find(a) === uf.find(b)) continue;
    uf.union(a, b);
    ea.push(a);
    eb.push(b);
    el.push(Math.sqrt(d2[e]));
  }
  const start = new Uint32Array(n + 1);
  for (let e = 0; e < ea.length; e++) {
    start[ea[e] + 1]++;
    start[eb[e] + 1]++;
  }
  for (let i = 0; i < n; i++) start[i + 1] += start[i];
  const fill = start.slice(0, n);
  const to = new Uint32Array(2 * ea.length), len = new Float64Array(2 * ea.length);
  for (let e = 0; e < ea.length; e++) {
    to[fill[ea[e]]] = eb[e];
    len[fill[ea[e]]++] = el[e];
    to[fill[eb[e]]] = ea[e];
    len[fill[eb[e]]++] = el[e];
  }
  const groups = new Map<number, number[]>();
  let kept = 0;
  for (let i = 0; i < n; i++) {
    if (outlier[i]) continue;
    kept++;
    const r = uf.find(i);
    const g = groups.get(r);
    if (g) g.push(i);
    else groups.set(r, [i]);
  }
  return { pieces: [...groups.values()].sort((a, b) => b.length - a.length), kept, start, to, len };
}

/** Tree distances from `src` over the piece; returns distances (NaN off the piece) and parents. */
function treeSweep(f: Forest, n: number, src: number): { dist: Float64Array; parent: Int32Array; far: number } {
  const dist = new Float64Array(n).fill(NaN), parent = new Int32Array(n).fill(-1);
  dist[src] = 0;
  const stack = [src];
  let far = src;
  while (stack.length > 0) {
    const u = stack.pop() as number;
    if (dist[u] > dist[far]) far = u;
    for (let s = f.start[u]; s < f.start[u + 1]; s++) {
      const v = f.to[s];
      if (!Number.isNaN(dist[v])) continue;
      dist[v] = dist[u] + f.len[s];
      parent[v] = u;
      stack.push(v);
    }
  }
  return { dist, parent, far };
}

function orderOnce(xyz: Readonly<Float64Array>, f: Forest, outlier: Uint8Array, smoothFraction: number, closeGap: number, forceClosed: boolean | undefined) {
  const n = xyz.length / 3;
  const piece = f.pieces[0];
  // 3. diameter path
  const a = treeSweep(f, n, piece[0]).far;
  const sweep = treeSweep(f, n, a);
  const pathIds: number[] = [];
  for (let v = sweep.far; v !== -1; v = sweep.parent[v]) pathIds.push(v);
  const m = pathIds.length;
  const raw = new Float64Array(3 * m);
  pathIds.forEach((v, i) => raw.set(xyz.subarray(3 * v, 3 * v + 3), 3 * i));
  const half = Math.max(1, Math.round((smoothFraction * m) / 2));
  let pathXyz = runningMean(raw, false, half);
  let length = polylineLength(pathXyz, false);
  let gap = Math.hypot(pathXyz[0] - pathXyz[3 * m - 3], pathXyz[1] - pathXyz[3 * m - 2], pathXyz[2] - pathXyz[3 * m - 1]);
  const nearEnds = m >= 8 && gap < closeGap * length;
  const closure = nearEnds ? closingStep(raw, pathXyz, gap) : undefined;
  const closed = forceClosed ?? (nearEnds && (closure as ClosingStep).closes);
  if (closed) {
    pathXyz = runningMean(raw, true, half);
    length = polylineLength(pathXyz, true);
    gap = Math.hypot(pathXyz[0] - pathXyz[3 * m - 3], pathXyz[1] - pathXyz[3 * m - 2], pathXyz[2] - pathXyz[3 * m - 1]);
  }
  // cumulative arc length of the smoothed path
  const cum = new Float64Array(m + 1);
  for (let i = 1; i <= m; i++) {
    const p = 3 * (i - 1), q = 3 * (i % m);
    cum[i] = cum[i - 1] + (i < m || closed ? Math.hypot(pathXyz[q] - pathXyz[p], pathXyz[q + 1] - pathXyz[p + 1], pathXyz[q + 2] - pathXyz[p + 2]) : 0);
  }
  // 4. foot points
  const pathTree = new KdTree(pathXyz);
  const one = new Uint32Array(1), oneD = new Float64Array(1);
  const sOf = new Float64Array(n).fill(NaN), rhoAll = new Float64Array(n).fill(NaN);
  // offset of each point from its foot point on the path (m, interleaved)
  const offAll = new Float64Array(3 * n).fill(NaN);
  const segs = closed ? m : m - 1;
  for (const i of piece) {
    const x = xyz[3 * i], y = xyz[3 * i + 1], z = xyz[3 * i + 2];
    pathTree.knn(x, y, z, 1, one, oneD);
    const v = one[0];
    let best = Math.sqrt(oneD[0]), bs = cum[v];
    let ox = x - pathXyz[3 * v], oy = y - pathXyz[3 * v + 1], oz = z - pathXyz[3 * v + 2];
    for (const sg of [v - 1, v]) {
      const s0 = closed ? ((sg % m) + m) % m : sg;
      if (s0 < 0 || s0 >= segs) continue;
      const p = 3 * s0, q = 3 * ((s0 + 1) % m);
      const dx = pathXyz[q] - pathXyz[p], dy = pathXyz[q + 1] - pathXyz[p + 1], dz = pathXyz[q + 2] - pathXyz[p + 2];
      const l2 = dx * dx + dy * dy + dz * dz;
      if (!(l2 > 0)) continue;
      const tRaw = ((x - pathXyz[p]) * dx + (y - pathXyz[p + 1]) * dy + (z - pathXyz[p + 2]) * dz) / l2;
      // beyond an open end the parameter is extrapolated, so points past the last vertex stay ordered
      const t = Math.max(!closed && s0 === 0 ? -Infinity : 0, Math.min(!closed && s0 === segs - 1 ? Infinity : 1, tRaw));
      const tc = Math.max(0, Math.min(1, tRaw));
      const d = Math.hypot(x - pathXyz[p] - tc * dx, y - pathXyz[p + 1] - tc * dy, z - pathXyz[p + 2] - tc * dz);
      if (d < best) {
        best = d;
        bs = cum[s0] + t * (cum[s0 + 1] - cum[s0]);
        ox = x - pathXyz[p] - tc * dx;
        oy = y - pathXyz[p + 1] - tc * dy;
        oz = z - pathXyz[p + 2] - tc * dz;
      }
    }
    sOf[i] = closed && bs >= cum[m] ? bs - cum[m] : bs;
    rhoAll[i] = best;
    offAll[3 * i] = ox;
    offAll[3 * i + 1] = oy;
    offAll[3 * i + 2] = oz;
  }
  // side branches: subtrees hanging off the diameter path
  const onPath = new Int32Array(n).fill(-1);
  pathIds.forEach((v, i) => (onPath[v] = i));
  const branches: { attach: number; members: number[]; maxRho: number }[] = [];
  for (const v of pathIds) {
    for (let s = f.start[v]; s < f.start[v + 1]; s++) {
      const root = f.to[s];
      if (onPath[root] !== -1) continue;
      const members: number[] = [];
      const stack = [root];
      const from = new Map<number, number>([[root, v]]);
      let maxRho = 0;
      while (stack.length > 0) {
        const u = stack.pop() as number;
        members.push(u);
        maxRho = Math.max(maxRho, rhoAll[u]);
        for (let t = f.start[u]; t < f.start[u + 1]; t++) {
          const w = f.to[t];
          if (w === from.get(u)) continue;
          from.set(w, u);
          stack.push(w);
        }
      }
      branches.push({ attach: onPath[v], members, maxRho });
    }
  }
  const order = Uint32Array.from(piece).sort((p, q) => sOf[p] - sOf[q] || p - q);
  void outlier;
  return {
    order,
    s: Float64Array.from(order, (i) => sOf[i]),
    rho: Float64Array.from(piece, (i) => rhoAll[i]),
    rhoOf: (i: number) => rhoAll[i],
    offAll,
    branches,
    pathXyz,
    closed,
    length,
    gap,
    half,
    closure,
    raw,
  };
}

/**
 * Least distance, in end gaps, between the middle half of the step that would close the path and
 * the path's segments more than CLOSE_FAR_GAPS end gaps along it from both ends (arc length of the
 * running mean), for the step to close the path. The chord between an open spiral's centre and
 * outer end runs across its other turns: the 308-cloud corpus's open spirals whose ends come within
 * 5% of their length (200-600 points, planar) gave 0 (a segment crosses it); its rings, planar rings
 * and filled tube rings (200-2000 points, noise 0-1 nm) 1.48 at least, and a wider scan of 1080
 * rings and tilted loops (60-5000 points, noise 0-3 nm, even and random; 932 with ends within 5%) 0.28 at least.
 */
const CLOSE_CLEAR = 0.1;
/** Arc length from either end, in end gaps, beyond which a segment near the closing step is another part of the wire. */
const CLOSE_FAR_GAPS = 2;
/** Fraction of the closing step at each end left out of the test (where the path's own ends wander). */
const CLOSE_MID = 0.25;

interface ClosingStep {
  /** Whether no other part of the wire lies near the step between the ends (CLOSE_CLEAR). */
  readonly closes: boolean;
  /** Least distance of a segment far from both ends from the middle of the step between them, in end gaps. */
  readonly clear: number;
  /** That segment's end vertex (index into the path). */
  readonly nearest: number;
}

/**
 * Whether the step between the ends of a path (`raw` its vertices, `smooth` their open running mean,
 * m by 3, `gap` the ends' distance) closes it: no segment more than CLOSE_FAR_GAPS gaps along the
 * path from both ends passes within CLOSE_CLEAR gaps of the middle of the chord between them (a
 * loop's two ends meet across the step; a spiral's centre and outer end have its other turns
 * between them).
 */
function closingStep(raw: Float64Array, smooth: Float64Array, gap: number): ClosingStep {
  const m = raw.length / 3;
  const cum = new Float64Array(m);
  for (let i = 1; i < m; i++) cum[i] = cum[i - 1] + Math.hypot(smooth[3 * i] - smooth[3 * i - 3], smooth[3 * i + 1] - smooth[3 * i - 2], smooth[3 * i + 2] - smooth[3 * i - 1]);
  const total = cum[m - 1];
  // the middle of the chord from the last vertex to the first
  const e = 3 * (m - 1);
  const a = [0, 1, 2].map((c) => raw[e + c] + CLOSE_MID * (raw[c] - raw[e + c]));
  const b = [0, 1, 2].map((c) => raw[e + c] + (1 - CLOSE_MID) * (raw[c] - raw[e + c]));
  let least = Infinity, nearest = -1;
  for (let i = 1; i < m; i++) {
    if (Math.min(cum[i - 1], total - cum[i]) <= CLOSE_FAR_GAPS * gap) continue;
    const d = segmentDistance(a, b, raw.subarray(3 * i - 3, 3 * i), raw.subarray(3 * i, 3 * i + 3));
    if (d < least) {
      least = d;
      nearest = i;
    }
  }
  const clear = gap > 0 ? least / gap : Infinity;
  return { closes: clear > CLOSE_CLEAR, clear, nearest };
}

/**
 * Least distance between the segments p1-q1 and p2-q2 (3D): the closest points' parameters from
 * the 2 x 2 normal equations, clamped to the segments in turn (Ericson 2005, "Real-Time Collision
 * Detection", section 5.1.9).
 */
function segmentDistance(p1: ArrayLike<number>, q1: ArrayLike<number>, p2: ArrayLike<number>, q2: ArrayLike<number>): number {
  const d1 = [q1[0] - p1[0], q1[1] - p1[1], q1[2] - p1[2]], d2 = [q2[0] - p2[0], q2[1] - p2[1], q2[2] - p2[2]];
  const r = [p1[0] - p2[0], p1[1] - p2[1], p1[2] - p2[2]];
  const dot = (u: number[], v: number[]) => u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
  const a = dot(d1, d1), e = dot(d2, d2), f = dot(d2, r);
  const clamp = (x: number) => Math.max(0, Math.min(1, x));
  let s: number, t: number;
  if (a <= 0 && e <= 0) {
    s = 0;
    t = 0;
  } else if (a <= 0) {
    s = 0;
    t = clamp(f / e);
  } else {
    const c = dot(d1, r);
    if (e <= 0) {
      t = 0;
      s = clamp(-c / a);
    } else {
      const b = dot(d1, d2), denom = a * e - b * b;
      s = denom > 0 ? clamp((b * f - c * e) / denom) : 0;
      t = (b * s + f) / e;
      if (t < 0) {
        t = 0;
        s = clamp(-c / a);
      } else if (t > 1) {
        t = 1;
        s = clamp((b - c) / a);
      }
    }
  }
  return Math.hypot(r[0] + s * d1[0] - t * d2[0], r[1] + s * d1[1] - t * d2[1], r[2] + s * d1[2] - t * d2[2]);
}

function runningMean(p: Float64Array, closed: boolean, half: number): Float64Array {
  const n = p.length / 3;
  const out = new Float64Array(p.length);
  for (let i = 0; i < n; i++) {
    const w = closed ? Math.min(half, Math.floor((n - 1) / 2)) : Math.min(half, i, n - 1 - i);
    for (let c = 0; c < 3; c++) {
      let s = 0;
      for (let k = -w; k <= w; k++) s += p[3 * ((((i + k) % n) + n) % n) + c];
      out[3 * i + c] = s / (2 * w + 1);
    }
  }
  return out;
}


/** Whether every z coordinate is 0 (a planar cloud). */
function allZ0(xyz: Readonly<Float64Array>): boolean {
  for (let i = 2; i < xyz.length; i += 3) if (xyz[i] !== 0) return false;
  return true;
}

/** Fewest points of a run that continues a wire (fewer may be a small cluster of strays). */
const RUN_POINTS = 10;
/** Elongation (ratio of the largest to the second principal spread) above which a group of points is a run along a wire, not a clump. */
const RUN_ELONGATION = 3;

/**
 * Refuses when a group of points about to be left out as outliers is a run along a wire: at least
 * 10 points, and elongated (principal spreads: the eigenvalues of the 3x3 covariance, `symEigen3`).
 */
function refuseRun(xyz: Readonly<Float64Array>, g: readonly number[], file: string, fmtP: (x: number, y: number, z: number) => string, how: string): void {
  if (g.length < RUN_POINTS) return;
  const [l1, l2] = principalSpreads(xyz, g);
  if (!(l1 > RUN_ELONGATION * RUN_ELONGATION * l2)) return;
  // the run's ends: the point farthest from the first, then the point farthest from that one
  const far = (from: number) => {
    let best = from, bd = -1;
    for (const i of g) {
      const d = (xyz[3 * i] - xyz[3 * from]) ** 2 + (xyz[3 * i + 1] - xyz[3 * from + 1]) ** 2 + (xyz[3 * i + 2] - xyz[3 * from + 2]) ** 2;
      if (d > bd) {
        bd = d;
        best = i;
      }
    }
    return best;
  };
  const a = far(g[0]), b = far(a);
  const p = (i: number) => fmtP(xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2]);
  throw new InputError(file, null, "points",
    `a run of ${g.length} points from ${p(a)} to ${p(b)} lies ${how} but continues along a line (not a cluster of stray points): it is part of a wire sampled more sparsely or a separate wire; sample the wire evenly, or give one wire per file`);
}

/** Largest and second eigenvalue of the covariance of the points `g`. */
function principalSpreads(xyz: Readonly<Float64Array>, g: readonly number[]): [number, number] {
  const c = new Float64Array(9);
  pointCovariance(xyz, g, 0, g.length, new Float64Array(3), c);
  const { values } = symEigen3(c);
  return [values[2], values[1]];
}

/**
 * Mean (into `mean`) and covariance (into `c`, 3x3 row-major, over the count) of the points
 * pts[3 idx[k] ..] for k in [from, to).
 */
function pointCovariance(pts: Readonly<Float64Array>, idx: ArrayLike<number>, from: number, to: number, mean: Float64Array, c: Float64Array): void {
  const count = to - from;
  let mx = 0, my = 0, mz = 0;
  for (let k = from; k < to; k++) {
    const i = idx[k];
    mx += pts[3 * i];
    my += pts[3 * i + 1];
    mz += pts[3 * i + 2];
  }
  mx /= count;
  my /= count;
  mz /= count;
  let xx = 0, xy = 0, xz = 0, yy = 0, yz = 0, zz = 0;
  for (let k = from; k < to; k++) {
    const i = idx[k];
    const dx = pts[3 * i] - mx, dy = pts[3 * i + 1] - my, dz = pts[3 * i + 2] - mz;
    xx += dx * dx; xy += dx * dy; xz += dx * dz; yy += dy * dy; yz += dy * dz; zz += dz * dz;
  }
  mean[0] = mx; mean[1] = my; mean[2] = mz;
  c[0] = xx / count; c[1] = xy / count; c[2] = xz / count;
  c[3] = c[1]; c[4] = yy / count; c[5] = yz / count;
  c[6] = c[2]; c[7] = c[5]; c[8] = zz / count;
}

/** Widest gap, in median gaps, that the fit accepts (GAP_LIMIT of the fit guard), with a margin. */
const DENSITY_GAP_RATIO = 0.6 * GAP_LIMIT;
/** How much sparser than the whole cloud a stretch must be for its gaps to count as a density change. */
const DENSITY_RATIO = 2.5;

/**
 * The fit refuses a gap wider than GAP_LIMIT median gaps (fitGuard). A cloud whose density changes
 * along the wire has such gaps in its sparse stretch without missing any of the wire: this names
 * the cause. When the widest gap between consecutive ordered points exceeds 0.6 GAP_LIMIT median
 * gaps and the median gap around it (31 gaps) is over 2.5 times the median of the whole cloud,
 * the cloud is refused naming where its sparse stretch starts and ends (where the median of 31
 * gaps falls to the geometric mean of the two medians). A gap in an evenly sampled cloud is left to the fit's own message.
 */
function densityCheck(
  xyz: Readonly<Float64Array>, order: Uint32Array, s: Float64Array, closed: boolean, length: number, file: string,
  fmtP: (x: number, y: number, z: number) => string, fmtL: (v: number) => string,
): void {
  const m = order.length;
  const half = 15;
  if (m < 4 * half) return;
  const gaps = new Float64Array(closed ? m : m - 1);
  for (let i = 1; i < m; i++) gaps[i - 1] = s[i] - s[i - 1];
  if (closed) gaps[m - 1] = length - s[m - 1] + s[0];
  const g = gaps.length;
  const med = median(gaps);
  if (!(med > 0)) return;
  let widest = 0;
  for (let i = 1; i < g; i++) if (gaps[i] > gaps[widest]) widest = i;
  if (gaps[widest] <= DENSITY_GAP_RATIO * med) return;
  const localMedian = (c: number) => {
    const w: number[] = [];
    for (let t = c - half; t <= c + half; t++) {
      if (closed) w.push(gaps[((t % g) + g) % g]);
      else if (t >= 0 && t < g) w.push(gaps[t]);
    }
    return median(Float64Array.from(w));
  };
  const here = localMedian(widest);
  if (here < DENSITY_RATIO * med) return;
  // the sparse stretch: walk both ways while the local median stays nearer (geometric mean) its
  // value at the widest gap than the whole cloud's median
  const edge = Math.sqrt(here * med);
  let lo = widest, hi = widest;
  for (let steps = 0; steps < g && (closed || lo > 0) && localMedian(lo - 1) >= edge; steps++) lo--;
  for (let steps = 0; steps < g && (closed || hi < g - 1) && localMedian(hi + 1) >= edge; steps++) hi++;
  const at = (t: number) => {
    const i = order[((t % m) + m) % m];
    return fmtP(xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2]);
  };
  throw new InputError(file, null, "points",
    `the point density changes along the wire: from ${at(lo)} to ${at(hi + 1)} the points are ${(here / med).toFixed(1)}x sparser than over the whole cloud (median spacing ${fmtL(here)} against ${fmtL(med)}; widest step ${fmtL(gaps[widest])}), which the fit would take for gaps; sample the wire evenly, or split the cloud there`);
}


/** Consecutive ordered points per window of the strand test. */
const STRAND_WINDOW = 60;
/**
 * Second over first principal spread (variance) of the points' offsets from the path below which a
 * window's cross-section is flat (one lateral direction). A wire with isotropic noise or a filled
 * tube gives about 0.75 (60-point windows of the sweep's 3D clouds: medians 0.65-0.78); two strands
 * 2 nm apart with 0.55 nm of noise gave 0.24, a coil with touching turns 0.14.
 */
const STRAND_FLATNESS = 0.35;
/**
 * Kurtosis (fourth moment over the squared second) of the offsets along the flat direction below
 * which they split into two groups: a normal distribution has 3 and two equal point masses 1
 * (textbook moments); the sweep's noisy single wires gave window medians 2.6-3.3, filled tubes
 * 2.1-2.2, two strands 2 nm apart 2.2 (measured).
 */
const STRAND_KURTOSIS = 2.4;
/**
 * Least distance between strands, in median nearest-neighbour spacings (`spacing`), for the test to
 * speak: two strands 2 nm apart at 0.55 nm spacing are 3.5 spacings apart, a coil with touching
 * turns 7; noise-free clouds, whose offsets are the path's bias across a bend, 0.1-0.25.
 */
const STRAND_SPACINGS = 2;

/**
 * Two or more strands side by side read as one cloud: the orderer's path runs between them and the
 * ordered points zigzag from one to the other, which the fit later takes for gaps or a divergence.
 * In windows of STRAND_WINDOW consecutive ordered points, the points' offsets from the path
 * (perpendicular to it) spread along one lateral direction only (STRAND_FLATNESS) and split into two
 * groups along it (STRAND_KURTOSIS). When the medians over the windows do both, the cloud is refused,
 * naming the strands' distance (2 sqrt(l1 - l2) per window, l1 >= l2 the two lateral variances: two
 * equal groups a apart with isotropic noise give l1 - l2 = a^2 / 4, textbook moments) and where the
 * flagged windows start and end, when that distance is over STRAND_SPACINGS median nearest-neighbour
 * spacings (`spacing`). 3D clouds only: a planar cloud's offsets are always in one direction.
 */
function strandCheck(
  xyz: Readonly<Float64Array>, off: Float64Array, order: Uint32Array, spacing: number, file: string,
  fmtP: (x: number, y: number, z: number) => string, fmtL: (v: number) => string,
): void {
  const m = order.length;
  if (m < 4 * STRAND_WINDOW) return;
  const c = new Float64Array(9), mean = new Float64Array(3);
  const flat: number[] = [], kurt: number[] = [], sep: number[] = [], flagged: number[] = [];
  for (let w0 = 0; w0 + STRAND_WINDOW <= m; w0 += STRAND_WINDOW) {
    pointCovariance(off, order, w0, w0 + STRAND_WINDOW, mean, c);
    const [mx, my, mz] = mean;
    const { values, vectors } = symEigen3(c);
    if (!(values[2] > 0)) continue;
    let m2 = 0, m4 = 0;
    for (let j = 0; j < STRAND_WINDOW; j++) {
      const i = order[w0 + j];
      const x = (off[3 * i] - mx) * vectors[6] + (off[3 * i + 1] - my) * vectors[7] + (off[3 * i + 2] - mz) * vectors[8];
      m2 += x * x;
      m4 += x ** 4;
    }
    const k = (m4 / STRAND_WINDOW) / (m2 / STRAND_WINDOW) ** 2, f = values[1] / values[2];
    flat.push(f);
    kurt.push(k);
    sep.push(2 * Math.sqrt(Math.max(0, values[2] - values[1])));
    if (f < STRAND_FLATNESS && k < STRAND_KURTOSIS) flagged.push(w0);
  }
  if (flat.length < 4 || !(median(Float64Array.from(flat)) < STRAND_FLATNESS && median(Float64Array.from(kurt)) < STRAND_KURTOSIS)) return;
  // strands closer than a few point spacings are not told apart from the path's own bias (a
  // noise-free curve's offsets are one-sided, across the bend)
  const apart = median(Float64Array.from(sep));
  if (!(apart > STRAND_SPACINGS * spacing)) return;
  const at = (j: number) => fmtP(xyz[3 * order[j]], xyz[3 * order[j] + 1], xyz[3 * order[j] + 2]);
  throw new InputError(file, null, "points",
    `the cloud looks like two or more strands side by side, about ${fmtL(apart)} apart, from ${at(flagged[0])} to ${at(flagged[flagged.length - 1] + STRAND_WINDOW - 1)} (across the path its points spread in one direction and split into two groups, in ${flagged.length} of ${flat.length} stretches of ${STRAND_WINDOW} points): ordered as one wire they zigzag between the strands; give one wire per file, or a centre-line trace`);
}


/** Reach of the fold search, in median nearest-neighbour spacings: legs farther apart are not looked for. */
const FOLD_REACH = 40;
/** Path vertices either side of a vertex for its tangent in the fold search. */
const FOLD_TANGENT = 3;
/** Cosine of the angle between the two legs' tangents under which they run back (antiparallel). */
const FOLD_ANTIPARALLEL = -0.5;
/** Least length of a fold's run, in median spacings and in leg distances: shorter brushes are left alone. */
const FOLD_RUN_SPACINGS = 20;
const FOLD_RUN_DISTANCES = 4;
/** Legs closer than this many median spacings turn back tighter than the points resolve. */
const FOLD_TIGHT = 6;
/** A step between consecutive ordered points at the turn longer than this fraction of the legs' distance: the turn has no points. */
const FOLD_JUMP = 0.5;

/**
 * The ordered path runs back along itself: a stretch of the smoothed path has, for every vertex, a
 * vertex farther than 2 reaches along the path but within FOLD_REACH median spacings in space whose
 * tangent points the other way. Two strands side by side that the spanning tree joins near one
 * end give this (up one strand and back down the other, often closed into a loop by the other
 * ends); so does a real hairpin. The fold is refused when its legs are closer than FOLD_TIGHT
 * spacings (a turn of radius under 3 spacings is not resolved by the points) or when the turn is a
 * single step across (a step of over FOLD_JUMP times the legs' distance between consecutive
 * ordered points at the fold: no points in the turn), naming where. When that step is the one that
 * closes a closed curve, the other reading is an open wire whose ends lie close together (the
 * orderer closes a curve whose end gap is under `closeGap` of its length), declared open it is kept.
 * Measured on invented clouds: two strands 200 nm long, 4-8 nm apart with 0.15-0.7 nm of noise,
 * planar or also apart in z, that the orderer read up one and down the other (exit 0 before,
 * mostly as closed loops of about 400 nm): legs 7.7-26 spacings apart, widest step 0.69-0.97 of
 * that; open hairpins with legs 4-8 nm apart that had been closed across their ends: 0.89-1.16.
 * Kept: hairpins and closed stadiums with turns of 2-10 nm radius sampled every 0.5 nm (legs
 * 7.7-40 spacings, widest step 0.03-0.34 of the legs' distance), and the folds the search finds
 * across coarse helices, spirals and filled tubes (legs 18 spacings and more, step 0.28 at most).
 */
function foldCheck(
  xyz: Readonly<Float64Array>, path: Float64Array, closed: boolean, order: Uint32Array, s: Float64Array, spacing: number, file: string,
  fmtP: (x: number, y: number, z: number) => string, fmtL: (v: number) => string,
): void {
  const m = path.length / 3;
  if (m < 8 || !(spacing > 0)) return;
  const cum = new Float64Array(m + 1);
  for (let i = 1; i <= m; i++) {
    const p = 3 * (i - 1), q = 3 * (i % m);
    cum[i] = cum[i - 1] + (i < m || closed ? Math.hypot(path[q] - path[p], path[q + 1] - path[p + 1], path[q + 2] - path[p + 2]) : 0);
  }
  const total = cum[m];
  const arc = (i: number, j: number) => {
    const a = Math.abs(cum[i] - cum[j]);
    return closed ? Math.min(a, total - a) : a;
  };
  const at = (i: number) => (closed ? ((i % m) + m) % m : Math.max(0, Math.min(m - 1, i)));
  const tan = new Float64Array(3 * m);
  for (let i = 0; i < m; i++) {
    const a = 3 * at(i - FOLD_TANGENT), b = 3 * at(i + FOLD_TANGENT);
    const tx = path[b] - path[a], ty = path[b + 1] - path[a + 1], tz = path[b + 2] - path[a + 2];
    const l = Math.hypot(tx, ty, tz);
    if (l > 0) {
      tan[3 * i] = tx / l;
      tan[3 * i + 1] = ty / l;
      tan[3 * i + 2] = tz / l;
    }
  }
  // vertices hashed into cubes of one reach
  const reach = FOLD_REACH * spacing;
  const cell = (v: number) => Math.floor(v / reach);
  const hash = (cx: number, cy: number, cz: number) => (cx * 73856093) ^ (cy * 19349663) ^ (cz * 83492791);
  const cubes = new Map<number, number[]>();
  for (let i = 0; i < m; i++) {
    const h = hash(cell(path[3 * i]), cell(path[3 * i + 1]), cell(path[3 * i + 2]));
    const list = cubes.get(h);
    if (list) list.push(i);
    else cubes.set(h, [i]);
  }
  const leg = new Float64Array(m).fill(Infinity);
  for (let i = 0; i < m; i++) {
    const x = path[3 * i], y = path[3 * i + 1], z = path[3 * i + 2];
    const cx = cell(x), cy = cell(y), cz = cell(z);
    for (let dx = -1; dx <= 1; dx++) for (let dy = -1; dy <= 1; dy++) for (let dz = -1; dz <= 1; dz++) {
      for (const j of cubes.get(hash(cx + dx, cy + dy, cz + dz)) ?? []) {
        const d = Math.hypot(path[3 * j] - x, path[3 * j + 1] - y, path[3 * j + 2] - z);
        if (!(d < reach && d < leg[i]) || arc(i, j) < 2 * reach) continue;
        if (tan[3 * i] * tan[3 * j] + tan[3 * i + 1] * tan[3 * j + 1] + tan[3 * i + 2] * tan[3 * j + 2] > FOLD_ANTIPARALLEL) continue;
        leg[i] = d;
      }
    }
  }
  // runs of consecutive vertices with a leg opposite (a closed path starts after a vertex without)
  let first = 0;
  if (closed) while (first < m && Number.isFinite(leg[first])) first++;
  if (first === m) first = 0;
  const ordered = order.length;
  const stepAfter = (j: number) => {
    const a = order[j], b = order[(j + 1) % ordered];
    return Math.hypot(xyz[3 * b] - xyz[3 * a], xyz[3 * b + 1] - xyz[3 * a + 1], xyz[3 * b + 2] - xyz[3 * a + 2]);
  };
  for (let k = 0; k < m; ) {
    const i0 = (first + k) % m;
    if (!Number.isFinite(leg[i0])) {
      k++;
      continue;
    }
    let len = 0;
    while (len < m - k && Number.isFinite(leg[(first + k + len) % m])) len++;
    const ids = Array.from({ length: len }, (_, t) => (first + k + t) % m);
    k += len;
    const i1 = ids[len - 1];
    const runLength = closed ? (cum[i1] - cum[i0] + total) % total : cum[i1] - cum[i0];
    const apart = median(Float64Array.from(ids, (i) => leg[i]));
    if (runLength < FOLD_RUN_SPACINGS * spacing || runLength < FOLD_RUN_DISTANCES * apart) continue;
    // the widest step between consecutive ordered points from one reach and a leg distance before the run to as far after it
    const margin = reach + apart;
    const from = cum[i0] - margin, to = cum[i0] + runLength + margin;
    // (the step that closes a closed curve apart: a hairpin's open ends close together are closed across it)
    let widest = 0, where = -1, closingStep = 0;
    for (let j = 0; j < (closed ? ordered : ordered - 1); j++) {
      const sj = s[j];
      const inside = closed ? [sj - total, sj, sj + total].some((v) => v >= from && v <= to) : sj >= from && sj <= to;
      if (!inside) continue;
      const st = stepAfter(j);
      if (j === ordered - 1) closingStep = st;
      else if (st > widest) {
        widest = st;
        where = j;
      }
    }
    const closing = !(widest > FOLD_JUMP * apart) && closingStep > FOLD_JUMP * apart;
    if (closing) {
      widest = closingStep;
      where = ordered - 1;
    }
    const jumped = widest > FOLD_JUMP * apart;
    if (!(apart < FOLD_TIGHT * spacing) && !jumped) continue;
    const p = (i: number) => fmtP(path[3 * i], path[3 * i + 1], path[3 * i + 2]);
    let turn: string, readings = "two strands side by side, or a hairpin bent back tighter than the points resolve";
    if (jumped) {
      const a = order[where], b = order[(where + 1) % ordered];
      turn = `turning back by one step of ${fmtL(widest)} between ${fmtP(xyz[3 * a], xyz[3 * a + 1], xyz[3 * a + 2])} and ${fmtP(xyz[3 * b], xyz[3 * b + 1], xyz[3 * b + 2])} with no points in the turn${closing ? " (the step that closes the curve)" : ""}`;
      if (closing) readings = "two strands side by side, or one open wire whose ends lie close together and were joined";
    } else {
      turn = `turning back within ${(apart / 2 / spacing).toFixed(1)} median spacings`;
    }
    throw new InputError(file, null, "points",
      `the ordered path runs back along itself from ${p(i0)} to ${p(i1)} (${fmtL(runLength)} with the other leg about ${fmtL(apart)} away, ${(apart / spacing).toFixed(1)} median spacings), ${turn}: ${readings}; the order along one wire is ambiguous; give one wire per file or a centre-line trace${closing ? ", or declare the wire open" : ""}`);
  }
}

/** Largest ratio of the density at the dip to the lower of the two peaks either side for the offsets across the path to split into two strands. */
const DIP_RATIO = 0.8;
/** Least depth of that dip in standard deviations of its counting noise. */
const DIP_Z = 3;
/** Width of the Gaussian smoothing the offsets' density, in median spacings. */
const DIP_BANDWIDTH = 0.7;
/** Turn (rad) between the first and last thirds of a window over which the window is left out of the dip test. */
const DIP_TURN = 0.7;
/** Residual sum of squares of a window's quadratic over its quartic's above which the window bends too much for a quadratic trend. */
const DIP_SHAPE = 1.3;

/**
 * Least-squares polynomial of `degree` in t through v (normal equations on t scaled to [-1, 1],
 * Gaussian elimination with partial pivoting); residuals into `res`, returns their sum of squares.
 */
function polyResiduals(t: Float64Array, v: Float64Array, degree: number, res: Float64Array): number {
  const n = t.length, k = degree + 1;
  let scale = 0;
  for (let j = 0; j < n; j++) scale = Math.max(scale, Math.abs(t[j]));
  if (!(scale > 0)) scale = 1;
  const a = new Float64Array(k * (k + 1));
  const pw = new Float64Array(2 * k);
  for (let j = 0; j < n; j++) {
    const x = t[j] / scale;
    pw[0] = 1;
    for (let e = 1; e < 2 * k; e++) pw[e] = pw[e - 1] * x;
    for (let r = 0; r < k; r++) {
      for (let c = 0; c < k; c++) a[r * (k + 1) + c] += pw[r + c];
      a[r * (k + 1) + k] += pw[r] * v[j];
    }
  }
  for (let col = 0; col < k; col++) {
    let piv = col;
    for (let r = col + 1; r < k; r++) if (Math.abs(a[r * (k + 1) + col]) > Math.abs(a[piv * (k + 1) + col])) piv = r;
    if (piv !== col) for (let c = 0; c <= k; c++) [a[col * (k + 1) + c], a[piv * (k + 1) + c]] = [a[piv * (k + 1) + c], a[col * (k + 1) + c]];
    const d = a[col * (k + 1) + col];
    if (d === 0) continue;
    for (let r = 0; r < k; r++) {
      if (r === col) continue;
      const f = a[r * (k + 1) + col] / d;
      if (f !== 0) for (let c = col; c <= k; c++) a[r * (k + 1) + c] -= f * a[col * (k + 1) + c];
    }
  }
  let rss = 0;
  for (let j = 0; j < n; j++) {
    const x = t[j] / scale;
    let fit = 0, p = 1;
    for (let e = 0; e < k; e++) {
      const d = a[e * (k + 1) + e];
      if (d !== 0) fit += (a[e * (k + 1) + k] / d) * p;
      p *= x;
    }
    res[j] = v[j] - fit;
    rss += res[j] * res[j];
  }
  return rss;
}

/**
 * Density of the offsets across the path, smoothed with a Gaussian of DIP_BANDWIDTH median spacings
 * (so a ribbon of pixels, offsets on a lattice of one spacing, comes out flat: the ripple of a
 * lattice under that Gaussian is 2 exp(-2 pi^2 0.7^2) = 1e-4 of the mean, Poisson summation,
 * textbook), binned at a quarter of a spacing: of the dips between two peaks whose density is under
 * DIP_RATIO of the lower peak, the most significant one (depth over its counting noise, `z`), its
 * ratio to that peak (1 without one) and the peaks' distance apart.
 */
function offsetDip(u: Float64Array, spacing: number): { ratio: number; apart: number; z: number } {
  const sorted = Float64Array.from(u).sort();
  const lo = sorted[Math.floor(0.005 * (sorted.length - 1))] - 3 * spacing, hi = sorted[Math.ceil(0.995 * (sorted.length - 1))] + 3 * spacing;
  const bin = Math.max(spacing / 4, (hi - lo) / 400);
  const bins = Math.ceil((hi - lo) / bin) + 1;
  const count = new Float64Array(bins);
  for (const v of u) if (v >= lo && v <= hi) count[Math.round((v - lo) / bin)]++;
  const reach = Math.ceil((3 * spacing) / bin);
  const kernel = Float64Array.from({ length: 2 * reach + 1 }, (_, t) => Math.exp(-0.5 * (((t - reach) * bin) / spacing) ** 2));
  const f = new Float64Array(bins);
  for (let b = 0; b < bins; b++) {
    if (count[b] === 0) continue;
    for (let t = -reach; t <= reach; t++) if (b + t >= 0 && b + t < bins) f[b + t] += count[b] * kernel[t + reach];
  }
  const left = new Float64Array(bins), leftAt = new Int32Array(bins), right = new Float64Array(bins), rightAt = new Int32Array(bins);
  for (let b = 0; b < bins; b++) {
    const better = b > 0 && left[b - 1] >= f[b];
    left[b] = better ? left[b - 1] : f[b];
    leftAt[b] = better ? leftAt[b - 1] : b;
  }
  for (let b = bins - 1; b >= 0; b--) {
    const better = b < bins - 1 && right[b + 1] >= f[b];
    right[b] = better ? right[b + 1] : f[b];
    rightAt[b] = better ? rightAt[b + 1] : b;
  }
  // the most significant dip under DIP_RATIO of its lower peak; counting noise of the smoothed
  // density: variance f / sqrt(2) (a Gaussian kernel of height 1 over Poisson counts)
  let ratio = 1, apart = 0, z = 0;
  for (let b = 1; b < bins - 1; b++) {
    const peak = Math.min(left[b], right[b]);
    if (!(peak > 0 && f[b] < DIP_RATIO * peak)) continue;
    const zb = (peak - f[b]) / Math.sqrt((peak + f[b]) / Math.SQRT2);
    if (zb > z) {
      z = zb;
      ratio = f[b] / peak;
      apart = (rightAt[b] - leftAt[b]) * bin;
    }
  }
  return { ratio, apart, z };
}

/**
 * The planar counterpart of `strandCheck`: in a plane the offsets from the path always spread in one
 * direction, and a ribbon of pixels filled across its width (offsets uniform, kurtosis 1.8) splits
 * no better into groups by its kurtosis than two strands 2 nm apart with 0.55 nm of noise (also
 * about 1.8, textbook moments); nor do offsets from the orderer's path show the two strands, since
 * that path wanders between them. So, in each window of STRAND_WINDOW ordered points, the points'
 * distances across the window's principal axis less their least-squares quadratic along it; the
 * windows where the wire turns (over DIP_TURN between the thirds' centroids) or bends in S (the
 * quadratic's residual over DIP_SHAPE times the quartic's) are left out. The pooled distances must
 * dip between two peaks (`offsetDip`: under DIP_RATIO of the lower peak and over DIP_Z SDs of
 * counting noise deep), the peaks over STRAND_SPACINGS median spacings apart; the refusal names
 * their distance and the cloud's ordered ends. Measured on invented clouds: 99 planar single wires
 * (arcs, meanders, spirals, hairpins, rings, random ribbons 3-6 nm wide; 200-2000 points, noise
 * 0-1 nm) and 20 ribbons of pixels 3-7 pixels wide: no dip under 0.8 of its peak (the deepest of
 * any depth 0.94, 1.0 SD); two strands 200 nm long, 400 points each, 2 nm apart with 0.5 nm of
 * noise: 0.59-0.71 and 3.7-5.4 SDs; 1.5 nm apart with 0.3 nm: 0.43-0.54 and 6.7-8.8 SDs; 3 nm
 * apart with 0.7 nm: 0.55-0.62 and 3.9-5.3 SDs. Strands closer than about 4 noise SDs (1.5 nm at
 * 0.5 nm, 2 nm at 0.7 nm) do not dip and are ordered as one wider wire.
 */
function planarStrandCheck(
  xyz: Readonly<Float64Array>, order: Uint32Array, spacing: number, file: string,
  fmtP: (x: number, y: number, z: number) => string, fmtL: (v: number) => string,
): void {
  const m = order.length;
  if (m < 4 * STRAND_WINDOW || !(spacing > 0)) return;
  const c = new Float64Array(9), mean = new Float64Array(3);
  const windows = Math.floor(m / STRAND_WINDOW);
  const u = new Float64Array(windows * STRAND_WINDOW);
  const t = new Float64Array(STRAND_WINDOW), v = new Float64Array(STRAND_WINDOW);
  const third = new Float64Array(9), res2 = new Float64Array(STRAND_WINDOW), res4 = new Float64Array(STRAND_WINDOW);
  let used = 0;
  for (let w = 0; w < windows; w++) {
    const w0 = w * STRAND_WINDOW;
    // left out where the wire turns within the window (the centroids of its thirds)
    third.fill(0);
    for (let j = 0; j < STRAND_WINDOW; j++) {
      const i = order[w0 + j], k = Math.min(2, Math.floor((3 * j) / STRAND_WINDOW));
      third[3 * k] += xyz[3 * i];
      third[3 * k + 1] += xyz[3 * i + 1];
    }
    const ax = third[3] - third[0], ay = third[4] - third[1], bx = third[6] - third[3], by = third[7] - third[4];
    if (!(ax * bx + ay * by > Math.cos(DIP_TURN) * Math.hypot(ax, ay) * Math.hypot(bx, by))) continue;
    // the window's points: along (t) and across (v) their principal axis in the plane
    pointCovariance(xyz, order, w0, w0 + STRAND_WINDOW, mean, c);
    const { vectors } = symEigen3(c);
    const a = order[w0], b = order[w0 + STRAND_WINDOW - 1];
    const sign = Math.sign((xyz[3 * b] - xyz[3 * a]) * vectors[6] + (xyz[3 * b + 1] - xyz[3 * a + 1]) * vectors[7]) || 1;
    const ex = sign * vectors[6], ey = sign * vectors[7];
    for (let j = 0; j < STRAND_WINDOW; j++) {
      const i = order[w0 + j];
      const dx = xyz[3 * i] - mean[0], dy = xyz[3 * i + 1] - mean[1];
      t[j] = dx * ex + dy * ey;
      v[j] = -dx * ey + dy * ex;
    }
    // across the window's quadratic trend, left out when a quartic fits much better (an S-bend)
    const rss2 = polyResiduals(t, v, 2, res2), rss4 = polyResiduals(t, v, 4, res4);
    if (!(rss2 <= DIP_SHAPE * rss4)) continue;
    for (let j = 0; j < STRAND_WINDOW; j++) u[used++] = res2[j];
  }
  if (used < 4 * STRAND_WINDOW) return;
  const { ratio, apart, z } = offsetDip(u.subarray(0, used), DIP_BANDWIDTH * spacing);
  if (!(ratio < DIP_RATIO && z > DIP_Z && apart > STRAND_SPACINGS * spacing)) return;
  const at = (j: number) => fmtP(xyz[3 * order[j]], xyz[3 * order[j] + 1], xyz[3 * order[j] + 2]);
  throw new InputError(file, null, "points",
    `the cloud looks like two strands side by side, about ${fmtL(apart)} apart, from ${at(0)} to ${at(m - 1)} (across the path its points split into two groups, the density between them ${(ratio * 100).toFixed(0)}% of the groups'): ordered as one wire they zigzag between the strands; give one wire per file, or a centre-line trace`);
}
