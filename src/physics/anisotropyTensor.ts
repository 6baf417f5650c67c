import type { ReducedSystem } from "./types.js";

/**
 * Total effective anisotropy tensor (material + geometric) in local (T, N, B) components, reduced
 * (units of K): Qtot = Q_material - D D^T with the Darboux vector D = (tau, 0, kappa) (reduced),
 * so that the energy density is e = |D|^2 + u^T Qtot u + (exchange of the local components)
 * + 2 D . (u x u'). Source: ../shared/PHYSICS.md section 2 (own derivation; same structure as
 * Gaididei, Kravchuk, Sheka, PRL 112, 257203 (2014)). Row-major 3x3, written into out.
 * Multiply by K (J/m^3) for SI. Cost O(1).
 * @example anisotropyTensor(new Float64Array(9), plainSystem("antiferro"), 1, 1) // [0,0,-1, 0,0,0, -1,0,-1]
 */
export function anisotropyTensor(out: Float64Array, system: ReducedSystem, kappa: number, tau: number): Float64Array {
  const q = system.q;
  for (let i = 0; i < 9; ++i) out[i] = q[i];
  out[0] -= tau * tau;
  out[2] -= tau * kappa;
  out[6] -= tau * kappa;
  out[8] -= kappa * kappa;
  return out;
}
