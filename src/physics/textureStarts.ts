import type { Profile } from "../types.js";
import { symEigen3 } from "./linalg.js";
import type { NamedStart } from "./relaxWire.js";

/** A periodic cell to tile over a stretch: sample range, the cell texture (local components, 3 per
 *  node, one half-period, antiperiodic) and its half-period (reduced). */
export interface PeriodicCell {
  readonly i0: number;
  readonly i1: number;
  readonly texture: Float64Array;
  readonly halfPeriod: number;
}

/**
 * Start textures for the whole-wire relaxation besides the local homogeneous state
 * (../shared/PHYSICS.md sections 3-4: relaxers must try several starts):
 * - lab-uniform: the vector fixed in the lab along the two leading principal directions of the
 *   tangents (eigenvectors of sum T T^T) and along `labDirections` (an applied field), in local
 *   components (d . T, d . N, d . B); on a closed FM
 *   wire this relaxes to the onion state (two walls), on an open wire to a lab-fixed texture;
 * - periodic: each given cell (the best texture of `periodicState`) tiled along its stretch, the
 *   vector reversed every half-period; the local homogeneous state elsewhere (`homogeneous`).
 * Reduced lengths: `sReduced` is s / l. Cost O(n).
 * @example textureStarts(profile, s, hom, []).map((x) => x.name) // ["lab-uniform", "lab-uniform"]
 */
export function textureStarts(
  profile: Pick<Profile, "n" | "T" | "N" | "B">,
  sReduced: ArrayLike<number>,
  homogeneous: Float64Array,
  cells: readonly PeriodicCell[],
  labDirections: readonly (readonly number[])[] = [],
): NamedStart[] {
  const n = profile.n, T = profile.T, N = profile.N, B = profile.B;
  const m = new Float64Array(9);
  for (let i = 0; i < n; ++i)
    for (let a = 0; a < 3; ++a) for (let b = 0; b < 3; ++b) m[3 * a + b] += T[3 * i + a] * T[3 * i + b];
  const eig = symEigen3(m);
  const out: NamedStart[] = [];
  // the two largest eigenvalues (ascending order: rows 2 and 1), then the caller's directions
  const dirs = [2, 1].map((row) => [eig.vectors[3 * row], eig.vectors[3 * row + 1], eig.vectors[3 * row + 2]]).concat(labDirections.map((d) => [...d]));
  for (const d of dirs) {
    const v = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) {
      const o = 3 * i;
      v[o] = d[0] * T[o] + d[1] * T[o + 1] + d[2] * T[o + 2];
      v[o + 1] = d[0] * N[o] + d[1] * N[o + 1] + d[2] * N[o + 2];
      v[o + 2] = d[0] * B[o] + d[1] * B[o + 1] + d[2] * B[o + 2];
      // a tiny out-of-plane part keeps the start off an exact saddle
      v[o + 2] += 0.01;
    }
    out.push({ name: "lab-uniform", local: v });
  }
  if (cells.length > 0) {
    const v = Float64Array.from(homogeneous);
    for (const c of cells) {
      const mc = c.texture.length / 3;
      const s0 = sReduced[c.i0];
      for (let i = c.i0; i < c.i1; ++i) {
        const x = (sReduced[i] - s0) / c.halfPeriod;
        const turns = Math.floor(x);
        const k = Math.min(mc - 1, Math.floor((x - turns) * mc));
        const sign = turns % 2 === 0 ? 1 : -1;
        for (let a = 0; a < 3; ++a) v[3 * i + a] = sign * c.texture[3 * k + a];
      }
    }
    out.push({ name: "periodic", local: v });
  }
  return out;
}
