import { bondRotation, symEigen3 } from "./linalg.js";
import type { ReducedSystem } from "./types.js";

/**
 * Homogeneous state and magnon frequencies of a discrete chain (spacing h, reduced) on a helix of
 * constant reduced kappa, tau, from the exact lattice energy
 *   E = sum_i |c_(i+1) - R c_i|^2 / h + h sum_i c_i^T Q c_i,  R = exp(-h [D]x)
 * (local components c, bond rotation R of the frame). The homogeneous state is the lowest
 * eigenvector of M0 = (2I - R - R^T)/h^2 + Q; the modes of wave number k solve the 2x2 Hermitian
 * problem of M(k) - lambda0 on the tangent plane, M(k) = (2I - e^(-ikh) R - e^(ikh) R^T)/h^2 + Q,
 * omega^2 its eigenvalues (sigma model L = |n_t|^2/2 - e/2). A lattice check of the continuum
 * formulas of ../shared/PHYSICS.md section 6 (own derivation). NaN for imaginary frequencies.
 * Cost O(1) per k.
 * @example latticeMagnons(plainSystem("antiferro"), 1, 0.5, 2*Math.PI/100, [1]).modes[0].lower // 0.58345646
 */
export function latticeMagnons(
  system: ReducedSystem,
  kappa: number,
  tau: number,
  h: number,
  ks: readonly number[],
): { u: Float64Array; energy: number; modes: { k: number; lower: number; upper: number }[] } {
  const r = bondRotation(new Float64Array(9), kappa, tau, h);
  const m0 = new Float64Array(9);
  for (let i = 0; i < 3; ++i)
    for (let j = 0; j < 3; ++j) m0[3 * i + j] = ((i === j ? 2 : 0) - r[3 * i + j] - r[3 * j + i]) / (h * h) + system.q[3 * i + j];
  const { values, vectors } = symEigen3(m0);
  const lambda0 = values[0];
  const u = vectors.slice(0, 3);
  const e1 = vectors.slice(3, 6), e2 = vectors.slice(6, 9);
  const modes = ks.map((k) => {
    const c = Math.cos(k * h), s = Math.sin(k * h);
    // M(k) = A + i S with A symmetric, S antisymmetric
    const quad = (x: Float64Array, y: Float64Array): { re: number; im: number } => {
      let re = 0, im = 0;
      for (let i = 0; i < 3; ++i)
        for (let j = 0; j < 3; ++j) {
          const sym = ((i === j ? 2 : 0) - c * (r[3 * i + j] + r[3 * j + i])) / (h * h) + system.q[3 * i + j];
          const anti = (s * (r[3 * i + j] - r[3 * j + i])) / (h * h);
          re += x[i] * sym * y[j];
          im += x[i] * anti * y[j];
        }
      return { re, im };
    };
    const a = quad(e1, e1).re - lambda0, d = quad(e2, e2).re - lambda0;
    const b = quad(e1, e2);
    const root = Math.sqrt(0.25 * (a - d) * (a - d) + b.re * b.re + b.im * b.im);
    const lo2 = 0.5 * (a + d) - root, hi2 = 0.5 * (a + d) + root;
    return { k, lower: lo2 >= 0 ? Math.sqrt(lo2) : NaN, upper: hi2 >= 0 ? Math.sqrt(hi2) : NaN };
  });
  // on the sphere the bond term already holds the geometric part, so the energy density is lambda0
  return { u, energy: lambda0, modes };
}
