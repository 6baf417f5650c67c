/**
 * Wires that touch without a junction: two tubes meshed apart and merged so that they share one
 * vertex (one connected piece of the mesh, as welded overlapping tubes give). The splitter finds
 * two unjoined branches; the network's cycle rank must count the pieces of the graph it built.
 * Reference: cycle rank = edges - vertices + components of the same graph, never negative
 * (Diestel, "Graph Theory", section 1.9). Invented test objects (test/support/networks.ts).
 */
import { describe, expect, it } from "vitest";
import { meshCenterline } from "../../../src/import/mesh/meshCenterline.js";
import { meshNetwork } from "../../../src/import/mesh/meshNetwork.js";
import type { Mesh } from "../../../src/import/mesh/types.js";
import { graphPieces } from "../../../src/import/network/assembleNetwork.js";
import { tubeUnionMesh, type NetworkSkeleton } from "../../support/networks.js";

const R = 5;
const rod = (a: [number, number, number], b: [number, number, number]): Mesh => {
  const sk: NetworkSkeleton = { chains: [[a, b]], junctions: [], ends: [a, b], branches: 1, cycles: 0, armKappa: 0 };
  return tubeUnionMesh(sk, R, 1.5);
};

/** Two meshes as one, the second's vertex nearest the first's vertex `touch` replaced by it. */
function touching(m1: Mesh, m2: Mesh, touch: number): Mesh {
  const n1 = m1.positions.length / 3, p = m1.positions.subarray(3 * touch, 3 * touch + 3);
  let best = 0, bd = Infinity;
  for (let v = 0; v < m2.positions.length / 3; v++) {
    const d = Math.hypot(m2.positions[3 * v] - p[0], m2.positions[3 * v + 1] - p[1], m2.positions[3 * v + 2] - p[2]);
    if (d < bd) { bd = d; best = v; }
  }
  // the second mesh's vertex `best` is dropped (every vertex stays referenced)
  const positions = new Float64Array(m1.positions.length + m2.positions.length - 3);
  positions.set(m1.positions);
  positions.set(m2.positions.subarray(0, 3 * best), m1.positions.length);
  positions.set(m2.positions.subarray(3 * best + 3), m1.positions.length + 3 * best);
  const index = new Uint32Array(m1.index.length + m2.index.length);
  index.set(m1.index);
  m2.index.forEach((v, i) => { index[m1.index.length + i] = v === best ? touch : n1 + (v > best ? v - 1 : v); });
  return { positions, index, diagnostics: [] };
}

describe("networks of wires that touch without a junction", () => {
  it("two parallel rods sharing one surface vertex: 2 branches, 4 ends, 0 cycles (was -1)", () => {
    const a = rod([0, 0, 0], [100, 0, 0]);
    // the second rod's surface touches the first's at its top (axes 2R apart)
    let top = 0;
    for (let v = 0; v < a.positions.length / 3; v++) {
      if (Math.abs(a.positions[3 * v] - 50) < 3 && a.positions[3 * v + 2] > a.positions[3 * top + 2]) top = v;
    }
    const net = meshNetwork(touching(a, rod([10, 0, 2 * R], [90, 0, 2 * R]), top), "two-touch.stl", { unit: "nm" });
    expect(net.components).toBe(1);
    expect([net.junctions.length, net.ends.length, net.branches.length, net.cycles]).toEqual([0, 4, 2, 0]);
    expect(net.diagnostics.some((d) => d.includes("2 unjoined parts of the network in 1 connected piece"))).toBe(true);
  });

  it("read as one wire, the same mesh is refused naming the separate paths (it had said \"branched\" with no place)", () => {
    const a = rod([0, 0, 0], [100, 0, 0]);
    let top = 0;
    for (let v = 0; v < a.positions.length / 3; v++) {
      if (Math.abs(a.positions[3 * v] - 50) < 3 && a.positions[3 * v + 2] > a.positions[3 * top + 2]) top = v;
    }
    const mesh = touching(a, rod([10, 0, 2 * R], [90, 0, 2 * R]), top);
    expect(() => meshCenterline(mesh, "two-touch.stl", { unit: "nm" })).toThrow(
      "two-touch.stl: component 1 of 1: not one tube: its cross-sections fall into 2 separate paths although the surface is one piece (wires that touch at a point or along a seam, without a junction): split the mesh into its wires (--branches split)",
    );
  });

  it("a long branch with no closed cross-section is refused naming it, not left out as too short", () => {
    // A rod crossed by a second rod flattened into a plane through it (a doubled ribbon, 150 long),
    // sharing one vertex: the ribbon had been dropped as "too short for a centre line", exit 0.
    const a = rod([0, 0, 0], [200, 0, 0]);
    let top = 0;
    for (let v = 0; v < a.positions.length / 3; v++) {
      if (Math.abs(a.positions[3 * v] - 100) < 3 && a.positions[3 * v + 2] > a.positions[3 * top + 2]) top = v;
    }
    const b = rod([100, -75, 0], [100, 75, 0]);
    for (let v = 0; v < b.positions.length / 3; v++) b.positions[3 * v] = 100;
    expect(() => meshNetwork(touching(a, b, top), "cross.stl", { unit: "nm" })).toThrow(
      /^cross\.stl: component 1 of 1: a branch about \S+ nm long, from near \(.*\) nm to near \(.*\) nm, has no closed cross-section along it \(not a tube there: a flattened or doubled surface, or tubes passing through each other\?\): the network cannot be split there$/,
    );
  });

  it("graphPieces: a path, a ring with no junction and a ring on a junction", () => {
    const end = (id: number) => ({ kind: "end" as const, id }), junction = (id: number) => ({ kind: "junction" as const, id });
    // path e1-J1-e2 plus a loop J1-J1: one piece; a free ring: a second; a lone rod e3-e4: a third
    const pieces = graphPieces([
      { from: end(1), to: junction(1), closed: false },
      { from: junction(1), to: end(2), closed: false },
      { from: junction(1), to: junction(1), closed: true },
      { from: null, to: null, closed: true },
      { from: end(3), to: end(4), closed: false },
    ], 1, 4);
    expect(pieces).toBe(3);
    // cycle rank 5 - (1 + 4 + 1) + 3 = 2: the loop on J1 and the free ring
    expect(5 - (1 + 4 + 1) + pieces).toBe(2);
  });
});
