/**
 * Reduces a skeleton graph (the level-set graph of a mesh, or the distance-bin graph of a cloud) to
 * a network of wires: junctions (clusters of nodes of degree >= 3), free ends (nodes of degree 1)
 * and branches (chains of degree-2 nodes between them). Pure; positions in metres.
 */

/** A skeleton graph: nodes and edges both carry a position (interleaved x, y, z). */
export interface SkeletonGraph {
  readonly nodes: number;
  readonly nodePos: Readonly<Float64Array>;
  /** Edge e joins nodes edgeA[e] and edgeB[e]. */
  readonly edgeA: Readonly<Uint32Array>;
  readonly edgeB: Readonly<Uint32Array>;
  readonly edgePos: Readonly<Float64Array>;
}

/** Where a branch starts or stops: a junction (index into `junctions`) or a free end (node id). */
export type Terminal = { readonly kind: "junction"; readonly index: number } | { readonly kind: "end"; readonly node: number };

/** One branch: nodes and edges in order along it (n + 1 nodes, n edges, terminals included). */
export interface GraphChain {
  readonly nodes: readonly number[];
  readonly edges: readonly number[];
  /** null for a closed ring with no junction. */
  readonly from: Terminal | null;
  readonly to: Terminal | null;
  readonly closed: boolean;
  /** Length along the node positions (m). */
  readonly length: number;
  /** Connected component of the pruned graph (0-based, in order of first node id). */
  readonly component: number;
}

/** A junction: the skeleton nodes merged into it and their mean position (m). */
export interface GraphJunction {
  readonly nodes: readonly number[];
  readonly x: number;
  readonly y: number;
  readonly z: number;
}

export interface SplitGraph {
  readonly junctions: readonly GraphJunction[];
  readonly chains: readonly GraphChain[];
  readonly components: number;
  /** Side spurs pruned and the longest pruned length (m). */
  readonly pruned: number;
  readonly prunedMax: number;
  /** Cycle rank of the pruned skeleton graph itself (edges - nodes + components), for a consistency check. */
  readonly skeletonCycles: number;
}

/**
 * Splits a skeleton graph into branches.
 * 1. Leaf chains shorter than `spurLength` that hang off a node of degree >= 3 are pruned,
 *    repeatedly (surface noise, the tips of the level sets around the source).
 * 2. Nodes of degree >= 3 joined by a chain shorter than `mergeLength` form one junction (a junction
 *    of four arms shows up as two nodes of degree 3 a little apart; a front that reaches a junction
 *    obliquely splits over several levels).
 * 3. Every chain of degree-2 nodes between two terminals (junctions or free ends) is a branch; a
 *    component without terminals is one closed ring. Chains inside one junction are dropped.
 * Cost O(nodes + edges).
 */
export function splitGraph(g: SkeletonGraph, spurLength: number, mergeLength: number): SplitGraph {
  const nN = g.nodes, nE = g.edgeA.length;
  const P = g.nodePos;
  const adj: number[][] = Array.from({ length: nN }, () => []);
  for (let e = 0; e < nE; e++) {
    if (g.edgeA[e] === g.edgeB[e]) continue;
    adj[g.edgeA[e]].push(e);
    adj[g.edgeB[e]].push(e);
  }
  const alive = new Uint8Array(nE);
  for (let e = 0; e < nE; e++) alive[e] = g.edgeA[e] === g.edgeB[e] ? 0 : 1;
  const other = (e: number, v: number) => (g.edgeA[e] === v ? g.edgeB[e] : g.edgeA[e]);
  const dist = (u: number, v: number) => Math.hypot(P[3 * u] - P[3 * v], P[3 * u + 1] - P[3 * v + 1], P[3 * u + 2] - P[3 * v + 2]);
  const deg = (v: number) => {
    let d = 0;
    for (const e of adj[v]) d += alive[e];
    return d;
  };
  const next = (v: number, from: number) => {
    for (const e of adj[v]) if (alive[e] === 1 && e !== from) return e;
    return -1;
  };
  /** Walk from v along edge e0 through degree-2 nodes (stops at a node of other degree, or back at v). */
  const walk = (v: number, e0: number): { nodes: number[]; edges: number[]; length: number } => {
    const nodes = [v], edges: number[] = [];
    let length = 0, cur = v, e = e0;
    while (e !== -1) {
      const w = other(e, cur);
      edges.push(e);
      nodes.push(w);
      length += dist(cur, w);
      cur = w;
      if (cur === v || deg(cur) !== 2) break;
      e = next(cur, e);
    }
    return { nodes, edges, length };
  };
  // 1. prune spurs
  let pruned = 0, prunedMax = 0;
  for (let changed = true; changed; ) {
    changed = false;
    for (let v = 0; v < nN; v++) {
      if (deg(v) !== 1) continue;
      const chain = walk(v, next(v, -1));
      const end = chain.nodes[chain.nodes.length - 1];
      if (deg(end) >= 3 && chain.length < spurLength) {
        for (const e of chain.edges) alive[e] = 0;
        pruned++;
        prunedMax = Math.max(prunedMax, chain.length);
        changed = true;
      }
    }
  }
  const degree = new Int32Array(nN);
  for (let v = 0; v < nN; v++) degree[v] = deg(v);
  // components of the pruned graph
  const comp = new Int32Array(nN).fill(-1);
  let components = 0, liveNodes = 0, liveEdges = 0;
  for (let e = 0; e < nE; e++) liveEdges += alive[e];
  for (let v = 0; v < nN; v++) {
    if (degree[v] === 0 || comp[v] !== -1) continue;
    const stack = [v];
    comp[v] = components;
    while (stack.length > 0) {
      const u = stack.pop() as number;
      liveNodes++;
      for (const e of adj[u]) {
        if (!alive[e]) continue;
        const w = other(e, u);
        if (comp[w] === -1) {
          comp[w] = components;
          stack.push(w);
        }
      }
    }
    components++;
  }
  // 2. junction clusters
  const cluster = new Int32Array(nN).fill(-1);
  const parent = new Int32Array(nN);
  for (let v = 0; v < nN; v++) parent[v] = v;
  const find = (v: number): number => {
    while (parent[v] !== v) v = parent[v] = parent[parent[v]];
    return v;
  };
  for (let v = 0; v < nN; v++) {
    if (degree[v] < 3) continue;
    for (const e of adj[v]) {
      if (!alive[e]) continue;
      const c = walk(v, e);
      const end = c.nodes[c.nodes.length - 1];
      if (end !== v && degree[end] >= 3 && c.length < mergeLength) parent[find(end)] = find(v);
    }
  }
  const junctions: GraphJunction[] = [];
  const rootIndex = new Map<number, number>();
  const members: number[][] = [];
  for (let v = 0; v < nN; v++) {
    if (degree[v] < 3) continue;
    const r = find(v);
    let j = rootIndex.get(r);
    if (j === undefined) {
      j = members.length;
      rootIndex.set(r, j);
      members.push([]);
    }
    members[j].push(v);
    cluster[v] = j;
  }
  for (const m of members) {
    let x = 0, y = 0, z = 0;
    for (const v of m) {
      x += P[3 * v];
      y += P[3 * v + 1];
      z += P[3 * v + 2];
    }
    junctions.push({ nodes: m, x: x / m.length, y: y / m.length, z: z / m.length });
  }
  // 3. chains between terminals
  const terminal = (v: number): Terminal | null =>
    degree[v] >= 3 ? { kind: "junction", index: cluster[v] } : degree[v] === 1 ? { kind: "end", node: v } : null;
  const used = new Uint8Array(nE);
  const chains: GraphChain[] = [];
  for (let v = 0; v < nN; v++) {
    if (degree[v] === 0 || degree[v] === 2) continue;
    for (const e of adj[v]) {
      if (!alive[e] || used[e]) continue;
      const c = walk(v, e);
      for (const f of c.edges) used[f] = 1;
      const end = c.nodes[c.nodes.length - 1];
      const from = terminal(v), to = terminal(end);
      if (from?.kind === "junction" && to?.kind === "junction" && from.index === to.index && c.length < mergeLength) continue;
      chains.push({ nodes: c.nodes, edges: c.edges, from, to, closed: false, length: c.length, component: comp[v] });
    }
  }
  for (let v = 0; v < nN; v++) {
    if (degree[v] !== 2) continue;
    const e = next(v, -1);
    if (used[e]) continue;
    const c = walk(v, e);
    for (const f of c.edges) used[f] = 1;
    chains.push({ nodes: c.nodes, edges: c.edges, from: null, to: null, closed: true, length: c.length, component: comp[v] });
  }
  // a "junction" where only two branch ends meet (a small handle of a noisy surface, merged into one
  // cluster) is no junction: join the two branches through it
  // a short loop from a junction back to itself is a noise ring (a spur that closed on itself): drop it
  const loopless = chains.filter((c) => {
    const small = c.from?.kind === "junction" && c.to?.kind === "junction" && c.from.index === c.to.index && c.length < 2 * spurLength;
    if (small) {
      pruned++;
      prunedMax = Math.max(prunedMax, c.length);
    }
    return !small;
  });
  // a junction left with a single branch end is that branch's free end
  const endCount = new Int32Array(junctions.length);
  for (const c of loopless) for (const t of [c.from, c.to]) if (t?.kind === "junction") endCount[t.index]++;
  const lone = (t: Terminal | null): Terminal | null => (t?.kind === "junction" && endCount[t.index] === 1 ? { kind: "end", node: junctions[t.index].nodes[0] } : t);
  const merged = joinThroughPasses(loopless.map((c) => ({ ...c, from: lone(c.from), to: lone(c.to) })), junctions.length);
  const keep = new Map<number, number>();
  const kept: GraphJunction[] = [];
  for (const c of merged) {
    for (const t of [c.from, c.to]) {
      if (t?.kind === "junction" && !keep.has(t.index)) {
        keep.set(t.index, kept.length);
        kept.push(junctions[t.index]);
      }
    }
  }
  const re = (t: Terminal | null): Terminal | null => (t?.kind === "junction" ? { kind: "junction", index: keep.get(t.index) as number } : t);
  return {
    junctions: kept,
    chains: merged.map((c) => ({ ...c, from: re(c.from), to: re(c.to) })),
    components,
    pruned,
    prunedMax,
    skeletonCycles: liveEdges - liveNodes + components,
  };
}

/** Joins chains meeting at a junction with exactly two chain ends; a chain that comes back to such a junction becomes a ring. */
function joinThroughPasses(input: readonly GraphChain[], nJunctions: number): GraphChain[] {
  let chains = [...input];
  for (let j = 0; j < nJunctions; j++) {
    const ends: { c: number; atEnd: boolean }[] = [];
    chains.forEach((c, i) => {
      if (c.from?.kind === "junction" && c.from.index === j) ends.push({ c: i, atEnd: false });
      if (c.to?.kind === "junction" && c.to.index === j) ends.push({ c: i, atEnd: true });
    });
    if (ends.length !== 2) continue;
    const [a, b] = ends;
    if (a.c === b.c) {
      const c = chains[a.c];
      chains[a.c] = { ...c, from: null, to: null, closed: true };
      continue;
    }
    // orient: ca ends at j, cb starts at j
    const flip = (c: GraphChain): GraphChain => ({ ...c, nodes: [...c.nodes].reverse(), edges: [...c.edges].reverse(), from: c.to, to: c.from });
    const ca = a.atEnd ? chains[a.c] : flip(chains[a.c]);
    const cb = b.atEnd ? flip(chains[b.c]) : chains[b.c];
    const joined: GraphChain = {
      nodes: [...ca.nodes, ...cb.nodes],
      edges: [...ca.edges, ...cb.edges],
      from: ca.from,
      to: cb.to,
      closed: false,
      length: ca.length + cb.length,
      component: ca.component,
    };
    chains = chains.filter((_, i) => i !== a.c && i !== b.c);
    chains.push(joined);
  }
  return chains;
}
