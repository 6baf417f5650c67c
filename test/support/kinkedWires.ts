/**
 * Kinked wires for tests and benchmarks (invented data, seeded). Away from the kink the truth is
 * that of the smooth wire: kappa = 1/R on an arc, R/(R^2+c^2) and c/(R^2+c^2) on a helix (do Carmo
 * 1976, sec. 1-5); a rigid motion of one side of the kink changes neither.
 */
import { normalStream } from "./rng.js";

const nm = 1e-9;

/**
 * A planar arc of radius `R` nm, `points` points 2 nm apart, turning by `kinkDeg` degrees more
 * after point `kinkAt` (0-based); Gaussian noise `noise` nm on x and y. Metres, interleaved xyz.
 */
export function kinkedArc(R: number, points: number, kinkAt: number, kinkDeg: number, noise: number, seed: number): Float64Array {
  const g = normalStream(seed), xyz = new Float64Array(3 * points);
  let x = 0, y = 0, th = 0;
  for (let i = 0; i < points; ++i) {
    xyz.set([(x + noise * g()) * nm, (y + noise * g()) * nm, 0], 3 * i);
    if (i === kinkAt) th += (kinkDeg * Math.PI) / 180;
    th += 2 / R;
    x += 2 * Math.cos(th); y += 2 * Math.sin(th);
  }
  return xyz;
}

/**
 * A helix (R 100 nm, c 20 nm) of 600 points 3.2 nm apart, 3 turns, whose second half is the
 * continuation turned by `deg` about the z axis through the joint (point 300), where the tangent is
 * nearly along x: the tangent jumps by about `deg`. Gaussian noise `noise` nm. Metres, interleaved xyz.
 */
export function kinkedHelix(deg: number, noise: number, seed: number): Float64Array {
  const g = normalStream(seed), xyz = new Float64Array(1800);
  const R = 100, c = 20, dt = (6 * Math.PI) / 599, a = (deg * Math.PI) / 180;
  const at = (t: number) => [R * Math.cos(t), R * Math.sin(t), c * t];
  const joint = at(299 * dt);
  for (let i = 0; i < 600; ++i) {
    let p = at(i * dt);
    if (i > 299) {
      const dx = p[0] - joint[0], dy = p[1] - joint[1];
      p = [joint[0] + dx * Math.cos(a) - dy * Math.sin(a), joint[1] + dx * Math.sin(a) + dy * Math.cos(a), p[2]];
    }
    xyz.set(p.map((v) => (v + noise * g()) * nm), 3 * i);
  }
  return xyz;
}
