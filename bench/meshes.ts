/**
 * Tube meshes -> centre line -> curvature and torsion (run by hand: `npx tsx bench/meshes.ts`).
 * CAD-like tubes (three's TubeGeometry and our capped tube, 12-24 facets round, no noise) and
 * tomography-like ones (marching tetrahedra on the distance field of the centre line: staircase
 * surfaces, uneven triangles). Prints the centre line's largest distance from the true one (in tube
 * radii), the median kappa and tau against the closed forms (torus kappa = 1/R; helix
 * kappa = r/(r^2+c^2), tau = c/(r^2+c^2)), band coverage of the truth, and flags. Invented geometry.
 */
import { fitProfile } from "../src/frame/profile.js";
import { meshCenterline } from "../src/import/mesh/meshCenterline.js";
import { parseStl } from "../src/import/mesh/parseStl.js";
import { FLAG_END, FLAG_TORSION_UNDEFINED } from "../src/types.js";
import { cappedTube, circleCurve, distancesToTruth, helixCurve, implicitTube, threeTube, toStlBinary, truthPolyline, type CurveFn } from "../test/support/tubes.js";

interface Case { name: string; geo: () => Parameters<typeof toStlBinary>[0]; curve: CurveFn; r: number; kappa: number; tau: number | null; closed: boolean }
const hr = 60, pitch = 157, c = pitch / (2 * Math.PI);
const hk = hr / (hr * hr + c * c), ht = c / (hr * hr + c * c);
const helix = helixCurve(hr, pitch, 3);
const helixSkeleton = Array.from({ length: 601 }, (_, i) => helix(i / 600));
const torus = circleCurve(100);
const line: CurveFn = (t) => [600 * t, 0, 0];
const cases: Case[] = [
  { name: "torus CAD 16 facets", geo: () => threeTube(torus, 10, 200, 16, true), curve: torus, r: 10, kappa: 0.01, tau: null, closed: true },
  { name: "torus CAD 24 facets", geo: () => threeTube(torus, 10, 120, 24, true), curve: torus, r: 10, kappa: 0.01, tau: null, closed: true },
  { name: "helix CAD 12 facets", geo: () => threeTube(helix, 10, 300, 12, false), curve: helix, r: 10, kappa: hk, tau: ht, closed: false },
  { name: "helix capped 16", geo: () => cappedTube(helix, 10, { tubular: 300, radial: 16, capRings: 4 }), curve: helix, r: 10, kappa: hk, tau: ht, closed: false },
  { name: "helix capped noisy", geo: () => cappedTube(helix, 10, { tubular: 300, radial: 16, capRings: 4, noiseRel: 0.03, seed: 3 }), curve: helix, r: 10, kappa: hk, tau: ht, closed: false },
  { name: "helix marching", geo: () => implicitTube([helixSkeleton], 10, 3), curve: helix, r: 10, kappa: hk, tau: ht, closed: false },
  { name: "straight CAD", geo: () => threeTube(line, 10, 60, 16, false), curve: line, r: 10, kappa: 0, tau: null, closed: false },
  { name: "straight capped", geo: () => cappedTube(line, 10, { tubular: 60, radial: 16, capRings: 4 }), curve: line, r: 10, kappa: 0, tau: null, closed: false },
];
for (const k of cases) {
  const stl = toStlBinary(k.geo());
  try {
    const mesh = parseStl(stl, k.name, { unit: "nm" });
    const [trace] = meshCenterline(mesh, k.name, { unit: "nm" });
    const { dist, foot } = distancesToTruth(trace.xyz, truthPolyline(k.curve, 20000, 1e-9));
    let maxD = 0;
    for (let i = 0; i < dist.length; i++) if (k.closed || (foot[i] > 0.02 && foot[i] < 0.98)) maxD = Math.max(maxD, dist[i]);
    const p = fitProfile(trace, { bootstrap: 100 });
    const ks: number[] = [], ts: number[] = [];
    let cov = 0, cnt = 0, nanT = 0;
    for (let j = 0; j < p.n; ++j) {
      if (p.flags[j] & FLAG_END) continue;
      ks.push(p.kappa[j] * 1e-9);
      if (Number.isFinite(p.tau[j])) ts.push(p.tau[j] * 1e-9); else ++nanT;
      if (k.kappa > 0) { ++cnt; if (p.kappaLo[j] * 1e-9 <= k.kappa && k.kappa <= p.kappaHi[j] * 1e-9) ++cov; }
    }
    const med = (a: number[]) => a.sort((x, y) => x - y)[a.length >> 1];
    const mk = med(ks), mt = ts.length ? med(ts) : NaN;
    const kErr = k.kappa > 0 ? `${((mk / k.kappa - 1) * 100).toFixed(1)}%` : `kappa ${mk.toExponential(1)}/nm`;
    const tErr = k.tau !== null ? `${((mt / k.tau - 1) * 100).toFixed(1)}%` : `tau NaN at ${nanT}/${nanT + ts.length}`;
    console.log(`${k.name.padEnd(22)} centre line ${(maxD * 1e9 / k.r).toFixed(3)} r | kappa ${kErr.padStart(8)} | tau ${tErr.padStart(10)} | covK ${cnt ? (cov / cnt).toFixed(2) : "-"} | sigma ${(p.sigma * 1e9).toPrecision(2)} nm, ${p.segments} intervals`);
  } catch (e) {
    console.log(`${k.name.padEnd(22)} REFUSED ${(e as Error).message}`);
  }
}
