import { magnonGaps } from "./magnonGaps.js";
import type { GapProfile, ReducedSystem } from "./types.js";

/**
 * Local AFM magnon gap profile along a wire of slowly varying geometry: at each sample the helix
 * formulas of ../shared/PHYSICS.md section 6 with the local reduced kappa, tau: omega_-(0; s),
 * omega_+(0; s) and the local band bottom (minimum of the lower branch). valid = 0 where the local
 * picture does not hold: the geometry changes over a length L_var = min(kappa/|kappa'|,
 * |D|/|D'|) shorter than `factor` (default 5) times max(1, 1/kappa) (the wavelength scale and the
 * curvature radius, reduced), where the wire is nearly straight (kappa l < 0.05: frame undefined,
 * and helix formulas must not be used with large tau there), where torsion is undefined (NaN), or
 * where the homogeneous state is unstable (band bottom NaN). s in reduced units. Cost O(n).
 * @example gapProfile(sys, s, k, t).lower0[i] // sqrt(mu) at sample i
 */
export function gapProfile(system: ReducedSystem, s: Float64Array, kappa: ArrayLike<number>, tau: ArrayLike<number>, factor = 5): GapProfile {
  const n = s.length;
  const lower0 = new Float64Array(n), upper0 = new Float64Array(n), bandBottom = new Float64Array(n), valid = new Uint8Array(n);
  for (let i = 0; i < n; ++i) {
    const t = Number.isFinite(tau[i]) ? tau[i] : 0;
    const g = magnonGaps(system, kappa[i], t);
    lower0[i] = g.lower0;
    upper0[i] = g.upper0;
    bandBottom[i] = g.lowerMin;
    const a = Math.max(0, i - 1), b = Math.min(n - 1, i + 1);
    const dsab = s[b] - s[a];
    const dk = dsab > 0 ? Math.abs(kappa[b] - kappa[a]) / dsab : 0;
    const ta = Number.isFinite(tau[a]) ? tau[a] : 0, tb = Number.isFinite(tau[b]) ? tau[b] : 0;
    const dD = dsab > 0 ? Math.abs(Math.hypot(kappa[b], tb) - Math.hypot(kappa[a], ta)) / dsab : 0;
    const lVar = Math.min(dk > 0 ? kappa[i] / dk : Infinity, dD > 0 ? Math.hypot(kappa[i], t) / dD : Infinity);
    const scale = factor * Math.max(1, 1 / Math.max(kappa[i], 1e-12));
    valid[i] = Number.isFinite(tau[i]) && kappa[i] >= 0.05 && lVar >= scale && Number.isFinite(g.lowerMin) ? 1 : 0;
  }
  return { lower0, upper0, bandBottom, valid };
}
