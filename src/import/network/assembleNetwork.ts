import type { Source, Trace } from "../../types.js";
import { angleDeg, cycleRank, endAxis, nearestPointToLines, type AxisLine } from "./junctionFit.js";
import type { Terminal } from "./splitGraph.js";
import type { NetworkBranch, NetworkEnd, NetworkJunction, NetworkNode, WireNetwork } from "./types.js";
import { polylineLength } from "../mesh/polyline.js";
import { median } from "../median.js";

/** A branch as the mesh or cloud splitter found it, ordered from `from` to `to`. Metres. */
export interface RawBranch {
  readonly xyz: Float64Array;
  readonly radius?: Float64Array;
  readonly radiusSpread?: Float64Array;
  readonly facetLength?: number;
  /** Length to report when the polyline through `xyz` is not the wire's (a cloud's noisy points): m. */
  readonly length?: number;
  readonly from: Terminal | null;
  readonly to: Terminal | null;
  readonly closed: boolean;
  /** 0-based connected piece of the input. */
  readonly component: number;
  readonly diagnostics: readonly string[];
}

/** A junction as the splitter found it: first position estimate and its length scale (tube radius, m). */
export interface RawJunction {
  readonly x: number;
  readonly y: number;
  readonly z: number;
  readonly scale: number;
}

export interface AssembleOptions {
  readonly source: Source;
  /** Junction zone radius in units of the junction's scale [2]. */
  readonly zoneRadii?: number;
  /** Length over which each branch's end axis is fitted, in units of the junction's scale [3]. */
  readonly axisRadii?: number;
  /** Quotes a position (m) in the file's unit, for notes. */
  readonly fmtP: (x: number, y: number, z: number) => string;
  readonly fmtL: (v: number) => string;
  readonly diagnostics: readonly string[];
}



/**
 * Turns the splitter's branches and junctions into a {@link WireNetwork}: numbers everything (branches
 * longest first, terminals by first appearance), places each junction where its branches' axes meet
 * (`endAxis` over `axisRadii` scales of each branch end, then `nearestPointToLines` with the
 * skeleton's estimate as a weak prior; when the fit moves the junction by more than 3 scales, or
 * fewer than two axes are known, the estimate is kept and a note says so), measures the angles
 * between the end tangents, marks each branch's samples within `zoneRadii` scales of a junction at
 * its ends, and counts the cycles (cycle rank over the pieces of the graph built: {@link graphPieces}). Pure.
 */
export function assembleNetwork(raw: readonly RawBranch[], rawJunctions: readonly RawJunction[], options: AssembleOptions): WireNetwork {
  const zoneRadii = options.zoneRadii ?? 2;
  const axisRadii = options.axisRadii ?? 3;
  const notes = [...options.diagnostics];
  const lengths = raw.map((b) => b.length ?? polylineLength(b.xyz, b.closed));
  const order = raw.map((_, i) => i).sort((a, b) => lengths[b] - lengths[a] || raw[a].xyz[0] - raw[b].xyz[0] || a - b);
  // ids by first appearance
  const junctionId = new Map<number, number>(), endId = new Map<number, number>();
  const ends: { id: number; position: [number, number, number]; branch: number }[] = [];
  const node = (t: Terminal | null, bi: number, atEnd: boolean): NetworkNode | null => {
    if (t === null) return null;
    if (t.kind === "junction") {
      let id = junctionId.get(t.index);
      if (id === undefined) junctionId.set(t.index, (id = junctionId.size + 1));
      return { kind: "junction", id };
    }
    let id = endId.get(t.node);
    if (id === undefined) {
      endId.set(t.node, (id = endId.size + 1));
      const p = raw[bi].xyz, k = atEnd ? p.length - 3 : 0;
      ends.push({ id, position: [p[k], p[k + 1], p[k + 2]], branch: 0 });
    }
    return { kind: "end", id };
  };
  const fromTo = order.map((bi, k) => {
    const from = node(raw[bi].from, bi, false), to = node(raw[bi].to, bi, true);
    for (const [t, n] of [[from, raw[bi].from], [to, raw[bi].to]] as const) {
      if (t?.kind === "end" && n?.kind === "end") ends[t.id - 1].branch = k + 1;
    }
    return { from, to };
  });
  // junctions: axes of the branch ends meeting there
  const byJunction: { branch: number; bi: number; atEnd: boolean }[][] = Array.from({ length: junctionId.size }, () => []);
  order.forEach((bi, k) => {
    const { from, to } = fromTo[k];
    if (from?.kind === "junction") byJunction[from.id - 1].push({ branch: k + 1, bi, atEnd: false });
    if (to?.kind === "junction") byJunction[to.id - 1].push({ branch: k + 1, bi, atEnd: true });
  });
  const junctionIndexOf = new Map<number, number>();
  for (const [index, id] of junctionId) junctionIndexOf.set(id, index);
  const junctions: NetworkJunction[] = byJunction.map((list, j) => {
    const rj = rawJunctions[junctionIndexOf.get(j + 1) as number];
    const prior: [number, number, number] = [rj.x, rj.y, rj.z];
    const scale = rj.scale;
    const axes: (AxisLine | null)[] = list.map(({ bi, atEnd }) => endAxis(raw[bi].xyz, atEnd, axisRadii * scale));
    const known = axes.filter((a): a is AxisLine => a !== null);
    let position = prior, axisMiss = NaN;
    if (known.length >= 2) {
      const fit = nearestPointToLines(known, prior);
      const shift = Math.hypot(fit.point[0] - prior[0], fit.point[1] - prior[1], fit.point[2] - prior[2]);
      if (shift <= 3 * scale) {
        position = fit.point;
        axisMiss = fit.rms;
      } else {
        notes.push(`junction ${j + 1} near ${options.fmtP(...prior)}: the branch axes meet ${options.fmtL(shift)} away (over 3 tube radii); kept the skeleton's estimate`);
      }
    } else {
      notes.push(`junction ${j + 1} near ${options.fmtP(...prior)}: fewer than two branch axes known; kept the skeleton's estimate`);
    }
    const tangents = axes.map((a, i) => {
      if (a !== null) return a.tangent;
      // fall back to the chord from the junction to the branch's far end of the window
      const p = raw[list[i].bi].xyz, k = list[i].atEnd ? p.length - 3 : 0;
      const d = [p[k] - position[0], p[k + 1] - position[1], p[k + 2] - position[2]];
      const l = Math.hypot(d[0], d[1], d[2]) || 1;
      return [d[0] / l, d[1] / l, d[2] / l] as const;
    });
    const angles: { between: [number, number]; degrees: number }[] = [];
    for (let a = 0; a < list.length; a++) {
      for (let b = a + 1; b < list.length; b++) angles.push({ between: [list[a].branch, list[b].branch], degrees: angleDeg(tangents[a], tangents[b]) });
    }
    return {
      id: j + 1,
      position,
      branches: list.map((l) => l.branch),
      tangents: tangents.map((t) => [t[0], t[1], t[2]] as const),
      angles,
      axisMiss,
      zoneRadius: zoneRadii * scale,
      shift: Math.hypot(position[0] - prior[0], position[1] - prior[1], position[2] - prior[2]),
    };
  });
  // The cycle rank counts the connected pieces of the graph built here (junctions, ends and rings
  // joined by branches), not the input's: two wires welded at one vertex are one piece of the mesh
  // but two unjoined branches (rank 2 - 4 + 1 = -1 had been reported).
  const components = new Set(raw.map((b) => b.component)).size;
  const pieces = graphPieces(order.map((bi, k) => ({ ...fromTo[k], closed: raw[bi].closed })), junctionId.size, ends.length);
  if (pieces > components) {
    notes.push(`${pieces} unjoined parts of the network in ${components} connected ${components === 1 ? "piece" : "pieces"} of the input: wires that touch without a junction are kept apart`);
  }
  // branches, with their junction zones
  const branches: NetworkBranch[] = order.map((bi, k) => {
    const b = raw[bi];
    const { from, to } = fromTo[k];
    const n = b.xyz.length / 3;
    const inZone = new Uint8Array(n);
    const s = new Float64Array(n);
    for (let i = 1; i < n; i++) {
      s[i] = s[i - 1] + Math.hypot(b.xyz[3 * i] - b.xyz[3 * i - 3], b.xyz[3 * i + 1] - b.xyz[3 * i - 2], b.xyz[3 * i + 2] - b.xyz[3 * i - 1]);
    }
    let zoneStart = 0, zoneEnd = 0;
    for (const [t, atEnd] of [[from, false], [to, true]] as const) {
      if (t?.kind !== "junction") continue;
      const J = junctions[t.id - 1];
      const r2 = J.zoneRadius * J.zoneRadius;
      const near = (i: number) => (b.xyz[3 * i] - J.position[0]) ** 2 + (b.xyz[3 * i + 1] - J.position[1]) ** 2 + (b.xyz[3 * i + 2] - J.position[2]) ** 2 < r2;
      if (!atEnd) {
        let i = 0;
        while (i < n && near(i)) inZone[i++] = 1;
        zoneStart = i < n ? s[i] : s[n - 1];
      } else {
        let i = n - 1;
        while (i >= 0 && near(i)) inZone[i--] = 1;
        zoneEnd = i >= 0 ? s[n - 1] - s[i] : s[n - 1];
      }
    }
    const name = (t: NetworkNode | null) => (t === null ? "none" : `${t.kind} ${t.id}`);
    const note = b.closed
      ? `branch ${k + 1} of ${order.length}: a closed ring with no junction`
      : `branch ${k + 1} of ${order.length}: from ${name(from)} to ${name(to)}` +
        (zoneStart > 0 || zoneEnd > 0 ? `; junction zones over the first ${options.fmtL(zoneStart)} and the last ${options.fmtL(zoneEnd)} (curvature there is the junction's, not the wire's)` : "");
    const trace: { -readonly [K in keyof Trace]: Trace[K] } = {
      xyz: b.xyz,
      closed: b.closed,
      dims: 3,
      source: options.source,
      diagnostics: [...(k === 0 ? notes : []), ...b.diagnostics, note],
    };
    if (b.radius !== undefined) trace.radius = b.radius;
    if (b.radiusSpread !== undefined) trace.radiusSpread = b.radiusSpread;
    if (b.facetLength !== undefined) trace.facetLength = b.facetLength;
    return {
      id: k + 1,
      trace,
      from,
      to,
      closed: b.closed,
      length: lengths[bi],
      radius: b.radius !== undefined ? median(b.radius) : null,
      zoneStart,
      zoneEnd,
      inZone,
      component: b.component + 1,
    };
  });
  const rings = branches.filter((b) => b.closed && b.from === null).length;
  const cycles = cycleRank(branches.length, junctions.length + ends.length + rings, pieces);
  return { source: options.source, junctions, ends, branches, cycles, components, diagnostics: notes };
}

/**
 * Connected pieces of the network's graph: vertices are the junctions, the free ends and each ring
 * with no junction (one vertex, as in the cycle rank), edges the branches. Union-find, O(branches).
 */
export function graphPieces(branches: readonly Pick<NetworkBranch, "from" | "to" | "closed">[], junctions: number, ends: number): number {
  const parent: number[] = [];
  const add = (): number => (parent.push(parent.length), parent.length - 1);
  const find = (v: number): number => {
    while (parent[v] !== v) v = parent[v] = parent[parent[v]];
    return v;
  };
  for (let i = 0; i < junctions + ends; i++) add();
  const vertex = (t: NetworkNode | null): number | null => (t === null ? null : t.kind === "junction" ? t.id - 1 : junctions + t.id - 1);
  for (const b of branches) {
    const u = vertex(b.from), w = vertex(b.to);
    if (u === null && w === null) {
      if (b.closed) add(); // a ring with no junction: its own vertex and piece
      continue;
    }
    if (u !== null && w !== null) parent[find(u)] = find(w);
  }
  let pieces = 0;
  for (let v = 0; v < parent.length; v++) if (find(v) === v) pieces++;
  return pieces;
}
