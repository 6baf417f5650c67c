/**
 * splitGraph (src/import/network/splitGraph.ts) on small hand-made skeleton graphs, and the
 * junction-zone flag (junctionZones.ts). Reference for cycle counts: cycle rank = edges - vertices +
 * components (Diestel, "Graph Theory", section 1.9).
 */
import { describe, expect, it } from "vitest";
import { markJunctionZones } from "../../../src/import/network/junctionZones.js";
import { splitGraph, type SkeletonGraph } from "../../../src/import/network/splitGraph.js";
import { FLAG_END, FLAG_JUNCTION_ZONE } from "../../../src/types.js";
import { makeProfile } from "../../support/profiles.js";

/** A graph from node positions and edges (edge positions at the midpoints). */
function graph(nodes: number[][], edges: [number, number][]): SkeletonGraph {
  const nodePos = Float64Array.from(nodes.flat());
  const edgePos = Float64Array.from(edges.flatMap(([a, b]) => [0, 1, 2].map((k) => 0.5 * (nodes[a][k] + nodes[b][k]))));
  return { nodes: nodes.length, nodePos, edgeA: Uint32Array.from(edges, (e) => e[0]), edgeB: Uint32Array.from(edges, (e) => e[1]), edgePos };
}

/** A chain of nodes along a segment, appended to `nodes`, joined to `from`; returns the last node id. */
function arm(nodes: number[][], edges: [number, number][], from: number, dir: number[], length: number, step = 1): number {
  let prev = from;
  const o = nodes[from];
  for (let s = step; s <= length + 1e-9; s += step) {
    nodes.push([o[0] + s * dir[0], o[1] + s * dir[1], o[2] + s * dir[2]]);
    edges.push([prev, nodes.length - 1]);
    prev = nodes.length - 1;
  }
  return prev;
}

describe("splitGraph", () => {
  it("a star of three arms: one junction, three branches from it to free ends, no cycle", () => {
    const nodes = [[0, 0, 0]], edges: [number, number][] = [];
    for (const d of [[1, 0, 0], [0, 1, 0], [-1, 0, 0]]) arm(nodes, edges, 0, d, 10);
    const s = splitGraph(graph(nodes, edges), 2.5, 2);
    expect(s.junctions).toHaveLength(1);
    expect(s.chains).toHaveLength(3);
    expect(s.chains.every((c) => c.from?.kind === "junction" && c.to?.kind === "end")).toBe(true);
    expect(s.skeletonCycles).toBe(0);
  });
  it("an X seen as two degree-3 nodes one unit apart merges into one junction of four branches", () => {
    const nodes = [[0, 0, 0], [1, 0, 0]], edges: [number, number][] = [[0, 1]];
    arm(nodes, edges, 0, [-1, 0, 0], 10);
    arm(nodes, edges, 0, [0, 1, 0], 10);
    arm(nodes, edges, 1, [1, 0, 0], 10);
    arm(nodes, edges, 1, [0, -1, 0], 10);
    const s = splitGraph(graph(nodes, edges), 2.5, 2);
    expect(s.junctions).toHaveLength(1);
    expect([...s.junctions[0].nodes].sort()).toEqual([0, 1]);
    expect(s.chains).toHaveLength(4);
  });
  it("short spurs are pruned; a small handle (two close degree-3 nodes with two parallel paths) is no junction", () => {
    const nodes = [[0, 0, 0]], edges: [number, number][] = [];
    const end = arm(nodes, edges, 0, [1, 0, 0], 20);
    arm(nodes, edges, 10, [0, 1, 0], 1.5); // a spur of 1.5 < 2.5
    // a handle: a second path between nodes 5 and 6
    nodes.push([5.5, 0.3, 0]);
    edges.push([5, nodes.length - 1], [nodes.length - 1, 6]);
    const s = splitGraph(graph(nodes, edges), 2.5, 2);
    expect(s.pruned).toBe(1);
    expect(s.junctions).toHaveLength(0);
    expect(s.chains).toHaveLength(1);
    expect(s.chains[0].from?.kind).toBe("end");
    expect(s.chains[0].to?.kind).toBe("end");
    void end;
  });
  it("a ring is one closed chain; its skeleton has one cycle", () => {
    const n = 40, nodes = Array.from({ length: n }, (_, i) => [10 * Math.cos((2 * Math.PI * i) / n), 10 * Math.sin((2 * Math.PI * i) / n), 0]);
    const edges = Array.from({ length: n }, (_, i) => [i, (i + 1) % n] as [number, number]);
    const s = splitGraph(graph(nodes, edges), 2.5, 2);
    expect(s.chains).toHaveLength(1);
    expect(s.chains[0].closed).toBe(true);
    expect(s.skeletonCycles).toBe(1);
  });
});

describe("markJunctionZones", () => {
  it("flags the samples within the zone radius of the junction, keeps the other bits, and says how many", () => {
    const p = makeProfile({ n: 21, length: 20, kappa: () => 0, tau: () => 0 }); // a straight wire of length 20 from the origin (test/support/profiles.ts)
    const flagged = markJunctionZones(p, [{ junction: 2, position: [0, 0, 0], radius: 4.5 }]);
    const bits = Array.from(flagged.flags, (f) => (f & FLAG_JUNCTION_ZONE) !== 0);
    const expected = Array.from(p.x, (x, i) => Math.hypot(x, p.y[i], p.z[i]) < 4.5);
    expect(bits).toEqual(expected);
    expect(bits.filter(Boolean).length).toBeGreaterThan(0);
    for (let i = 0; i < p.n; i++) expect(flagged.flags[i] & ~FLAG_JUNCTION_ZONE).toBe(p.flags[i]);
    expect(flagged.diagnostics.at(-1)).toMatch(/^\d+ of 21 samples lie within the zone of junction 2 \(flag 32\)/);
    expect(p.flags.some((f) => (f & FLAG_JUNCTION_ZONE) !== 0)).toBe(false); // the input is not changed
    expect(markJunctionZones(p, [])).toBe(p);
    void FLAG_END;
  });
});
