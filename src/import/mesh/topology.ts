/**
 * Edge structure of a triangle mesh, built in O(T) with per-vertex buckets (no sort).
 * Internal helper of the centre-line code.
 */
export interface Edges {
  readonly count: number;
  /** Endpoints, a < b. */
  readonly a: Uint32Array;
  readonly b: Uint32Array;
  /** Edge of half-edge 3t + k (from corner k to corner k+1 of triangle t). */
  readonly ofHalfEdge: Uint32Array;
  /** Triangles per edge in CSR form: triangles triOf[triStart[e] .. triStart[e+1]). */
  readonly triStart: Uint32Array;
  readonly triOf: Uint32Array;
}

export function buildEdges(index: Readonly<Uint32Array>, nV: number): Edges {
  const nH = index.length;
  const start = new Uint32Array(nV + 1);
  for (let h = 0; h < nH; h++) {
    const t = h - (h % 3);
    const u = index[h], v = index[t + ((h - t + 1) % 3)];
    start[(u < v ? u : v) + 1]++;
  }
  for (let i = 0; i < nV; i++) start[i + 1] += start[i];
  const fill = start.slice(0, nV);
  const slotHi = new Uint32Array(nH), slotH = new Uint32Array(nH);
  for (let h = 0; h < nH; h++) {
    const t = h - (h % 3);
    const u = index[h], v = index[t + ((h - t + 1) % 3)];
    const lo = u < v ? u : v;
    const s = fill[lo]++;
    slotHi[s] = u < v ? v : u;
    slotH[s] = h;
  }
  const ofHalfEdge = new Uint32Array(nH);
  const ea: number[] = [], eb: number[] = [];
  const slotEdge = new Int32Array(nH).fill(-1);
  for (let lo = 0; lo < nV; lo++) {
    for (let s = start[lo]; s < start[lo + 1]; s++) {
      let e = -1;
      for (let q = start[lo]; q < s; q++) {
        if (slotHi[q] === slotHi[s]) {
          e = slotEdge[q];
          break;
        }
      }
      if (e === -1) {
        e = ea.length;
        ea.push(lo);
        eb.push(slotHi[s]);
      }
      slotEdge[s] = e;
      ofHalfEdge[slotH[s]] = e;
    }
  }
  const count = ea.length;
  const triStart = new Uint32Array(count + 1);
  for (let h = 0; h < nH; h++) triStart[ofHalfEdge[h] + 1]++;
  for (let e = 0; e < count; e++) triStart[e + 1] += triStart[e];
  const pos = triStart.slice(0, count);
  const triOf = new Uint32Array(nH);
  for (let h = 0; h < nH; h++) triOf[pos[ofHalfEdge[h]]++] = (h / 3) | 0;
  return { count, a: Uint32Array.from(ea), b: Uint32Array.from(eb), ofHalfEdge, triStart, triOf };
}

/** Vertex adjacency in CSR form with edge lengths (m). */
export interface Adjacency {
  readonly start: Uint32Array;
  readonly to: Uint32Array;
  readonly len: Float64Array;
}

export function buildAdjacency(edges: Edges, positions: Readonly<Float64Array>, nV: number): Adjacency {
  const start = new Uint32Array(nV + 1);
  for (let e = 0; e < edges.count; e++) {
    start[edges.a[e] + 1]++;
    start[edges.b[e] + 1]++;
  }
  for (let i = 0; i < nV; i++) start[i + 1] += start[i];
  const pos = start.slice(0, nV);
  const to = new Uint32Array(2 * edges.count), len = new Float64Array(2 * edges.count);
  for (let e = 0; e < edges.count; e++) {
    const a = edges.a[e], b = edges.b[e];
    const l = Math.hypot(positions[3 * a] - positions[3 * b], positions[3 * a + 1] - positions[3 * b + 1], positions[3 * a + 2] - positions[3 * b + 2]);
    to[pos[a]] = b;
    len[pos[a]++] = l;
    to[pos[b]] = a;
    len[pos[b]++] = l;
  }
  return { start, to, len };
}

/** Union-find with path halving over 0..n-1. */
export class UnionFind {
  readonly parent: Int32Array;
  constructor(n: number) {
    this.parent = new Int32Array(n);
    for (let i = 0; i < n; i++) this.parent[i] = i;
  }
  find(i: number): number {
    const p = this.parent;
    while (p[i] !== i) {
      p[i] = p[p[i]];
      i = p[i];
    }
    return i;
  }
  union(a: number, b: number): void {
    const ra = this.find(a), rb = this.find(b);
    if (ra !== rb) this.parent[ra < rb ? rb : ra] = ra < rb ? ra : rb;
  }
}

/**
 * Connected components of a triangle mesh (triangles sharing a vertex are connected).
 * Returns one list of triangle indices per component, largest first.
 */
export function triangleComponents(index: Readonly<Uint32Array>, nV: number): Uint32Array[] {
  const uf = new UnionFind(nV);
  for (let t = 0; t < index.length; t += 3) {
    uf.union(index[t], index[t + 1]);
    uf.union(index[t], index[t + 2]);
  }
  const label = new Map<number, number[]>();
  for (let t = 0; t < index.length / 3; t++) {
    const r = uf.find(index[3 * t]);
    let list = label.get(r);
    if (list === undefined) label.set(r, (list = []));
    list.push(t);
  }
  return [...label.values()].sort((x, y) => y.length - x.length || x[0] - y[0]).map((l) => Uint32Array.from(l));
}

/** Multi-source Dijkstra over the edge graph: shortest edge-path length from the sources (m). */
export function dijkstra(adj: Adjacency, nV: number, sources: ArrayLike<number>): Float64Array {
  const dist = new Float64Array(nV).fill(Infinity);
  // binary heap of (key, vertex), lazy deletion
  let hk = new Float64Array(1024), hv = new Uint32Array(1024), n = 0;
  const push = (k: number, v: number) => {
    if (n === hk.length) {
      const k2 = new Float64Array(2 * n), v2 = new Uint32Array(2 * n);
      k2.set(hk);
      v2.set(hv);
      hk = k2;
      hv = v2;
    }
    let i = n++;
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (hk[p] <= k) break;
      hk[i] = hk[p];
      hv[i] = hv[p];
      i = p;
    }
    hk[i] = k;
    hv[i] = v;
  };
  const pop = () => {
    const k = hk[--n], v = hv[n];
    let i = 0;
    for (;;) {
      let c = 2 * i + 1;
      if (c >= n) break;
      if (c + 1 < n && hk[c + 1] < hk[c]) c++;
      if (hk[c] >= k) break;
      hk[i] = hk[c];
      hv[i] = hv[c];
      i = c;
    }
    hk[i] = k;
    hv[i] = v;
  };
  for (let i = 0; i < sources.length; i++) {
    dist[sources[i]] = 0;
    push(0, sources[i]);
  }
  while (n > 0) {
    const d = hk[0], u = hv[0];
    pop();
    if (d > dist[u]) continue;
    for (let s = adj.start[u]; s < adj.start[u + 1]; s++) {
      const v = adj.to[s], nd = d + adj.len[s];
      if (nd < dist[v]) {
        dist[v] = nd;
        push(nd, v);
      }
    }
  }
  return dist;
}
