import { ferroRingEnergies } from "./ferroRing.js";
import { homogeneousModes } from "./homogeneousModes.js";
import { chainEnergy, uniformChain } from "./chain.js";
import { discreteE0, periodicState, type PeriodicOptions, type PeriodicResult } from "./periodicState.js";
import type { GroundState, ReducedSystem, Stability } from "./types.js";

/** What decides the ground state of a stretch. */
export type StretchContext = "straight" | "arc" | "ring" | "helix";

/** Ground state and stability of one (kappa, tau) point, reduced units. */
export interface PointLabels {
  readonly state: GroundState;
  readonly stability: Stability;
  readonly periodic: PeriodicResult | null;
}

/**
 * Ground state of a constant-parameter stretch at reduced (kappa, tau).
 * straight: homogeneous (no geometric term). AFM arc: homogeneous, n = B is the exact ground state
 * of any planar curve (../shared/PHYSICS.md section 3). FM closed ring: vortex (homogeneous) or
 * onion (reported as periodic: two walls) by `ferroRingEnergies`. Otherwise the periodic search of
 * `periodicState` (arcs with tau = 0). Cost: O(1) or one periodic search.
 */
export function groundStatePeriodic(system: ReducedSystem, context: StretchContext, kappa: number, tau: number, options: PeriodicOptions = {}): { periodic: boolean; result: PeriodicResult | null } {
  if (context === "straight" || kappa <= 0) return { periodic: false, result: null };
  if (context === "ring" && system.order === "ferro") {
    const r = ferroRingEnergies(kappa);
    return { periodic: r.onion < r.vortex, result: null };
  }
  if ((context === "arc" || context === "ring") && system.order === "antiferro") return { periodic: false, result: null };
  const t = context === "helix" ? tau : 0;
  const result = periodicState(system, kappa, t, options);
  return { periodic: result.margin < 0, result };
}

/**
 * The two labels of a stretch: ground state (homogeneous | periodic) and the stability of the
 * homogeneous state: unstable when the linear criterion 2|D.mu0| > sqrt(Ka) + sqrt(Kb) holds
 * (`homogeneousModes`), metastable when linearly stable but the periodic state wins, else stable.
 * ../shared/PHYSICS.md section 4. Reduced units.
 * @example stretchLabels(plainSystem("antiferro"), "helix", 1, 1).stability // "metastable"
 */
export function stretchLabels(system: ReducedSystem, context: StretchContext, kappa: number, tau: number, options: PeriodicOptions = {}): PointLabels {
  const t = context === "helix" ? tau : 0;
  const g = groundStatePeriodic(system, context, kappa, t, options);
  const unstable = context !== "straight" && homogeneousModes(system, kappa, t).unstable;
  const stability: Stability = unstable ? "unstable" : g.periodic ? "metastable" : "stable";
  return { state: g.periodic ? "periodic" : "homogeneous", stability, periodic: g.result };
}

/**
 * Label probabilities of a stretch from replicate (kappa, tau) means (bootstrap replicates or
 * seeded draws within the bands), reduced units. Stability is evaluated per replicate (closed
 * form). The ground state is evaluated at the corners of the replicate box; when they agree every
 * replicate gets that label, otherwise the boundary kappa_c is located by bisection at the lowest,
 * middle and highest replicate tau and each replicate is labelled by the linearly interpolated
 * kappa_c(tau) (AFM periodic below, FM above). uncertain: the box straddles a line (the corners
 * disagree or any probability lies in (0.025, 0.975)).
 * With `centre` (the periodic search already done at a point of the box, e.g. by `stretchLabels`),
 * the four corner searches are skipped when `decisiveCorners` finds the centre's margin far from 0
 * compared with its change across the box; every corner then gets the centre's label.
 * Cost: 4 periodic searches (none when the centre decides), plus ~3 x 8 when the box straddles
 * the phase boundary.
 */
export function stretchProbabilities(
  system: ReducedSystem,
  context: StretchContext,
  kappas: Float64Array,
  taus: Float64Array,
  options: PeriodicOptions = {},
  centre: { readonly kappa: number; readonly tau: number; readonly result: PeriodicResult } | null = null,
): { homogeneous: number; periodic: number; stable: number; metastable: number; unstable: number; uncertain: boolean } {
  const m = kappas.length;
  if (m === 0) return { homogeneous: NaN, periodic: NaN, stable: NaN, metastable: NaN, unstable: NaN, uncertain: false };
  const tt = (i: number) => (context === "helix" && Number.isFinite(taus[i]) ? taus[i] : 0);
  let kMin = Infinity, kMax = -Infinity, tMin = Infinity, tMax = -Infinity;
  for (let i = 0; i < m; ++i) {
    kMin = Math.min(kMin, kappas[i]); kMax = Math.max(kMax, kappas[i]);
    tMin = Math.min(tMin, tt(i)); tMax = Math.max(tMax, tt(i));
  }
  const periodicAt = (k: number, t: number) => groundStatePeriodic(system, context, Math.max(k, 0), t, options).periodic;
  const box: [number, number][] = [[kMin, tMin], [kMin, tMax], [kMax, tMin], [kMax, tMax]];
  // only where groundStatePeriodic runs the periodic search (helix, FM arc)
  const searched = context === "helix" || (context === "arc" && system.order === "ferro");
  const decided = centre !== null && searched && kMin > 0 ? decisiveCorners(system, centre.kappa, context === "helix" ? centre.tau : 0, centre.result, box) : null;
  const corners = decided !== null ? box.map(() => decided) : box.map(([k, t]) => periodicAt(k, t));
  const agree = corners.every((c) => c === corners[0]);
  const isPeriodic = new Uint8Array(m);
  if (agree) isPeriodic.fill(corners[0] ? 1 : 0);
  else if (context !== "helix") {
    // one-parameter family (tau = 0 or a ring): label each replicate directly by bisection point
    const ferro = system.order === "ferro";
    const kc = boundaryAlongKappa(periodicAt, kMin, kMax, 0, ferro);
    for (let i = 0; i < m; ++i) isPeriodic[i] = (ferro ? kappas[i] > kc : kappas[i] < kc) ? 1 : 0;
  } else {
    const tNodes = tMax > tMin ? [tMin, 0.5 * (tMin + tMax), tMax] : [tMin];
    const ferro = system.order === "ferro";
    const kcs = tNodes.map((t) => boundaryAlongKappa(periodicAt, kMin, kMax, t, ferro));
    for (let i = 0; i < m; ++i) {
      const t = tt(i);
      let kc = kcs[0];
      if (tNodes.length === 3) {
        const j = t <= tNodes[1] ? 0 : 1;
        const f = (t - tNodes[j]) / (tNodes[j + 1] - tNodes[j]);
        kc = Number.isFinite(kcs[j]) && Number.isFinite(kcs[j + 1]) ? kcs[j] + f * (kcs[j + 1] - kcs[j]) : f < 0.5 ? kcs[j] : kcs[j + 1];
      }
      isPeriodic[i] = (ferro ? kappas[i] > kc : kappas[i] < kc) ? 1 : 0;
    }
  }
  let nP = 0, nStable = 0, nMeta = 0, nUnst = 0;
  for (let i = 0; i < m; ++i) {
    const unstable = context !== "straight" && homogeneousModes(system, kappas[i], tt(i)).unstable;
    if (isPeriodic[i]) nP++;
    if (unstable) nUnst++;
    else if (isPeriodic[i]) nMeta++;
    else nStable++;
  }
  const p = { homogeneous: (m - nP) / m, periodic: nP / m, stable: nStable / m, metastable: nMeta / m, unstable: nUnst / m };
  const mid = (x: number) => x > 0.025 && x < 0.975;
  return { ...p, uncertain: !agree || mid(p.periodic) || mid(p.unstable) || mid(p.metastable) };
}

/**
 * kappa where periodicAt changes along [kLo, kHi] at fixed tau (bisection, 8 steps); when it does
 * not change, +-Infinity on the side that labels everything as at the ends.
 */
function boundaryAlongKappa(periodicAt: (k: number, t: number) => boolean, kLo: number, kHi: number, tau: number, ferro: boolean): number {
  const a = periodicAt(kLo, tau), b = periodicAt(kHi, tau);
  // AFM: periodic below kappa_c; FM: periodic above
  if (a === b) return a === ferro ? -Infinity : Infinity;
  let lo = kLo, hi = kHi;
  for (let it = 0; it < 8; ++it) {
    const mid = 0.5 * (lo + hi);
    if (periodicAt(mid, tau) === a) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * The label every corner of a (kappa, tau) box would get from its own periodic search, decided from
 * the search at a centre point instead, or null when the centre cannot decide. The centre's best
 * cell texture u (half-period p, spacing h) is evaluated unrelaxed on the uniform chain of each
 * corner: U_c = E_c(u)/p - e0_h(c) is an upper bound of the corner's discrete margin at that period
 * (variational: u is an admissible antiperiodic cell there), and U_c - U_0 is the first-order change
 * of the margin across the box (Hellmann-Feynman: the relaxation of u enters at second order).
 * Periodic (centre margin < 0): decided when every U_c stays below -2 |correction| (the Richardson
 * correction of the centre: the corner surely has a cell with a clearly negative margin).
 * Homogeneous (margin > 0): decided when the margin exceeds 10 max |U_c - U_0| plus twice the
 * Richardson correction, a safety factor for the second-order relaxation and for other branches of
 * cells. Own criterion; test/physics/probabilities.test.ts checks it against the full corner
 * searches (common practice: a certified shortcut validated against the exact path). Reduced
 * units. Cost: 5 energy evaluations of one cell (no relaxation).
 */
export function decisiveCorners(system: ReducedSystem, kappa: number, tau: number, result: PeriodicResult, corners: readonly (readonly [number, number])[]): boolean | null {
  const m = result.texture.length / 3, p = result.period, h = result.spacing;
  if (!(m >= 3) || !(p > 0) || !(h > 0) || !Number.isFinite(result.margin)) return null;
  const frozen = (k: number, t: number): number => chainEnergy(uniformChain(m, k, t, h, system.q, "antiperiodic"), result.texture, null) / p - discreteE0(system, k, t, h);
  const u0 = frozen(kappa, tau);
  const correction = Math.abs(result.margin - result.marginAtSpacing);
  if (result.margin < 0) {
    for (const [k, t] of corners) if (!(frozen(k, t) + 2 * correction < 0)) return null;
    return true;
  }
  let change = 0;
  for (const [k, t] of corners) change = Math.max(change, Math.abs(frozen(k, t) - u0));
  return result.margin > 10 * change + 2 * correction ? false : null;
}
