import { periodicState, type PeriodicOptions } from "./periodicState.js";
import type { ReducedSystem } from "./types.js";

/**
 * Reduced curvature kappa_c(tau) where the best periodic texture and the homogeneous state of an
 * infinite constant-(kappa, tau) stretch have equal energy: AFM periodic below kappa_c, FM periodic
 * above. Method: bisection on the sign of the periodic margin of `periodicState`
 * (../shared/PHYSICS.md section 4, own algorithm), bracket [kLo, kHi] (default [0.005, 3 + 2|tau|]),
 * to a relative width `relTol` (default 2e-3). Reduced units.
 * Degenerate input: if the sign does not change over the bracket, returns NaN.
 * Cost: ~log2(range/relTol) periodic searches (seconds).
 * @example phaseBoundary(plainSystem("antiferro"), 1) // ~1.36
 */
export function phaseBoundary(
  system: ReducedSystem,
  tau: number,
  options: PeriodicOptions & { readonly kLo?: number; readonly kHi?: number; readonly relTol?: number } = {},
): number {
  let lo = options.kLo ?? 0.005, hi = options.kHi ?? 3 + 2 * Math.abs(tau);
  const relTol = options.relTol ?? 2e-3;
  const periodic = (k: number): boolean => periodicState(system, k, tau, options).margin < 0;
  const pLo = periodic(lo), pHi = periodic(hi);
  if (pLo === pHi) return NaN;
  while (hi - lo > relTol * 0.5 * (hi + lo)) {
    const mid = Math.sqrt(lo * hi);
    if (periodic(mid) === pLo) lo = mid;
    else hi = mid;
  }
  return Math.sqrt(lo * hi);
}
