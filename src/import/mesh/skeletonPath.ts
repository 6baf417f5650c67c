import type { LevelLoop, LevelSetGraph } from "./levelSets.js";

/** Result of reducing a level-set graph to one wire. */
export interface SkeletonPath {
  readonly kind: "open" | "closed" | "branched" | "complex" | "pieces";
  /** Loops along the main path, in order (for "branched": the longest path). */
  readonly loops: readonly LevelLoop[];
  /** Junctions (nodes of degree >= 3 left after pruning): position (m) and arm lengths (m). */
  readonly junctions: readonly { x: number; y: number; z: number; arms: number[] }[];
  /** Number of side spurs pruned and the longest pruned length (m). */
  readonly pruned: number;
  readonly prunedMax: number;
  /** Independent cycles left (0 for a tree, 1 for a ring): edges - nodes + pieces. */
  readonly cycles: number;
  /** Connected pieces of the graph left ("pieces" when more than 1: wires that touch without a junction). */
  readonly pieces: number;
}

/**
 * Reduces a level-set graph (nodes: band pieces, edges: loops) to an ordered path or ring.
 * Leaf chains shorter than `spurLength` that hang off a junction are pruned (noise bumps, the disc
 * levels around the source on a torus), repeatedly; what is left is classified as a path, a single
 * cycle (a closed ring), a tree with junctions (branched), something with several cycles, or
 * separate pieces (wires that touch without a junction: one piece of surface, several paths).
 * Edge lengths are distances between node positions (means of the incident loop centroids).
 * Cost O(nodes + loops).
 */
export function skeletonPath(graph: LevelSetGraph, spurLength: number): SkeletonPath {
  const nN = graph.nodes, L = graph.loops;
  const nx = new Float64Array(nN), ny = new Float64Array(nN), nz = new Float64Array(nN), cnt = new Float64Array(nN);
  const adj: number[][] = Array.from({ length: nN }, () => []);
  L.forEach((q, e) => {
    for (const v of [q.lower, q.upper]) {
      nx[v] += q.x;
      ny[v] += q.y;
      nz[v] += q.z;
      cnt[v]++;
    }
    adj[q.lower].push(e);
    adj[q.upper].push(e);
  });
  for (let v = 0; v < nN; v++) {
    if (cnt[v] > 0) {
      nx[v] /= cnt[v];
      ny[v] /= cnt[v];
      nz[v] /= cnt[v];
    }
  }
  const alive = new Uint8Array(L.length).fill(1);
  const other = (e: number, v: number) => (L[e].lower === v ? L[e].upper : L[e].lower);
  const dist = (u: number, v: number) => Math.hypot(nx[u] - nx[v], ny[u] - ny[v], nz[u] - nz[v]);
  const deg = (v: number) => adj[v].reduce((s, e) => s + alive[e], 0);
  const next = (v: number, from: number) => adj[v].find((e) => alive[e] === 1 && e !== from) ?? -1;
  /** Walk from leaf v through degree-2 nodes; returns the edges, the end node and the length. */
  const walk = (v: number, from: number): { edges: number[]; end: number; length: number } => {
    const edges: number[] = [];
    let length = 0, e = next(v, from), cur = v;
    while (e !== -1) {
      const w = other(e, cur);
      edges.push(e);
      length += dist(cur, w);
      cur = w;
      if (deg(cur) !== 2 || cur === v) break;
      e = next(cur, e);
    }
    return { edges, end: cur, length };
  };
  let pruned = 0, prunedMax = 0;
  for (let changed = true; changed; ) {
    changed = false;
    for (let v = 0; v < nN; v++) {
      if (deg(v) !== 1) continue;
      const chain = walk(v, -1);
      if (deg(chain.end) >= 3 && chain.length < spurLength) {
        for (const e of chain.edges) alive[e] = 0;
        pruned++;
        prunedMax = Math.max(prunedMax, chain.length);
        changed = true;
      }
    }
  }
  const liveNodes: number[] = [];
  let liveEdges = 0;
  for (let v = 0; v < nN; v++) if (deg(v) > 0) liveNodes.push(v);
  for (let e = 0; e < L.length; e++) liveEdges += alive[e];
  // Independent cycles: edges - nodes + connected pieces of the live graph (not + 1: two tubes
  // that touch at one vertex are one piece of the surface but two paths, and + 1 gave -1 cycles).
  const pieces = countPieces(liveNodes, L, alive);
  const cycles = liveEdges - liveNodes.length + pieces;
  const junctionNodes = liveNodes.filter((v) => deg(v) >= 3);
  const junctions = junctionNodes.map((v) => ({
    x: nx[v], y: ny[v], z: nz[v],
    arms: adj[v].filter((e) => alive[e] === 1).map((e) => armLength(e, v)),
  }));
  function armLength(e0: number, v: number): number {
    let length = 0, cur = v, e = e0;
    for (let guard = 0; e !== -1 && guard <= L.length; guard++) {
      const w = other(e, cur);
      length += dist(cur, w);
      cur = w;
      if (deg(cur) !== 2) break;
      e = next(cur, e);
    }
    return length;
  }
  const base = { junctions, pruned, prunedMax, cycles, pieces };
  if (liveNodes.length === 0) return { kind: "open", loops: [], ...base };
  if (pieces > 1) return { kind: "pieces", loops: [], ...base };
  if (junctionNodes.length === 0 && cycles === 0) {
    const start = liveNodes.find((v) => deg(v) === 1) as number;
    return { kind: "open", loops: walk(start, -1).edges.map((e) => L[e]), ...base };
  }
  if (junctionNodes.length === 0 && cycles === 1) {
    const start = liveNodes[0];
    return { kind: "closed", loops: walk(start, -1).edges.map((e) => L[e]), ...base };
  }
  if (cycles > 0) return { kind: "complex", loops: [], ...base };
  // a tree with junctions: its longest path (two sweeps of tree distances)
  const farthest = (src: number) => {
    const d = new Map<number, number>([[src, 0]]), via = new Map<number, number>();
    const stack = [src];
    while (stack.length > 0) {
      const u = stack.pop() as number;
      for (const e of adj[u]) {
        if (alive[e] === 0) continue;
        const w = other(e, u);
        if (d.has(w)) continue;
        d.set(w, (d.get(u) as number) + dist(u, w));
        via.set(w, e);
        stack.push(w);
      }
    }
    let best = src;
    for (const [w, x] of d) if (x > (d.get(best) as number)) best = w;
    return { best, via };
  };
  const a = farthest(liveNodes[0]).best;
  const { best: b, via } = farthest(a);
  const path: number[] = [];
  for (let cur = b; cur !== a; ) {
    const e = via.get(cur) as number;
    path.push(e);
    cur = other(e, cur);
  }
  return { kind: "branched", loops: path.reverse().map((e) => L[e]), ...base };
}

/** Connected pieces of the graph of the live edges (lower-upper node pairs) over `nodes` (union-find). */
function countPieces(nodes: readonly number[], edges: readonly { readonly lower: number; readonly upper: number }[], alive: ArrayLike<number>): number {
  const parent = new Map<number, number>(nodes.map((v) => [v, v]));
  const root = (v: number): number => {
    let r = v;
    while (parent.get(r) !== r) r = parent.get(r) as number;
    parent.set(v, r);
    return r;
  };
  edges.forEach((q, e) => { if (alive[e] !== 0) parent.set(root(q.lower), root(q.upper)); });
  return new Set(nodes.map(root)).size;
}
