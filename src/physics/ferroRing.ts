import { ellipticKE } from "./elliptic.js";

/**
 * Energies of the two ring states of a closed FM wire of reduced curvature kappa (radius 1/kappa
 * in units of l), per unit length, reduced (units of K): the vortex m = T, e = kappa^2 - 1, and the
 * "onion" state (two head-to-head walls, the in-plane angle winds by -2 pi): a pendulum orbit,
 *   e = -1 - kappa^2 + (kappa/pi) W(pi/kappa),  W(d) = 4 sqrt(1+C) E(m) - C d,
 *   d = 2 K(m) / sqrt(1+C),  m = 1/(1+C),
 * with C > 0 solved from d(C) = pi/kappa (bisection on ln C).
 * Method: own derivation (../shared/PHYSICS.md section 3), energy e = (theta' + kappa)^2 - cos^2 theta.
 * Degenerate input: kappa <= 0 gives NaN for the onion. Cost ~200 elliptic evaluations.
 * @example ferroRingEnergies(1) // { vortex: 0, onion: -0.530895, c: ... }
 */
export function ferroRingEnergies(kappa: number): { vortex: number; onion: number; c: number } {
  const vortex = kappa * kappa - 1;
  if (!(kappa > 0) || !Number.isFinite(kappa)) return { vortex, onion: NaN, c: NaN };
  const target = Math.PI / kappa;
  const halfPeriod = (lnC: number): number => {
    const c = Math.exp(lnC);
    const { k } = ellipticKE(1 / (1 + c), c / (1 + c));
    return (2 * k) / Math.sqrt(1 + c);
  };
  // d(C) decreases monotonically from infinity (C -> 0) to pi/sqrt(C) (C -> infinity)
  let lo = -700, hi = 2 * Math.log(Math.PI / target) + 10;
  for (let it = 0; it < 200 && hi - lo > 1e-14; ++it) {
    const mid = 0.5 * (lo + hi);
    if (halfPeriod(mid) > target) lo = mid;
    else hi = mid;
  }
  const c = Math.exp(0.5 * (lo + hi));
  const { e } = ellipticKE(1 / (1 + c), c / (1 + c));
  const w = 4 * Math.sqrt(1 + c) * e - c * target;
  return { vortex, onion: -1 - kappa * kappa + (kappa / Math.PI) * w, c };
}

/**
 * Reduced curvature where the FM ring ground state switches from vortex to onion (first order):
 * the root of onion(kappa) = vortex(kappa), found by bisection on [0.3, 0.99].
 * Own derivation (../shared/PHYSICS.md section 3). Cost ~60 ring evaluations.
 * @example ferroRingSwitch() // 0.65689717
 */
export function ferroRingSwitch(): number {
  let lo = 0.3, hi = 0.99;
  const f = (k: number): number => {
    const r = ferroRingEnergies(k);
    return r.onion - r.vortex;
  };
  for (let it = 0; it < 60; ++it) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}
