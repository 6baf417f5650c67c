import { homogeneousState } from "./homogeneousState.js";
import type { HomogeneousModes, HomogeneousState, ReducedSystem } from "./types.js";

/**
 * Linear stability of the homogeneous state mu0 of a constant-(kappa, tau) stretch.
 * With lambda0 the eigenvalue of the total anisotropy tensor along mu0 and lambda1, lambda2 those
 * along the two transverse principal axes, the second variation for a fluctuation of wave number k
 * is [[k^2 + Ka, 2i D0 k], [-2i D0 k, k^2 + Kb]], Ka,b = lambda_(1,2) - lambda0, D0 = D . mu0, so the
 * state is unstable iff 2 |D0| > sqrt(Ka) + sqrt(Kb).
 * Source: ../shared/PHYSICS.md section 4 (own derivation). Reduced units. Cost O(1).
 * @example homogeneousModes(plainSystem("antiferro"), 0.5, 1).unstable // true
 */
export function homogeneousModes(
  system: ReducedSystem,
  kappa: number,
  tau: number,
  state: HomogeneousState = homogeneousState(system, kappa, tau),
): HomogeneousModes {
  const t = Number.isFinite(tau) ? tau : 0;
  const u = state.u;
  const d0 = t * u[0] + kappa * u[2];
  const ev = state.eigenvalues;
  const ka = Math.max(0, ev[2] - ev[0]);
  const kb = Math.max(0, ev[1] - ev[0]);
  const margin = Math.sqrt(ka) + Math.sqrt(kb) - 2 * Math.abs(d0);
  return { d0, ka, kb, unstable: margin < 0, margin };
}
