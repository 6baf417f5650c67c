/**
 * Closed forms for the homogeneous state of a stretch of constant reduced curvature kappa and
 * torsion tau (kappa*l, tau*l), FM wire and AFM chain, in the rectifying (T-B) plane.
 * Method and check values: ../shared/PHYSICS.md section 3. FM form published in Sheka, Kravchuk,
 * Gaididei, J. Phys. A 48, 125202 (2015); AFM form own derivation (project). Angles in radians.
 * Degenerate input: atan2(0, 0) = 0, so a straight wire gives 0. Cost O(1).
 */

/**
 * FM tilt psi from T toward B: psi = 1/2 atan2(2 kappa tau, 1 + tau^2 - kappa^2).
 * Positive for a right-handed helix (tau > 0), flips with handedness.
 * @example tiltFerro(1, 1) * 180 / Math.PI // 31.7175
 */
export function tiltFerro(kappa: number, tau: number): number {
  return 0.5 * Math.atan2(2 * kappa * tau, 1 + tau * tau - kappa * kappa);
}

/**
 * AFM tilt theta from B toward T: theta = 1/2 atan2(2 kappa tau, 1 + kappa^2 - tau^2).
 * @example tiltAntiferro(2, 1) * 180 / Math.PI // 22.5
 */
export function tiltAntiferro(kappa: number, tau: number): number {
  return 0.5 * Math.atan2(2 * kappa * tau, 1 + kappa * kappa - tau * tau);
}

/**
 * AFM homogeneous energy density e0 = kappa^2 + tau^2 - mu, with
 * W = sqrt((1 + kappa^2 - tau^2)^2 + 4 kappa^2 tau^2), mu = (kappa^2 + tau^2 - 1 + W) / 2 (reduced, K).
 * @example antiferroEnergy(1, 1) // 0.381966 (= 2 - golden ratio)
 */
export function antiferroEnergy(kappa: number, tau: number): number {
  const k2 = kappa * kappa, t2 = tau * tau;
  const w = Math.hypot(1 + k2 - t2, 2 * kappa * tau);
  return k2 + t2 - 0.5 * (k2 + t2 - 1 + w);
}

/**
 * FM homogeneous energy density e0 = (kappa^2 + tau^2 - 1 - W)/2, W = hypot(1 + tau^2 - kappa^2,
 * 2 kappa tau) (reduced, K; own derivation: lowest eigenvalue of -T T^T - D D^T plus |D|^2).
 * @example ferroEnergy(0.5, 0) // -0.75 (the ring vortex kappa^2 - 1)
 */
export function ferroEnergy(kappa: number, tau: number): number {
  const k2 = kappa * kappa, t2 = tau * tau;
  return 0.5 * (k2 + t2 - 1 - Math.hypot(1 + t2 - k2, 2 * kappa * tau));
}
