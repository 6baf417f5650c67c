import { homogeneousModes } from "./homogeneousModes.js";
import type { HomogeneousModes, MagnonGaps, ReducedSystem } from "./types.js";

/**
 * AFM magnon dispersion about the homogeneous state of a helix (sigma model, L = |n_t|^2/2 - e/2):
 *   omega_+-^2(k) = k^2 + Kbar +- sqrt(delta^2 + 4 D0^2 k^2),  Kbar = (Ka + Kb)/2, delta = (Ka - Kb)/2,
 * k the wave number of the local-frame components (1/l), frequencies in omega_0 = c/l.
 * Source: ../shared/PHYSICS.md section 6 (own derivation). NaN for an imaginary frequency.
 * @example magnonDispersion(modes, 1) // { lower: 0.76746248, upper: 1.69927840 } at (0.5, 0.25)
 */
export function magnonDispersion(modes: HomogeneousModes, k: number): { lower: number; upper: number } {
  const kbar = 0.5 * (modes.ka + modes.kb), delta = 0.5 * (modes.ka - modes.kb);
  const root = Math.hypot(delta, 2 * modes.d0 * k);
  const lo2 = k * k + kbar - root, hi2 = k * k + kbar + root;
  return { lower: lo2 >= 0 ? Math.sqrt(lo2) : NaN, upper: hi2 >= 0 ? Math.sqrt(hi2) : NaN };
}

/**
 * Gaps and band minimum of the AFM magnons of a homogeneous helix stretch: omega_-(0) = sqrt(Kb),
 * omega_+(0) = sqrt(Ka); a minimum of the lower branch at k_min > 0 exists iff 2 D0^2 > delta, with
 * k_min^2 = D0^2 - delta^2/(4 D0^2), omega_min^2 = Kbar - D0^2 - delta^2/(4 D0^2), and the depth of
 * the negative group-velocity region Delta = omega_-(0) - omega_min.
 * Source: ../shared/PHYSICS.md section 6 (own derivation). Reduced units (omega_0 = c/l).
 * Degenerate input: an unstable state gives lowerMin = NaN, unstable = true. Cost O(1).
 * @example magnonGaps(plainSystem("antiferro"), 1, 1).depth // 1.13051997
 */
export function magnonGaps(system: ReducedSystem, kappa: number, tau: number): MagnonGaps {
  const m = homogeneousModes(system, kappa, tau);
  const kbar = 0.5 * (m.ka + m.kb), delta = 0.5 * (m.ka - m.kb);
  const lower0 = Math.sqrt(m.kb), upper0 = Math.sqrt(m.ka);
  const d2 = m.d0 * m.d0;
  if (!(2 * d2 > delta) || d2 === 0) {
    return { lower0, upper0, kMin: 0, lowerMin: lower0, depth: 0, unstable: false };
  }
  const q = (delta * delta) / (4 * d2);
  const kMin = Math.sqrt(d2 - q);
  const min2 = kbar - d2 - q;
  const lowerMin = min2 >= 0 ? Math.sqrt(min2) : NaN;
  return { lower0, upper0, kMin, lowerMin, depth: lower0 - lowerMin, unstable: min2 < 0 };
}

/**
 * Magnon levels of a closed AFM ring of reduced curvature kappa in the state n = B: k = j kappa,
 *   omega_j^2 = kappa^2 (j^2 + 1) + 1/2 -+ sqrt(1/4 + 4 kappa^4 j^2)
 * (lower: transversal, upper: longitudinal; j != 0 doubly degenerate), for j = 0..jMax.
 * Source: ../shared/PHYSICS.md section 6 (own derivation). Reduced frequencies.
 * @example ringLevels(1, 1)[1].lower // 0.66215345
 */
export function ringLevels(kappa: number, jMax: number): { j: number; lower: number; upper: number }[] {
  const out: { j: number; lower: number; upper: number }[] = [];
  const k2 = kappa * kappa;
  for (let j = 0; j <= jMax; ++j) {
    const root = Math.sqrt(0.25 + 4 * k2 * k2 * j * j);
    const base = k2 * (j * j + 1) + 0.5;
    out.push({ j, lower: Math.sqrt(Math.max(0, base - root)), upper: Math.sqrt(base + root) });
  }
  return out;
}
