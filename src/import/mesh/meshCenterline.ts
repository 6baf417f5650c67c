import { InputError } from "../../errors.js";
import type { Trace } from "../../types.js";
import { buildTriangleGrid, crossSection, type Section, type TriangleGrid } from "./crossSection.js";
import { levelSetGraph, type LevelSetGraph } from "./levelSets.js";
import { chordTangents, polylineLength, resample, runningMean } from "./polyline.js";
import { skeletonPath } from "./skeletonPath.js";
import { buildAdjacency, buildEdges, dijkstra, triangleComponents, UnionFind } from "./topology.js";
import type { CenterlineOptions, Mesh } from "./types.js";
import { formatLength, formatPoint, makeSource } from "./units.js";
import { median } from "../median.js";

/**
 * Centre line and local tube radius of each wire in a triangle mesh: one Trace per connected
 * component (largest first), with `radius` and `radiusSpread` per sample.
 *
 * Method, per component:
 * 1. Geodesic distance d from one end: from a boundary loop if the tube is open and uncapped, else
 *    from the vertex farthest (in edge-graph distance) from an arbitrary vertex, which is near a cap
 *    tip; on a torus any vertex serves. Dijkstra on the edge graph (Dijkstra 1959).
 * 2. Level-set diagram of d (Lazarus & Verroust 1999, see `levelSetGraph`): exact level loops every
 *    h = half the tube radius, the band pieces between them as graph nodes. Side spurs shorter than
 *    `spurRadii` radii are pruned. What remains is a path (open wire), one cycle (closed ring, e.g.
 *    a torus), a tree with junctions (branched: an error naming the component and the junction, or
 *    its longest path with `branches: "longest"`) or several cycles (an error).
 * 3. Orthogonal cutting (Jiao, Einstein & Dyedov 2010, SIAM J. Sci. Comput. 32:947): the loop
 *    centroids, resampled every `step`, are moved to the area centroid of the mesh's cross-section
 *    by the plane normal to the local chord tangent (over about one radius), `passes` times. This
 *    removes the bias of level-set centroids in bends. Open ends are explored up to 1.5 radii beyond
 *    the last loop, so a capped end runs to the cap's tip, where the radius falls to 0, and an
 *    uncapped end stops at the last complete cross-section. A section must follow on from its
 *    neighbour in the geodesic distance of step 1 (`sectionsAlong`), so near the other end of a
 *    nearly closed ring the line stops at its own end instead of running on into the other tube.
 *
 * Radius: perimeter-weighted mean distance of the section outline from its centroid; spread: its
 * standard deviation (noise and out-of-roundness). The curved-wire model is valid only where the
 * curvature radius is well above this radius, and not in the cap regions (reported in
 * `diagnostics`). Units: metres in and out. Cost: O(T) for steps 1-2 (levels of half a radius) plus
 * O(samples x triangles within 2.5 radii) per pass; 1e6 triangles: 1.7 s (2.2 s with reading and welding) on a
 * lightly loaded 2-core VM, up to 8.6 s under heavy load, 342 MiB peak RSS (bench/mesh.ts).
 *
 * @throws {InputError} "file: component 2: branched: 3 arms meet near (x, y, z) nm ..." for a
 *   branched component (default policy), "...: not a tube: 2 independent cycles" for a surface of
 *   higher genus, and "file: mesh: no wire-like component" when nothing is left.
 * @example meshCenterline(parseStl(bytes, "ring.stl", { unit: "nm" }), "ring.stl", { unit: "nm" })
 *   // [{ closed: true, xyz, radius, radiusSpread, ... }] for a torus
 */
export function meshCenterline(mesh: Mesh, file: string, options: CenterlineOptions): Trace[] {
  const nV = mesh.positions.length / 3;
  const comps = triangleComponents(mesh.index, nV);
  const fileNotes: string[] = [...mesh.diagnostics];
  const traces: { xyz: Float64Array; closed: boolean; radius: Float64Array; spread: Float64Array; notes: string[]; facet: number }[] = [];
  const fmtP = (x: number, y: number, z: number) => formatPoint(x, y, z, options.unit, options.pixelSize);
  const fmtL = (v: number) => formatLength(v, options.unit, options.pixelSize);
  const minTriangles = options.minTriangles ?? 20;
  comps.forEach((tris, ci) => {
    const name = `component ${ci + 1} of ${comps.length}`;
    if (tris.length < minTriangles) {
      fileNotes.push(`${name}: skipped: ${tris.length} triangles (debris, fewer than ${minTriangles})`);
      return;
    }
    const { positions, index } = extract(mesh, tris);
    const result = wireOfComponent(positions, index, file, name, options, fmtP, fmtL);
    if (typeof result === "string") fileNotes.push(result);
    else traces.push({ ...result, facet: medianEdge(positions, index) });
  });
  if (traces.length === 0) {
    throw new InputError(file, null, "mesh", `no wire-like component (${fileNotes.filter((n) => n.includes("skipped")).join("; ") || "empty"})`);
  }
  return traces.map((t, i) => ({
    xyz: t.xyz,
    closed: t.closed,
    dims: 3 as const,
    source: makeSource(file, options.unit, options.pixelSize),
    radius: t.radius,
    radiusSpread: t.spread,
    facetLength: t.facet,
    diagnostics: [...(i === 0 ? fileNotes : []), ...t.notes],
  }));
}

/** Median edge length of a triangle mesh (each triangle's three edges): the tessellation's scale. */
export function medianEdge(positions: Float64Array, index: Uint32Array): number {
  const e = new Float64Array(index.length);
  for (let f = 0; f < index.length; f += 3) {
    for (let k = 0; k < 3; ++k) {
      const a = 3 * index[f + k], b = 3 * index[f + ((k + 1) % 3)];
      e[f + k] = Math.hypot(positions[a] - positions[b], positions[a + 1] - positions[b + 1], positions[a + 2] - positions[b + 2]);
    }
  }
  e.sort();
  return e.length ? e[e.length >> 1] : 0;
}

export function extract(mesh: Mesh, tris: Readonly<Uint32Array>): { positions: Float64Array; index: Uint32Array } {
  if (tris.length * 3 === mesh.index.length) return { positions: mesh.positions, index: mesh.index };
  const map = new Int32Array(mesh.positions.length / 3).fill(-1);
  const index = new Uint32Array(tris.length * 3);
  let n = 0;
  for (let i = 0; i < tris.length; i++) {
    for (let c = 0; c < 3; c++) {
      const v = mesh.index[3 * tris[i] + c];
      if (map[v] === -1) map[v] = n++;
      index[3 * i + c] = map[v];
    }
  }
  const positions = new Float64Array(3 * n);
  for (let v = 0; v < map.length; v++) {
    if (map[v] !== -1) positions.set(mesh.positions.subarray(3 * v, 3 * v + 3), 3 * map[v]);
  }
  return { positions, index };
}

/**
 * Steps 1 and 2 of the method for one component (shared with `meshNetwork`): geodesic distance from
 * one end, then the level-set diagram with levels every half radius; the median loop radius. A
 * string when the component is skipped (no extent, or a blob rather than a wire).
 */
export function componentLevelGraph(
  positions: Float64Array, index: Uint32Array, name: string, fmtL: (v: number) => string,
): { graph: LevelSetGraph; rEst: number; notes: string[]; d: Float64Array; nonManifold: number } | string {
  const nV = positions.length / 3, nT = index.length / 3;
  const notes: string[] = [];
  const edges = buildEdges(index, nV);
  const adj = buildAdjacency(edges, positions, nV);
  let boundaryEdges = 0, nonManifold = 0;
  const boundary = new UnionFind(nV);
  const onBoundary = new Uint8Array(nV);
  for (let e = 0; e < edges.count; e++) {
    const k = edges.triStart[e + 1] - edges.triStart[e];
    if (k === 1) {
      boundaryEdges++;
      boundary.union(edges.a[e], edges.b[e]);
      onBoundary[edges.a[e]] = onBoundary[edges.b[e]] = 1;
    } else if (k > 2) nonManifold++;
  }
  if (nonManifold > 0) notes.push(`${name}: ${nonManifold} non-manifold edges (shared by more than 2 triangles)`);
  // 1. geodesic distance from one end
  let sources: number[];
  let rim = 0; // length of the longest boundary loop
  if (boundaryEdges > 0) {
    const loops = new Map<number, number[]>();
    for (let v = 0; v < nV; v++) {
      if (!onBoundary[v]) continue;
      const r = boundary.find(v);
      const l = loops.get(r);
      if (l) l.push(v);
      else loops.set(r, [v]);
    }
    sources = [...loops.values()].sort((a, b) => b.length - a.length)[0];
    const root = boundary.find(sources[0]);
    for (let e = 0; e < edges.count; e++) {
      if (edges.triStart[e + 1] - edges.triStart[e] !== 1 || boundary.find(edges.a[e]) !== root) continue;
      const a = 3 * edges.a[e], b = 3 * edges.b[e];
      rim += Math.hypot(positions[a] - positions[b], positions[a + 1] - positions[b + 1], positions[a + 2] - positions[b + 2]);
    }
    notes.push(`${name}: open surface with ${loops.size} boundary loops`);
  } else {
    const d0 = dijkstra(adj, nV, [0]);
    let far = 0;
    for (let v = 0; v < nV; v++) if (d0[v] > d0[far]) far = v;
    sources = [far];
  }
  const d = dijkstra(adj, nV, sources);
  let dmax = 0;
  for (let v = 0; v < nV; v++) if (Number.isFinite(d[v]) && d[v] > dmax) dmax = d[v];
  if (!(dmax > 0)) return `${name}: skipped: no extent`;
  // 2. level-set diagram: a coarse pass for the radius, then levels every half radius
  const coarse = levelSetGraph(positions, index, edges, d, dmax / 48);
  const rCoarse = median(coarse.loops.map((q) => q.length / (2 * Math.PI)));
  if (!(rCoarse > 0) || dmax < 2 * rCoarse) {
    // every point within dmax of a boundary loop far longer than a blob's rim (at most 2 pi dmax round)
    if (rim > 4 * Math.PI * dmax) return `${name}: skipped: an open surface whose boundary (${fmtL(rim)} long) runs within ${fmtL(dmax)} of every point: a tube slit along its length? close the slit`;
    return `${name}: skipped: a blob, not a wire (${nT} triangles, extent ${fmtL(dmax)})`;
  }
  const h = Math.max(Math.min(0.5 * rCoarse, dmax / 8), dmax / 20000);
  const graph = levelSetGraph(positions, index, edges, d, h);
  const rEst = median(graph.loops.map((q) => q.length / (2 * Math.PI)));
  return { graph, rEst, notes, d, nonManifold };
}


function wireOfComponent(
  positions: Float64Array,
  index: Uint32Array,
  file: string,
  name: string,
  options: CenterlineOptions,
  fmtP: (x: number, y: number, z: number) => string,
  fmtL: (v: number) => string,
): { xyz: Float64Array; closed: boolean; radius: Float64Array; spread: Float64Array; notes: string[] } | string {
  const nT = index.length / 3;
  const level = componentLevelGraph(positions, index, name, fmtL);
  if (typeof level === "string") return level;
  const { graph, rEst, notes, nonManifold } = level;
  const path = skeletonPath(graph, (options.spurRadii ?? 2.5) * rEst);
  if (path.pruned > 0) notes.push(`${name}: pruned ${path.pruned} side spurs of the level-set graph (longest ${fmtL(path.prunedMax)})`);
  if (path.kind === "pieces") {
    throw new InputError(file, null, name, `not one tube: its cross-sections fall into ${path.pieces} separate paths although the surface is one piece (wires that touch at a point or along a seam, without a junction): split the mesh into its wires (--branches split)`);
  }
  if (path.kind === "complex") {
    throw new InputError(file, null, name, `not a tube: ${path.cycles} independent cycles${path.junctions.length ? ` and junctions near ${path.junctions.map((j) => fmtP(j.x, j.y, j.z)).join(", ")}` : ""}`);
  }
  if (path.kind === "branched") {
    const desc = path.junctions
      .map((j) => `${j.arms.length} arms meet near ${fmtP(j.x, j.y, j.z)} (arm lengths ${j.arms.map(fmtL).join(", ")})`)
      .join("; ");
    if ((options.branches ?? "error") === "error") {
      throw new InputError(file, null, name, `branched: ${desc}; split the mesh into its wires (--branches split), or keep the longest path (--branches longest)`);
    }
    notes.push(`${name}: branched: ${desc}; kept the longest path only`);
  }
  const closed = path.kind === "closed";
  if (path.loops.length < 2) return `${name}: skipped: too short for a centre line`;
  // 3. orthogonal cutting
  const seeds = new Float64Array(3 * path.loops.length);
  path.loops.forEach((q, i) => seeds.set([q.x, q.y, q.z], 3 * i));
  const step = options.step ?? 0.5 * rEst;
  let pts = resample(runningMean(seeds, closed, 2), closed, step);
  const grid: TriangleGrid = buildTriangleGrid(positions, index, 2 * rEst);
  const reach = 2.5 * rEst;
  const m = Math.max(1, Math.round(rEst / step));
  const passes = Math.max(1, options.passes ?? 3);
  let radius = new Float64Array(0), spread = new Float64Array(0);
  let dropped = 0, jumped = 0, jumpedAt: number[] = [];
  for (let pass = 0; pass < passes; pass++) {
    if (!closed) pts = extendEnds(pts, 1.5 * rEst, step);
    const tan = chordTangents(pts, closed, m);
    const n = pts.length / 3;
    const sec = sectionsAlong(positions, index, grid, pts, tan, closed, reach, rEst, level.d);
    const out: number[] = [], rad: number[] = [], spr: number[] = [];
    dropped = 0;
    let firstKept = -1, droppedTotal = 0;
    jumped = 0;
    for (let i = 0; i < n; i++) {
      const s = sec.at[i];
      if (s === null) {
        droppedTotal++;
        continue;
      }
      if (firstKept === -1) firstKept = i;
      dropped = droppedTotal - firstKept;
      out.push(s.x, s.y, s.z);
      rad.push(s.radius);
      spr.push(s.spread);
    }
    jumped = sec.jumped;
    jumpedAt = sec.where;
    if (out.length < 6) {
      const why = nonManifold > 0
        ? ` (${nonManifold} edges are shared by more than 2 triangles: duplicated triangles or surfaces that touch, where a cutting plane gives no single loop)`
        : ` (${path.loops.length} level loops of median radius ${fmtL(rEst)}; no plane normal to their path cuts a loop around it: not a thin tube there, e.g. turns that touch or a ring whose hole is narrower than its tube)`;
      return `${name}: skipped: no closed cross-section found along the level-set path${why}`;
    }
    pts = Float64Array.from(out);
    radius = Float64Array.from(rad);
    spread = Float64Array.from(spr);
    if (pass < passes - 1) pts = resample(pts, closed, step);
  }
  const n = pts.length / 3;
  const rMed = median([...radius]);
  const length = polylineLength(pts, closed);
  const rHigh = [...radius].sort((a, b) => a - b)[Math.floor(0.9 * (n - 1))];
  if (!closed && length < 3 * rHigh) {
    return `${name}: skipped: a blob, not a wire (${nT} triangles, centre line ${fmtL(length)} long for a radius of ${fmtL(rHigh)})`;
  }
  notes.push(
    `${name}: ${closed ? "closed ring" : "open wire"} of length ${fmtL(length)}, ${n} samples every ${fmtL(length / (closed ? n : n - 1))}, median tube radius ${fmtL(rMed)} (${nT} triangles)`,
  );
  if (!closed) {
    const thin = (from: number, dir: number) => {
      let k = 0;
      for (let i = from; i >= 0 && i < n && radius[i] < 0.9 * rMed; i += dir) k++;
      return k;
    };
    const a = thin(0, 1), b = thin(n - 1, -1);
    if (a > 0 || b > 0) {
      notes.push(`${name}: end caps or tapers: radius below 90% of the median over the first ${a} and last ${b} samples; the model is not valid there`);
    }
  }
  const round = outOfRound(pts, radius, spread, rMed);
  if (round !== null) {
    const [a, b] = [3 * round.from, 3 * round.to];
    notes.push(
      `${name}: cross-section out of round (radius spread up to ${Math.round(100 * round.worst)}% of the radius, a tessellated circle gives under 10%) over ${fmtL(round.length)} of the ${fmtL(length)} line, from ${fmtP(pts[a], pts[a + 1], pts[a + 2])} to ${fmtP(pts[b], pts[b + 1], pts[b + 2])}: a flattened wire, or wires fused side by side (the centre line then runs between them, and the radius is neither's)`,
    );
  }
  if (dropped > 0) notes.push(`${name}: left out ${dropped} interior samples where no closed cross-section enclosed the centre line`);
  if (jumped > 0) {
    notes.push(
      `${name}: left out ${jumped} cross-sections next to the section at ${fmtP(jumpedAt[0], jumpedAt[1], jumpedAt[2])} that cut another stretch of the surface (near in space, far along it: the other end of a nearly closed ring, or a touching turn); the centre line stops at its own end there`,
    );
  }
  return { xyz: pts, closed, radius, spread, notes };
}

/**
 * The longest run of samples whose section is out of round (radius spread above `OUT_OF_ROUND` of the
 * radius), when it spans at least 4 median radii: null otherwise. A regular n-gon's spread is
 * 0.07 r for n = 6 and 0.01 r for n = 16 (measured on the sweep's tori); a flat cap's oblique cuts
 * are out of round over a sample or two only. Two round tubes fused side by side (axes 1.8 radii
 * apart) give 0.30, the sweep's flattened torus section 0.37.
 */
const OUT_OF_ROUND = 0.2;
export function outOfRound(
  pts: Float64Array, radius: Float64Array, spread: Float64Array, rMed: number,
): { from: number; to: number; length: number; worst: number } | null {
  const n = radius.length;
  let best: { from: number; to: number; length: number; worst: number } | null = null;
  let i = 0;
  while (i < n) {
    if (!(spread[i] > OUT_OF_ROUND * radius[i])) {
      i++;
      continue;
    }
    let j = i, len = 0, worst = spread[i] / radius[i];
    while (j + 1 < n && spread[j + 1] > OUT_OF_ROUND * radius[j + 1]) {
      len += Math.hypot(pts[3 * j + 3] - pts[3 * j], pts[3 * j + 4] - pts[3 * j + 1], pts[3 * j + 5] - pts[3 * j + 2]);
      worst = Math.max(worst, spread[j + 1] / radius[j + 1]);
      j++;
    }
    if (len >= 4 * rMed && (best === null || len > best.length)) best = { from: i, to: j, length: len, worst };
    i = j + 1;
  }
  return best;
}

/**
 * The cross-sections at the samples `pts` (tangents `tan`), each one of the stretch of surface the
 * wire is at: a section's mean geodesic distance d (from step 1) must follow on from the last
 * accepted section's, within twice the distance between their centroids plus two radii (geodesic
 * distance along a tube grows at most about as fast as the centre line, up to the bend factor
 * 1 + r kappa and the edge-graph metric's overestimate). A plane beyond one open end of a nearly
 * closed ring cuts the other end's tube: that section lies within a few radii in space but about
 * the wire's length away in d, and is refused, so the centre line stops at its own end. The walk
 * starts from the middle sample (its smallest enclosing section) and goes out both ways (closed:
 * round once). `jumped` counts sections refused for their d.
 */
export function sectionsAlong(
  positions: Float64Array, index: Uint32Array, grid: TriangleGrid, pts: Float64Array, tan: Float64Array,
  closed: boolean, reach: number, rEst: number, d: Float64Array,
): { at: (Section | null)[]; jumped: number; where: number[] } {
  const n = pts.length / 3;
  const at: (Section | null)[] = new Array<Section | null>(n).fill(null);
  let jumped = 0;
  const where: number[] = [];
  const cut = (i: number, last: Section | null): Section | null => {
    const cx = pts[3 * i], cy = pts[3 * i + 1], cz = pts[3 * i + 2];
    const free = crossSection(positions, index, grid, cx, cy, cz, tan[3 * i], tan[3 * i + 1], tan[3 * i + 2], reach, { field: d, expect: NaN, tol: Infinity });
    const near = (s: Section | null) => s !== null && Math.hypot(s.x - cx, s.y - cy, s.z - cz) <= 1.5 * rEst;
    if (last === null || !near(free)) return near(free) ? free : null;
    const tol = (l: Section) => 2 * Math.hypot(l.x - last.x, l.y - last.y, l.z - last.z) + 2 * rEst;
    if (Math.abs(free!.level - last.level) <= tol(free!)) return free;
    // the smallest enclosing loop is of another stretch: the one of this stretch, if the plane cuts one
    const own = crossSection(positions, index, grid, cx, cy, cz, tan[3 * i], tan[3 * i + 1], tan[3 * i + 2], reach, {
      field: d, expect: last.level, tol: 2 * (Math.hypot(cx - last.x, cy - last.y, cz - last.z) + 1.5 * rEst) + 2 * rEst,
    });
    if (near(own) && Math.abs(own!.level - last.level) <= tol(own!)) return own;
    jumped++;
    if (where.length === 0) where.push(last.x, last.y, last.z);
    return null;
  };
  let a = n >> 1;
  while (a < n && (at[a] = cut(a, null)) === null) a++;
  if (a === n) return { at, jumped, where };
  const walk = (dir: number, count: number) => {
    let last = at[a];
    for (let k = 1, i = a + dir; k <= count; k++, i += dir) {
      const j = ((i % n) + n) % n;
      const s = cut(j, last);
      at[j] = s;
      if (s !== null) last = s;
    }
  };
  if (closed) walk(1, n - 1);
  else {
    walk(1, n - 1 - a);
    walk(-1, a);
  }
  return { at, jumped, where };
}

/** Adds samples every `step` up to `extra` beyond each open end, along the end chord over ~1 radius. */
export function extendEnds(p: Float64Array, extra: number, step: number): Float64Array {
  const n = p.length / 3;
  const k = Math.max(1, Math.ceil(extra / step));
  const m = Math.min(n - 1, Math.max(1, Math.round(extra / (1.5 * step))));
  const dir = (i: number, j: number) => {
    const dx = p[3 * i] - p[3 * j], dy = p[3 * i + 1] - p[3 * j + 1], dz = p[3 * i + 2] - p[3 * j + 2];
    const l = Math.hypot(dx, dy, dz) || 1;
    return [dx / l, dy / l, dz / l];
  };
  const a = dir(0, m), b = dir(n - 1, n - 1 - m);
  const out = new Float64Array(3 * (n + 2 * k));
  for (let i = 0; i < k; i++) {
    const f = (k - i) * step;
    out.set([p[0] + f * a[0], p[1] + f * a[1], p[2] + f * a[2]], 3 * i);
    const g = (i + 1) * step;
    out.set([p[3 * n - 3] + g * b[0], p[3 * n - 2] + g * b[1], p[3 * n - 1] + g * b[2]], 3 * (n + k + i));
  }
  out.set(p, 3 * k);
  return out;
}
