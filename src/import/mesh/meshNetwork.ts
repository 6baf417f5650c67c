import { InputError } from "../../errors.js";
import { assembleNetwork, type RawBranch, type RawJunction } from "../network/assembleNetwork.js";
import { splitGraph, type SkeletonGraph, type Terminal } from "../network/splitGraph.js";
import type { WireNetwork } from "../network/types.js";
import { buildTriangleGrid, type Section, type TriangleGrid } from "./crossSection.js";
import { levelSetGraph } from "./levelSets.js";
import { componentLevelGraph, extendEnds, extract, medianEdge, sectionsAlong } from "./meshCenterline.js";
import { chordTangents, polylineLength, resample, runningMean } from "./polyline.js";
import { triangleComponents, UnionFind } from "./topology.js";
import type { CenterlineOptions, Mesh } from "./types.js";
import { formatLength, formatPoint, makeSource } from "./units.js";
import { median } from "../median.js";

/** Options of `meshNetwork`: those of `meshCenterline` (its `branches` policy is not used) plus the junction settings. */
export interface MeshNetworkOptions extends CenterlineOptions {
  /** Junction nodes of the skeleton closer than this many tube radii (along it) are one junction [3]. */
  readonly mergeRadii?: number;
  /** Half-width of the running mean over each branch's centre line, in tube radii [0.5; 0: none]. */
  readonly smoothRadii?: number;
  /** Keep the end caps of free ends (where the radius falls below 90% of the median) [false: the branch stops at the last full cross-section]. */
  readonly keepCaps?: boolean;
  /** Junction zone radius, in tube radii [2]. */
  readonly zoneRadii?: number;
}

type Xyz = readonly [number, number, number];


/**
 * Splits a branched tube mesh into a network of wires: junctions, free ends, and one centre line
 * (with the local tube radius) per branch between them.
 *
 * Per connected component: the level-set graph of the geodesic distance from one end, as in
 * `meshCenterline` (Lazarus & Verroust 1999), its side spurs pruned and its junction nodes merged
 * (`splitGraph`); each branch's level-loop centroids are then refined by orthogonal cutting (Jiao,
 * Einstein & Dyedov 2010), as for a single wire. Toward a junction the centre line stops where the
 * tube stops being one tube: walking from the middle of the branch toward the junction, at the
 * first cross-section that is missing, wider than 1.2 times the branch's median radius or out of
 * round (outline spread over 0.3 radius) within 2.5 radii of the junction, or at three such
 * sections in a row. Free ends stop at the last full cross-section: the cap or taper, where the
 * radius falls below 90% of the median (the rule `meshCenterline` uses to flag caps), is left out
 * (`keepCaps` keeps it); a line that runs out and folds back at a free end (a lump) is cut at its
 * outermost sample along the axis 4 to 8 radii in (that sample, the lump's, left out too), and
 * end steps that turn by more than step / radius (a tighter bend than a tube allows) are left out. The line is then averaged over +-`smoothRadii` radii (default 0.5).
 * Junction positions, angles and zones: `assembleNetwork` (where the branch axes meet, by least
 * squares). A component that is one tube gives one branch between two free ends; a torus one ring.
 *
 * Units: metres in and out. Cost: as `meshCenterline` (O(T) for the skeleton, O(samples x local
 * triangles) per pass).
 * @throws {InputError} "file: mesh: no wire-like component (...)" when nothing is left.
 */
export function meshNetwork(mesh: Mesh, file: string, options: MeshNetworkOptions): WireNetwork {
  const nV = mesh.positions.length / 3;
  const comps = triangleComponents(mesh.index, nV);
  const notes: string[] = [...mesh.diagnostics];
  const fmtP = (x: number, y: number, z: number) => formatPoint(x, y, z, options.unit, options.pixelSize);
  const fmtL = (v: number) => formatLength(v, options.unit, options.pixelSize);
  const minTriangles = options.minTriangles ?? 20;
  const raw: RawBranch[] = [];
  const junctions: RawJunction[] = [];
  let nodeOffset = 0, used = 0;
  comps.forEach((tris, ci) => {
    const name = `component ${ci + 1} of ${comps.length}`;
    if (tris.length < minTriangles) {
      notes.push(`${name}: skipped: ${tris.length} triangles (debris, fewer than ${minTriangles})`);
      return;
    }
    const { positions, index } = extract(mesh, tris);
    const result = networkOfComponent(positions, index, name, options, fmtL, fmtP, file);
    if (typeof result === "string") {
      notes.push(result);
      return;
    }
    notes.push(...result.notes);
    const shift = (t: Terminal | null): Terminal | null =>
      t === null ? null : t.kind === "junction" ? { kind: "junction", index: t.index + junctions.length } : { kind: "end", node: t.node + nodeOffset };
    for (const b of result.branches) raw.push({ ...b, from: shift(b.from), to: shift(b.to), component: used });
    junctions.push(...result.junctions);
    nodeOffset += result.nodes;
    used++;
  });
  if (raw.length === 0) {
    throw new InputError(file, null, "mesh", `no wire-like component (${notes.filter((n) => n.includes("skipped")).join("; ") || "empty"})`);
  }
  const facet = medianEdge(mesh.positions, mesh.index);
  return assembleNetwork(raw.map((b) => ({ ...b, facetLength: facet })), junctions, {
    source: makeSource(file, options.unit, options.pixelSize),
    zoneRadii: options.zoneRadii ?? 2,
    fmtP,
    fmtL,
    diagnostics: notes,
  });
}

/**
 * Tube radii above which a branch of the level-set graph that yields no centre line is refused
 * rather than left out as too short (a link between junctions is under about two radii).
 */
const LONG_UNREFINED_RADII = 8;

interface ComponentNetwork {
  branches: Omit<RawBranch, "component">[];
  junctions: RawJunction[];
  nodes: number;
  notes: string[];
}

function networkOfComponent(
  positions: Float64Array,
  index: Uint32Array,
  name: string,
  options: MeshNetworkOptions,
  fmtL: (v: number) => string,
  fmtP: (x: number, y: number, z: number) => string,
  file: string,
): ComponentNetwork | string {
  const nT = index.length / 3;
  const level = componentLevelGraph(positions, index, name, fmtL);
  if (typeof level === "string") return level;
  const { graph, rEst, notes, d } = level;
  // the skeleton graph: band pieces (at the mean of their loops' centroids) joined by the loops
  const L = graph.loops, nN = graph.nodes;
  const nodePos = new Float64Array(3 * nN), cnt = new Float64Array(nN);
  const edgeA = new Uint32Array(L.length), edgeB = new Uint32Array(L.length), edgePos = new Float64Array(3 * L.length);
  L.forEach((q, e) => {
    edgeA[e] = q.lower;
    edgeB[e] = q.upper;
    edgePos.set([q.x, q.y, q.z], 3 * e);
    for (const v of [q.lower, q.upper]) {
      nodePos[3 * v] += q.x;
      nodePos[3 * v + 1] += q.y;
      nodePos[3 * v + 2] += q.z;
      cnt[v]++;
    }
  });
  for (let v = 0; v < nN; v++) for (let c = 0; c < 3; c++) if (cnt[v] > 0) nodePos[3 * v + c] /= cnt[v];
  const sg: SkeletonGraph = { nodes: nN, nodePos, edgeA, edgeB, edgePos };
  const split = splitGraph(sg, (options.spurRadii ?? 2.5) * rEst, (options.mergeRadii ?? 3) * rEst);
  if (split.pruned > 0) notes.push(`${name}: pruned ${split.pruned} side spurs of the level-set graph (longest ${fmtL(split.prunedMax)})`);
  const step = options.step ?? 0.5 * rEst;
  const grid = buildTriangleGrid(positions, index, 2 * rEst);
  const passes = Math.max(1, options.passes ?? 3);
  const jPos = split.junctions.map((j) => [j.x, j.y, j.z] as Xyz);
  const branches: Omit<RawBranch, "component">[] = [];
  let skipped = 0;
  // junctions joined by no wire (a link too short for a centre line) are one junction (an X seen as two T's)
  const same = new UnionFind(split.junctions.length);
  let merged = 0;
  const linkTooShort = (chain: (typeof split.chains)[number]): boolean => {
    if (chain.from?.kind === "junction" && chain.to?.kind === "junction" && chain.from.index !== chain.to.index) {
      if (same.find(chain.from.index) !== same.find(chain.to.index)) merged++;
      same.union(chain.from.index, chain.to.index);
      return true;
    }
    return false;
  };
  for (const chain of split.chains) {
    const at = (t: Terminal | null): Xyz | null => (t?.kind === "junction" ? jPos[t.index] : null);
    const J0 = at(chain.from), J1 = at(chain.to);
    // seeds: the loop centroids, less those inside the junctions' first radius
    const seeds: number[] = [];
    for (const e of chain.edges) {
      const p: Xyz = [edgePos[3 * e], edgePos[3 * e + 1], edgePos[3 * e + 2]];
      const near = (J: Xyz | null) => J !== null && Math.hypot(p[0] - J[0], p[1] - J[1], p[2] - J[2]) < rEst;
      if (!near(J0) && !near(J1)) seeds.push(...p);
    }
    if (seeds.length < 6) {
      if (!linkTooShort(chain)) skipped++;
      continue;
    }
    const refined = refineBranch(positions, index, grid, d, Float64Array.from(seeds), chain.closed, J0, J1, rEst, step, passes, options.smoothRadii ?? 0.5, options.keepCaps ?? false);
    if (refined === null) {
      // A long branch with no closed cross-section along it is not "too short": left out, the
      // network would silently miss a wire (a tube crossed by a flattened one, 150 nm long, which
      // had been dropped as "too short", exit 0).
      const along = polylineLength(Float64Array.from(seeds), chain.closed);
      if (along > LONG_UNREFINED_RADII * rEst) {
        const a = seeds.slice(0, 3), b = seeds.slice(-3);
        throw new InputError(file, null, name, `a branch about ${fmtL(along)} long, from near ${fmtP(a[0], a[1], a[2])} to near ${fmtP(b[0], b[1], b[2])}, has no closed cross-section along it (not a tube there: a flattened or doubled surface, or tubes passing through each other?): the network cannot be split there`);
      }
      if (!linkTooShort(chain)) skipped++;
      continue;
    }
    const length = polylineLength(refined.xyz, chain.closed);
    if (length < 2 * rEst && linkTooShort(chain)) continue;
    const rMed = median(refined.radius);
    const rHigh = [...refined.radius].sort((a, b) => a - b)[Math.floor(0.9 * (refined.radius.length - 1))];
    if (chain.from?.kind !== "junction" && chain.to?.kind !== "junction" && !chain.closed && length < 3 * rHigh) {
      // the same rule as for one wire (meshCenterline): a lump, not a wire
      notes.push(`${name}: skipped: a blob, not a wire (centre line ${fmtL(length)} long for a radius of ${fmtL(rHigh)})`);
      skipped++;
      continue;
    }
    const bnotes = [
      `${name}: ${chain.closed ? "closed ring" : "branch"} of length ${fmtL(length)}, ${refined.xyz.length / 3} samples, median tube radius ${fmtL(rMed)}`,
    ];
    if (refined.capStart + refined.capEnd > 0) bnotes.push(`${name}: left out the end caps (${refined.capStart} and ${refined.capEnd} samples where the radius falls below 90% of the median): the branch stops at the last full cross-section`);
    if (refined.folded > 0) bnotes.push(`${name}: the centre line folded back or kinked (turning faster than the tube radius allows) at a free end: left out its ${refined.folded} outermost samples`);
    if (refined.dropped > 0) bnotes.push(`${name}: left out ${refined.dropped} interior samples where no closed cross-section enclosed the centre line`);
    branches.push({ xyz: refined.xyz, radius: refined.radius, radiusSpread: refined.spread, from: chain.from, to: chain.to, closed: chain.closed, diagnostics: bnotes });
  }
  if (skipped > 0) notes.push(`${name}: ${skipped} branches too short for a centre line (under about two tube radii between junctions) left out`);
  if (branches.length === 0) return `${name}: skipped: no branch long enough for a centre line`;
  // renumber the junctions after the merges; a merged junction sits at the mean of its parts
  const rootIndex = new Map<number, number>();
  const parts: number[][] = [];
  split.junctions.forEach((_, j) => {
    const r = same.find(j);
    if (!rootIndex.has(r)) {
      rootIndex.set(r, parts.length);
      parts.push([]);
    }
    parts[rootIndex.get(r) as number].push(j);
  });
  const re = (t: Terminal | null): Terminal | null => (t?.kind === "junction" ? { kind: "junction", index: rootIndex.get(same.find(t.index)) as number } : t);
  const renumbered = branches.map((b) => ({ ...b, from: re(b.from), to: re(b.to) }));
  if (merged > 0) notes.push(`${name}: ${merged} pairs of junction nodes joined by no wire (under two tube radii apart) merged`);
  const junctions = parts.map((m) => {
    const mean = (c: "x" | "y" | "z") => m.reduce((acc, j) => acc + split.junctions[j][c], 0) / m.length;
    return { x: mean("x"), y: mean("y"), z: mean("z"), scale: rEst };
  });
  notes.push(`${name}: ${junctions.length} junctions, ${branches.length} branches, ${split.skeletonCycles} independent cycles in the level-set graph (${nT} triangles)`);
  return {
    branches: renumbered,
    junctions,
    nodes: nN,
    notes,
  };
}

/**
 * Orthogonal-cut refinement of one branch (see `meshNetwork`): `passes` rounds of resampling every
 * `step`, cutting the mesh normal to the local chord tangent, and moving each sample to its
 * section's area centroid. Junction ends (J0 at the start, J1 at the end; null for free ends) are
 * cut back to the last single-tube section.
 */
function refineBranch(
  positions: Float64Array,
  index: Uint32Array,
  grid: TriangleGrid,
  d: Float64Array,
  seeds: Float64Array,
  closed: boolean,
  J0: Xyz | null,
  J1: Xyz | null,
  rEst: number,
  step: number,
  passes: number,
  smoothRadii: number,
  keepCaps: boolean,
): { xyz: Float64Array; radius: Float64Array; spread: Float64Array; dropped: number; capStart: number; capEnd: number; folded: number } | null {
  let pts = resample(runningMean(seeds, closed, 2), closed, step);
  const reach = 2.5 * rEst;
  const m = Math.max(1, Math.round(rEst / step));
  let radius = new Float64Array(0), spread = new Float64Array(0), dropped = 0;
  for (let pass = 0; pass < passes; pass++) {
    if (!closed) pts = extendEnds(pts, 1.5 * rEst, step);
    const tan = chordTangents(pts, closed, m);
    const n = pts.length / 3;
    // each section must follow on from its neighbour in d (the other end of a nearly closed ring is not this branch)
    const sec: (Section | null)[] = sectionsAlong(positions, index, grid, pts, tan, closed, reach, rEst, d).at;
    const rMed = median(sec.filter((s) => s !== null).map((s) => s.radius));
    const single = (i: number) => {
      const s = sec[i];
      return s !== null && s.radius <= 1.2 * rMed && s.spread <= 0.3 * rMed;
    };
    let lo = 0, hi = n - 1;
    if (!closed) {
      const mid = n >> 1;
      const walkOut = (J: Xyz, dir: number): number => {
        let last = mid, bad = 0;
        for (let i = mid; i >= 0 && i < n; i += dir) {
          if (single(i)) {
            last = i;
            bad = 0;
            continue;
          }
          bad++;
          const near = Math.hypot(pts[3 * i] - J[0], pts[3 * i + 1] - J[1], pts[3 * i + 2] - J[2]) < 2.5 * rEst;
          if (near || bad >= 3) break;
        }
        return last;
      };
      if (J0 !== null) lo = walkOut(J0, -1);
      if (J1 !== null) hi = walkOut(J1, 1);
    }
    const out: number[] = [], rad: number[] = [], spr: number[] = [];
    let firstKept = -1, droppedTotal = 0;
    dropped = 0;
    for (let i = lo; i <= hi; i++) {
      const s = sec[i];
      if (s === null) {
        droppedTotal++;
        continue;
      }
      if (firstKept === -1) firstKept = i - lo;
      dropped = droppedTotal - firstKept;
      out.push(s.x, s.y, s.z);
      rad.push(s.radius);
      spr.push(s.spread);
    }
    if (out.length < 6) return null;
    pts = Float64Array.from(out);
    radius = Float64Array.from(rad);
    spread = Float64Array.from(spr);
    if (pass < passes - 1) pts = resample(pts, closed, step);
  }
  // free ends: a line that runs out and folds back (a lump at a noisy end) is cut at its outermost sample
  let folded = 0;
  if (!closed) {
    const k = Math.min(pts.length / 3 - 1, Math.max(2, Math.round((4 * rEst) / step)));
    const cut = (p: Float64Array, from: number, dir: number): number => {
      // the axis of the good part of the line, 4 to 8 radii in from the end, pointing outward
      const inner = from + dir * k, deep = from + 2 * dir * k;
      const ax = [p[3 * inner] - p[3 * deep], p[3 * inner + 1] - p[3 * deep + 1], p[3 * inner + 2] - p[3 * deep + 2]];
      let best = from, bestQ = -Infinity;
      for (let i = from; i !== inner; i += dir) {
        const q = (p[3 * i] - p[3 * inner]) * ax[0] + (p[3 * i + 1] - p[3 * inner + 1]) * ax[1] + (p[3 * i + 2] - p[3 * inner + 2]) * ax[2];
        if (q > bestQ) {
          bestQ = q;
          best = i;
        }
      }
      // a fold means the end is a lump: its outermost sample goes too
      return best === from ? 0 : Math.abs(best - from) + 1;
    };
    const n = pts.length / 3;
    const a = J0 === null && n > 3 * k ? cut(pts, 0, 1) : 0;
    const b = J1 === null && n > 3 * k ? cut(pts, n - 1, -1) : 0;
    folded = a + b;
    if (folded > 0) {
      pts = pts.slice(3 * a, 3 * (n - b));
      radius = radius.slice(a, n - b);
      spread = spread.slice(a, n - b);
    }
  }
  const kinks = trimKinks(pts, radius, spread, closed, J0 === null, J1 === null, step / rEst);
  ({ pts, radius, spread } = kinks);
  folded += kinks.cut;
  // free ends: the cap (radius below 90% of the median, the taper rule of meshCenterline) is not wire; stop at the last full section
  let capStart = 0, capEnd = 0;
  if (!closed && !keepCaps) {
    const n = radius.length, rMed = median(radius);
    let a = 0, b = n - 1;
    if (J0 === null) while (a < b - 6 && radius[a] < 0.9 * rMed) a++;
    if (J1 === null) while (b > a + 6 && radius[b] < 0.9 * rMed) b--;
    capStart = a;
    capEnd = n - 1 - b;
    if (a > 0 || b < n - 1) {
      pts = pts.slice(3 * a, 3 * b + 3);
      radius = radius.slice(a, b + 1);
      spread = spread.slice(a, b + 1);
    }
  }
  // the centre line of a tube means nothing on scales below its radius: average over +-half a radius
  // (a running mean of half-width w moves an arc of radius R inward by about w^2 / (6 R): 0.04% of the curvature at w = r / 2, R = 10 r)
  const half = Math.max(1, Math.round((smoothRadii * rEst) / step));
  if (smoothRadii > 0 && pts.length / 3 > 2 * half + 1) pts = runningMean(pts, closed, half);
  const again = trimKinks(pts, radius, spread, closed, J0 === null, J1 === null, step / rEst);
  folded += again.cut;
  return { xyz: again.pts, radius: again.radius, spread: again.spread, dropped, capStart, capEnd, folded };
}

/**
 * Free ends: a tube cannot bend more tightly than its radius (a curvature radius under r would make
 * it cut into itself), so an end step that turns by more than `maxTurn` = step / r radians from the
 * next one is the cap's or a lump's, not the wire's: such end samples are left out.
 */
function trimKinks(
  pts: Float64Array, radius: Float64Array, spread: Float64Array, closed: boolean, freeStart: boolean, freeEnd: boolean, maxTurn: number,
): { pts: Float64Array<ArrayBuffer>; radius: Float64Array<ArrayBuffer>; spread: Float64Array<ArrayBuffer>; cut: number } {
  if (closed) return { pts: Float64Array.from(pts), radius: Float64Array.from(radius), spread: Float64Array.from(spread), cut: 0 };
  const turn = (i: number, j: number, k: number) => {
    const a = [pts[3 * j] - pts[3 * i], pts[3 * j + 1] - pts[3 * i + 1], pts[3 * j + 2] - pts[3 * i + 2]];
    const b = [pts[3 * k] - pts[3 * j], pts[3 * k + 1] - pts[3 * j + 1], pts[3 * k + 2] - pts[3 * j + 2]];
    const c = Math.hypot(a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]);
    return Math.atan2(c, a[0] * b[0] + a[1] * b[1] + a[2] * b[2]);
  };
  const n = pts.length / 3;
  let a = 0, b = n - 1;
  if (freeStart) while (b - a > 8 && turn(a, a + 1, a + 2) > maxTurn) a++;
  if (freeEnd) while (b - a > 8 && turn(b - 2, b - 1, b) > maxTurn) b--;
  return { pts: Float64Array.from(pts.subarray(3 * a, 3 * b + 3)), radius: Float64Array.from(radius.subarray(a, b + 1)), spread: Float64Array.from(spread.subarray(a, b + 1)), cut: a + n - 1 - b };
}
