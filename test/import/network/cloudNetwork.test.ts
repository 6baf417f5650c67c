/**
 * Splitting unordered clouds along wire networks (src/import/cloud/cloudNetwork.ts). Invented
 * clouds: noisy points along the tripod and ladder skeletons of test/support/networks.ts.
 * References: the skeletons (junction points, counts); cycle rank (Diestel, "Graph Theory", 1.9).
 */
import { describe, expect, it } from "vitest";
import { cloudNetwork } from "../../../src/import/cloud/cloudNetwork.js";
import { distanceToSkeleton, ladderSkeleton, moveSkeleton, randomRotation, skeletonCloud, tripodSkeleton, type NetworkSkeleton } from "../../support/networks.js";

const opts = { unit: "nm" as const };

function checkCloud(sk: NetworkSkeleton, seed: number): void {
  const net = cloudNetwork(skeletonCloud(sk, 0.5, 0.3, seed), "cloud.xyz", opts);
  expect(net.junctions.length).toBe(sk.junctions.length);
  expect(net.branches.length).toBe(sk.branches);
  expect(net.ends.length).toBe(sk.ends.length);
  expect(net.cycles).toBe(sk.cycles);
  for (const j of net.junctions) {
    const err = Math.min(...sk.junctions.map((q) => Math.hypot(q[0] - j.position[0], q[1] - j.position[1], q[2] - j.position[2])));
    // within half a junction zone (one distance bin, ~5 point spacings); measured 0.4-1.6 (bins of 5.4)
    expect(err).toBeLessThan(j.zoneRadius / 2);
  }
  for (const b of net.branches) {
    // every point kept lies on the skeleton within the noise (3D Gaussian of SD 0.3: 99.9% under 1.7)
    const d = distanceToSkeleton(b.trace.xyz, sk);
    expect(Math.max(...d)).toBeLessThan(2);
    // ordered from its start terminal: consecutive points are close (no jumps across the network)
    let worst = 0;
    for (let i = 1; i < d.length; i++) {
      const p = b.trace.xyz;
      worst = Math.max(worst, Math.hypot(p[3 * i] - p[3 * i - 3], p[3 * i + 1] - p[3 * i - 2], p[3 * i + 2] - p[3 * i - 1]));
    }
    expect(worst).toBeLessThan(5);
  }
}

describe("cloudNetwork", () => {
  it("a tripod cloud: 1 junction, 3 branches, 3 free ends, no cycle", () => checkCloud(tripodSkeleton(60, 50), 5));
  it("a ladder cloud, rotated: 4 junctions, 8 branches, 1 cycle", () => checkCloud(moveSkeleton(ladderSkeleton(150, 40, 60), randomRotation(9)), 6));
  it("a single noisy wire is one branch between two ends", () => {
    const sk: NetworkSkeleton = { chains: [[[0, 0, 0], [30, 10, 0], [60, 0, 5]]], junctions: [], ends: [], branches: 1, cycles: 0, armKappa: 0 };
    const net = cloudNetwork(skeletonCloud(sk, 0.5, 0.3, 3), "wire.xyz", opts);
    expect([net.junctions.length, net.ends.length, net.branches.length, net.cycles]).toEqual([0, 2, 1, 0]);
  });
  it("too few points: one line naming the file (edge case)", () => {
    expect(() => cloudNetwork(new Float64Array(9), "tiny.xyz", opts)).toThrow("tiny.xyz: points: need at least 8 for a network, got 3");
  });
});
