/**
 * Splitting branched tube meshes into wire networks (src/import/mesh/meshNetwork.ts). Test objects
 * are invented (test/support/networks.ts): a tripod of three bent arms and a two-rail ladder with two
 * rungs, each as a CAD-like union of round tubes and as a noisy voxel volume's staircase surface.
 * References: the skeletons the meshes were built around (junction points, arm curvature 1/bend);
 * the cycle rank edges - vertices + components (Diestel, "Graph Theory", section 1.9).
 * Lengths are in arbitrary units passed as metres (the splitter is unit-free).
 */
import { describe, expect, it } from "vitest";
import { fitProfile } from "../../../src/frame/profile.js";
import { meshNetwork } from "../../../src/import/mesh/meshNetwork.js";
import { parseStl } from "../../../src/import/mesh/parseStl.js";
import type { Mesh } from "../../../src/import/mesh/types.js";
import { threeTube, toStlBinary } from "../../support/tubes.js";
import type { WireNetwork } from "../../../src/import/network/types.js";
import {
  distanceToSkeleton, ladderSkeleton, moveSkeleton, randomRotation, tripodSkeleton, tubeUnionMesh, voxelNetworkMesh, type NetworkSkeleton,
} from "../../support/networks.js";

const R = 5; // tube radius
const opts = { unit: "nm" as const };

/** Distance from each junction found to the nearest true junction, in tube radii. */
function junctionErrors(net: WireNetwork, sk: NetworkSkeleton): number[] {
  return net.junctions.map((j) => Math.min(...sk.junctions.map((q) => Math.hypot(q[0] - j.position[0], q[1] - j.position[1], q[2] - j.position[2]))) / R);
}

/** RMS distance of each branch's centre line from the skeleton, in radii, outside junction zones and 1.5 radii of free ends (caps). */
function branchRms(net: WireNetwork, sk: NetworkSkeleton): number[] {
  return net.branches.map((b) => {
    const d = distanceToSkeleton(b.trace.xyz, sk);
    let ss = 0, c = 0;
    d.forEach((v, i) => {
      const p = b.trace.xyz.subarray(3 * i, 3 * i + 3);
      const nearEnd = sk.ends.some((e) => Math.hypot(e[0] - p[0], e[1] - p[1], e[2] - p[2]) < 1.5 * R);
      if (!b.inZone[i] && !nearEnd) {
        ss += v * v;
        c++;
      }
    });
    return Math.sqrt(ss / c) / R;
  });
}

/** Median fitted curvature over each arm's interior (over 3 radii from the junction and 2 from the free end), over the truth. */
function armCurvatureRatios(net: WireNetwork, sk: NetworkSkeleton): number[] {
  return net.branches.map((b) => {
    const prof = fitProfile(b.trace, { bootstrap: 0 });
    const ks: number[] = [];
    for (let i = 0; i < prof.n; i++) {
      const p = [prof.x[i], prof.y[i], prof.z[i]];
      const nearEnd = sk.ends.some((e) => Math.hypot(e[0] - p[0], e[1] - p[1], e[2] - p[2]) < 2 * R);
      const J = sk.junctions[0];
      if (!nearEnd && Math.hypot(p[0] - J[0], p[1] - J[1], p[2] - J[2]) >= 3 * R) ks.push(prof.kappa[i]);
    }
    ks.sort((a, b) => a - b);
    return ks[ks.length >> 1] / sk.armKappa;
  });
}

function check(net: WireNetwork, sk: NetworkSkeleton, junctionTol: number): void {
  expect(net.junctions.length).toBe(sk.junctions.length);
  expect(net.branches.length).toBe(sk.branches);
  expect(net.ends.length).toBe(sk.ends.length);
  expect(net.cycles).toBe(sk.cycles);
  for (const e of junctionErrors(net, sk)) expect(e).toBeLessThan(junctionTol);
  for (const r of branchRms(net, sk)) expect(r).toBeLessThan(0.1);
  // every junction of a tripod or a ladder joins three branch ends
  for (const j of net.junctions) expect(j.branches.length).toBe(3);
}

describe("meshNetwork: tripod of three bent arms", () => {
  const sk = tripodSkeleton(100, 60); // arms 20 radii long, bend radius 12 radii
  it("CAD-like union of tubes: 1 junction within one radius, 3 arms, centre lines within 10% of the radius, curvature within 5%", () => {
    const net = meshNetwork(tubeUnionMesh(sk, R, 1.5), "tripod.stl", opts);
    check(net, sk, 1);
    // measured: junction 0.08 r, RMS 0.001 r, curvature ratios 0.99-1.00
    for (const q of armCurvatureRatios(net, sk)) expect(Math.abs(q - 1)).toBeLessThan(0.05);
    // arms leave the junction at 120 degrees (construction)
    for (const a of net.junctions[0].angles) expect(Math.abs(a.degrees - 120)).toBeLessThan(10);
    // the centre line stops near one radius from the junction, and the zone is marked
    for (const b of net.branches) {
      const J = net.junctions[0].position;
      const k = b.from?.kind === "junction" ? 0 : b.trace.xyz.length / 3 - 1;
      const d = Math.hypot(b.trace.xyz[3 * k] - J[0], b.trace.xyz[3 * k + 1] - J[1], b.trace.xyz[3 * k + 2] - J[2]);
      expect(d).toBeGreaterThan(0.5 * R);
      expect(d).toBeLessThan(2.5 * R);
      expect(b.inZone[k]).toBe(1);
      expect(b.zoneStart + b.zoneEnd).toBeGreaterThan(0);
    }
  });
  it("noisy voxel volume (rotated, staircase surface): the same within the same tolerances", () => {
    const moved = moveSkeleton(sk, randomRotation(21), [3, -2, 1]);
    const mesh = voxelNetworkMesh(moved, R, 1.25, 0.3, 21);
    const net = meshNetwork(mesh, "tripod-voxels.stl", opts);
    check(net, moved, 1);
    // measured (seed 21): curvature ratios within 3%
    for (const q of armCurvatureRatios(net, moved)) expect(Math.abs(q - 1)).toBeLessThan(0.05);
  });
  it("scaling the mesh scales every length and keeps the counts (unit-free)", () => {
    const mesh = tubeUnionMesh(sk, R, 2);
    const a = meshNetwork(mesh, "t.stl", opts);
    const c = 1e-9;
    const scaled: Mesh = { ...mesh, positions: mesh.positions.map((v) => v * c) };
    const b = meshNetwork(scaled, "t.stl", opts);
    expect(b.branches.length).toBe(a.branches.length);
    for (let i = 0; i < 3; i++) expect(b.junctions[0].position[i] / c).toBeCloseTo(a.junctions[0].position[i], 6);
    b.branches.forEach((br, i) => expect(br.length / c).toBeCloseTo(a.branches[i].length, 6));
  });
});

describe("meshNetwork: ladder of two rails and two rungs (one loop)", () => {
  const sk = ladderSkeleton(150, 40, 60);
  it("CAD-like union of tubes: 4 junctions, 4 free ends, 8 branches, 1 cycle; junctions within one radius", () => {
    const net = meshNetwork(tubeUnionMesh(sk, R, 1.5), "ladder.stl", opts);
    check(net, sk, 1);
    // T junctions: one straight angle and two right angles each (construction)
    for (const j of net.junctions) {
      const deg = j.angles.map((a) => a.degrees).sort((p, q) => p - q);
      expect(Math.abs(deg[0] - 90)).toBeLessThan(8);
      expect(Math.abs(deg[2] - 180)).toBeLessThan(8);
    }
  });
  it("noisy voxel volume (rotated): the same counts, junctions within one radius", () => {
    const moved = moveSkeleton(sk, randomRotation(22));
    const net = meshNetwork(voxelNetworkMesh(moved, R, 1.25, 0.3, 22), "ladder-voxels.stl", opts);
    check(net, moved, 1);
  });
});

describe("meshNetwork: edge cases", () => {
  it("a single tube is one branch between two free ends, no junction, no cycle", () => {
    const sk: NetworkSkeleton = { chains: [[[0, 0, 0], [80, 0, 0]]], junctions: [], ends: [[0, 0, 0], [80, 0, 0]], branches: 1, cycles: 0, armKappa: 0 };
    const net = meshNetwork(tubeUnionMesh(sk, R, 1.5), "rod.stl", opts);
    expect([net.junctions.length, net.ends.length, net.branches.length, net.cycles]).toEqual([0, 2, 1, 0]);
    expect(net.branches[0].zoneStart + net.branches[0].zoneEnd).toBe(0);
  });
  it("a nearly closed ring (uncapped 355 degree arc, ends 4.4 nm apart) is one branch that stops at its own ends", () => {
    // truth: arc length R theta (textbook closed form) = 309.8 nm; the branch had run on into the other end's tube (344.5)
    const Rr = 50, th = (355 * Math.PI) / 180;
    const stl = toStlBinary(threeTube((t) => [Rr * Math.cos(th * t), Rr * Math.sin(th * t), 0], R, 240, 16, false));
    const net = meshNetwork(parseStl(stl, "arc355.stl", opts), "arc355.stl", opts);
    expect([net.junctions.length, net.ends.length, net.branches.length, net.cycles]).toEqual([0, 2, 1, 0]);
    const xyz = net.branches[0].trace.xyz;
    let len = 0;
    for (let i = 3; i < xyz.length; i += 3) len += Math.hypot(xyz[i] - xyz[i - 3], xyz[i + 1] - xyz[i - 2], xyz[i + 2] - xyz[i - 1]);
    expect(Math.abs(len / 1e-9 - Rr * th) / (Rr * th)).toBeLessThan(0.02);
  });
  it("a ring is one closed branch with one cycle", () => {
    const ring = Array.from({ length: 121 }, (_, i) => [40 * Math.cos((2 * Math.PI * i) / 120), 40 * Math.sin((2 * Math.PI * i) / 120), 0] as [number, number, number]);
    const sk: NetworkSkeleton = { chains: [ring], junctions: [], ends: [], branches: 1, cycles: 1, armKappa: 1 / 40 };
    const net = meshNetwork(tubeUnionMesh(sk, R, 1.5), "ring.stl", opts);
    expect([net.junctions.length, net.ends.length, net.branches.length, net.cycles]).toEqual([0, 0, 1, 1]);
    expect(net.branches[0].closed).toBe(true);
  });
});
