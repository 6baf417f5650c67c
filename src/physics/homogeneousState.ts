import { anisotropyTensor } from "./anisotropyTensor.js";
import { symEigen3 } from "./linalg.js";
import type { HomogeneousState, ReducedSystem } from "./types.js";

/**
 * Homogeneous state of a stretch with constant reduced curvature and torsion, for any material
 * tensor: the eigenvector of the lowest eigenvalue of the total anisotropy tensor Qtot (the local
 * components are constant, so the exchange of the components vanishes and the DMI term is zero),
 * energy e0 = kappa^2 + tau^2 + lambda_min (reduced, K).
 * Sign convention: FM u . T >= 0 and tilt = atan2(u_B, u_T) (from T toward B); AFM u . B >= 0 and
 * tilt = atan2(u_T, u_B) (from B toward T). Without an intrinsic term this equals the closed forms
 * tiltFerro / tiltAntiferro (../shared/PHYSICS.md section 3). Degenerate eigenvalues (straight
 * wire) give one of the degenerate axes. Cost: one 3x3 Jacobi eigen-solve.
 * @example homogeneousState(plainSystem("antiferro"), 2, 1).tilt * 180 / Math.PI // 22.5
 */
export function homogeneousState(system: ReducedSystem, kappa: number, tau: number): HomogeneousState {
  const t = Number.isFinite(tau) ? tau : 0;
  const qt = anisotropyTensor(new Float64Array(9), system, kappa, t);
  const { values, vectors } = symEigen3(qt);
  const u = vectors.slice(0, 3);
  const ferro = system.order === "ferro";
  // choose the sign of the (sign-free) eigenvector by the convention of the tilt
  const ref = ferro ? u[0] : u[2];
  const alt = ferro ? u[2] : u[0];
  if (ref < 0 || (ref === 0 && alt < 0)) for (let i = 0; i < 3; ++i) u[i] = -u[i];
  const tilt = ferro ? Math.atan2(u[2], u[0]) : Math.atan2(u[0], u[2]);
  return { u, tilt, energy: kappa * kappa + t * t + values[0], eigenvalues: values, axes: vectors };
}
