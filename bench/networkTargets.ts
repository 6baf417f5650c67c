/**
 * Accuracy of the network split on tomography-like meshes not used in development (run by hand):
 *   npx tsx bench/networkTargets.ts [cases=10] [firstSeed=1001]
 * Tripods of three bent arms and two-rail ladders with two rungs, each drawn with its own random
 * size, bend, voxel size, noise and rotation from the seed, voxelised with correlated noise and
 * triangulated at the voxel edges' midpoints (test/support/networks.ts). Targets (issue 13): branch
 * and junction counts right, junctions within 1.5 tube radii, branch centre lines within 10% of the
 * radius (RMS) away from junctions (outside the junction zones and 1.5 radii of a free end's cap),
 * tripod arm curvature (median of fitProfile's kappa over each arm's interior, 3 radii from the
 * junction and 2 from the free end) within 5% of 1/bend. Prints every case, the fractions meeting
 * each target and the worst case. Invented geometry.
 */
import { fitProfile } from "../src/frame/profile.js";
import { meshNetwork } from "../src/import/mesh/meshNetwork.js";
import type { WireNetwork } from "../src/import/network/types.js";
import { mulberry32 } from "../test/support/rng.js";
import { distanceToSkeleton, ladderSkeleton, moveSkeleton, randomRotation, tripodSkeleton, voxelNetworkMesh, type NetworkSkeleton } from "../test/support/networks.js";

const cases = Number(process.argv[2] ?? 10);
const first = Number(process.argv[3] ?? 1001);

interface Outcome { kind: string; seed: number; counts: boolean; junction: number; rms: number; kappa: number; triangles: number; seconds: number; failed?: string }

function evaluate(net: WireNetwork, sk: NetworkSkeleton, R: number, tripod: boolean): Omit<Outcome, "kind" | "seed" | "triangles" | "seconds"> {
  const counts = net.junctions.length === sk.junctions.length && net.branches.length === sk.branches && net.cycles === sk.cycles && net.ends.length === sk.ends.length;
  const junction = Math.max(0, ...net.junctions.map((j) => Math.min(...sk.junctions.map((q) => Math.hypot(q[0] - j.position[0], q[1] - j.position[1], q[2] - j.position[2]))) / R));
  let rms = 0, kappa = 0;
  for (const b of net.branches) {
    const d = distanceToSkeleton(b.trace.xyz, sk);
    let ss = 0, c = 0;
    d.forEach((v, i) => {
      const p = b.trace.xyz.subarray(3 * i, 3 * i + 3);
      if (b.inZone[i] || sk.ends.some((e) => Math.hypot(e[0] - p[0], e[1] - p[1], e[2] - p[2]) < 1.5 * R)) return;
      ss += v * v;
      c++;
    });
    rms = Math.max(rms, Math.sqrt(ss / Math.max(1, c)) / R);
    if (tripod) {
      let q = NaN;
      try {
        const prof = fitProfile(b.trace, { bootstrap: 0, ...(coordError !== undefined ? { coordinateError: coordError * R } : {}) });
        const ks: number[] = [];
        for (let i = 0; i < prof.n; i++) {
          const p = [prof.x[i], prof.y[i], prof.z[i]];
          const J = sk.junctions[0];
          if (sk.ends.some((e) => Math.hypot(e[0] - p[0], e[1] - p[1], e[2] - p[2]) < 2 * R)) continue;
          if (Math.hypot(p[0] - J[0], p[1] - J[1], p[2] - J[2]) < 3 * R) continue;
          ks.push(prof.kappa[i]);
        }
        ks.sort((a, b2) => a - b2);
        q = ks[ks.length >> 1] / sk.armKappa;
      } catch {
        q = Infinity;
      }
      kappa = Math.max(kappa, Math.abs(q - 1));
    }
  }
  return { counts, junction, rms, kappa };
}

// settings to compare (default: the shipped defaults): NET_SMOOTH=<radii> NET_STEP=<radii>
const tweak = process.env.NET_SMOOTH !== undefined ? { smoothRadii: Number(process.env.NET_SMOOTH) } : {};
const tweakStep = process.env.NET_STEP !== undefined ? Number(process.env.NET_STEP) : undefined;
// NET_COORD=<radii>: fit the arms with that coordinate error given (the --coordinate-error option) instead of the estimated noise
const coordError = process.env.NET_COORD !== undefined ? Number(process.env.NET_COORD) : undefined;
const out: Outcome[] = [];
for (let c = 0; c < cases; c++) {
  for (const kind of ["tripod", "ladder"]) {
    const seed = first + c;
    const u = mulberry32(seed * 7 + (kind === "ladder" ? 3 : 0));
    const R = 4 + 2 * u(); // tube radius, file units
    const voxel = R / (3.2 + 1.6 * u()); // 3.2 to 4.8 voxels per radius
    const noise = 0.25 + 0.2 * u(); // voxels
    const sk0 = kind === "tripod"
      ? tripodSkeleton(R * (18 + 6 * u()), R * (10 + 6 * u()), 0.4 * (u() - 0.5))
      : ladderSkeleton(R * (28 + 8 * u()), R * (7 + 3 * u()), R * (11 + 4 * u()));
    const sk = moveSkeleton(sk0, randomRotation(seed + 500), [10 * u(), 10 * u(), 10 * u()]);
    const mesh = voxelNetworkMesh(sk, R, voxel, noise, seed);
    const t0 = performance.now();
    try {
      const net = meshNetwork(mesh, `${kind}-${seed}.stl`, { unit: "nm", ...tweak, ...(tweakStep !== undefined ? { step: tweakStep * R } : {}) });
      const e = evaluate(net, sk, R, kind === "tripod");
      out.push({ kind, seed, ...e, triangles: mesh.index.length / 3, seconds: (performance.now() - t0) / 1000 });
    } catch (err) {
      out.push({ kind, seed, counts: false, junction: Infinity, rms: Infinity, kappa: Infinity, triangles: mesh.index.length / 3, seconds: 0, failed: String(err).slice(0, 160) });
    }
    const o = out[out.length - 1];
    console.log(`${kind} seed ${seed}: R ${R.toFixed(2)}, ${(R / voxel).toFixed(2)} voxels per radius, noise ${noise.toFixed(2)} voxels, ${o.triangles} triangles: counts ${o.counts ? "right" : "WRONG"}, worst junction ${o.junction.toFixed(3)} R, worst branch RMS ${o.rms.toFixed(3)} R${kind === "tripod" ? `, worst arm curvature error ${(100 * o.kappa).toFixed(1)}%` : ""} (${o.seconds.toFixed(2)} s)${o.failed ? ` FAILED: ${o.failed}` : ""}`);
  }
}
const frac = (xs: Outcome[], ok: (o: Outcome) => boolean) => `${xs.filter(ok).length}/${xs.length}`;
for (const kind of ["tripod", "ladder"]) {
  const xs = out.filter((o) => o.kind === kind);
  const worst = (f: (o: Outcome) => number) => xs.reduce((a, b) => (f(b) > f(a) ? b : a));
  console.log(`\n${kind}: counts right ${frac(xs, (o) => o.counts)}; junctions within 1.5 R ${frac(xs, (o) => o.junction <= 1.5)} (worst ${worst((o) => o.junction).junction.toFixed(3)} R, seed ${worst((o) => o.junction).seed}); ` +
    `centre lines within 10% R RMS ${frac(xs, (o) => o.rms <= 0.1)} (worst ${worst((o) => o.rms).rms.toFixed(3)} R, seed ${worst((o) => o.rms).seed})` +
    (kind === "tripod" ? `; arm curvature within 5% ${frac(xs, (o) => o.kappa <= 0.05)} (worst ${(100 * worst((o) => o.kappa).kappa).toFixed(1)}%, seed ${worst((o) => o.kappa).seed})` : ""));
}
