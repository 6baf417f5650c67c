import { ferroRingEnergies } from "./ferroRing.js";
import { ringLevels } from "./magnonGaps.js";
import type { MagneticOrder, RingModel, TextureState } from "./types.js";

/** Ring curvature where the FM ground state switches from vortex to onion (PHYSICS.md section 3). */
export const FERRO_RING_SWITCH = 0.65689717;

/**
 * Number of walls of a closed FM texture: sign changes of m . T (the local T component) around
 * the closed wire; 0 for the vortex, 2 for the onion. Samples with |m . T| < 1e-9 are skipped.
 * Cost O(n).
 * @example ringWalls(Float64Array.of(1, 0, 0, -1, 0, 0)) // 2
 */
export function ringWalls(local: Float64Array): number {
  const n = local.length / 3;
  let first = 0, prev = 0, count = 0;
  for (let i = 0; i < n; ++i) {
    const t = local[3 * i];
    if (Math.abs(t) < 1e-9) continue;
    const sg = Math.sign(t);
    if (first === 0) first = sg;
    else if (sg !== prev) count++;
    prev = sg;
  }
  if (first !== 0 && prev !== first) count++;
  return count;
}

/**
 * Ring state of a closed wire (../shared/PHYSICS.md sections 3 and 6). FM: vortex (no wall), onion
 * (two walls) or multidomain, counted on the relaxed texture of the whole wire, with the closed-form
 * energies of the circle of the same length, e_vortex = kappa^2 - 1 and the onion pendulum orbit
 * (`ferroRingEnergies`), and the closed-form label (switch at kappa l = 0.65690). AFM: binormal when
 * the relaxed n stays within 8 degrees of +-B all round (the exact ground state of any planar
 * curve), and the magnon levels of the circle of the same length (`ringLevels`, j = 0..jMax) when
 * the relative spread of kappa is below 25%. A caution when the spread exceeds 5% (the circle's
 * closed forms are then only indicative). Reduced inputs: kappa l per sample, length L / l.
 * Cost O(n) plus one ring evaluation.
 * @example ringState("ferro", k, 2 * Math.PI / 0.8, texture, "onion").closedForm.state // "onion"
 */
export function ringState(
  order: MagneticOrder,
  kappaReduced: ArrayLike<number>,
  lengthReduced: number,
  local: Float64Array,
  textureState: TextureState,
  jMax = 6,
): RingModel {
  let acc = 0, acc2 = 0, m = 0;
  for (let i = 0; i < kappaReduced.length; ++i) {
    const k = kappaReduced[i];
    if (!Number.isFinite(k)) continue;
    acc += k; acc2 += k * k; m++;
  }
  const mean = m > 0 ? acc / m : NaN;
  const spread = m > 0 && mean > 0 ? Math.sqrt(Math.max(0, acc2 / m - mean * mean)) / mean : NaN;
  const kc = (2 * Math.PI) / lengthReduced;
  const nearCircular = spread <= 0.05;
  const caution = nearCircular ? null : `the ring is far from a circle (curvature spread ${(100 * spread).toFixed(0)}% > 5%): the closed forms of the circle of the same length are indicative only`;
  if (order === "ferro") {
    const cf = ferroRingEnergies(kc);
    return {
      order, state: textureState, kappaCircleReduced: kc, kappaMeanReduced: mean, kappaSpread: spread, nearCircular,
      closedForm: { vortex: cf.vortex, onion: cf.onion, state: cf.onion < cf.vortex ? "onion" : "vortex" },
      levels: null, caution,
    };
  }
  let binormal = true;
  for (let i = 0; i < local.length / 3; ++i) if (Math.abs(local[3 * i + 2]) < Math.cos((8 * Math.PI) / 180)) { binormal = false; break; }
  return {
    order, state: binormal ? "binormal" : textureState, kappaCircleReduced: kc, kappaMeanReduced: mean, kappaSpread: spread, nearCircular,
    closedForm: null,
    levels: spread <= 0.25 ? ringLevels(kc, jMax) : null,
    caution: spread <= 0.25 ? caution : `the ring is far from a circle (curvature spread ${(100 * spread).toFixed(0)}% > 25%): no ring levels (the local gap profile applies where valid)`,
  };
}
