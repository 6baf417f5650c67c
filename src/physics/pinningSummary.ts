import type { LandscapeWell, WallLandscape } from "./pinning.js";
import { pinningSites, wallEnergyWith } from "./pinning.js";
import { MU0, validityLines } from "./sampleValidity.js";
import type { PinningSite } from "./types.js";

/** Inputs of `pinningSummary` (reduced lengths and energies unless stated). */
export interface PinningSummaryInput {
  /** A landscape computed with keepWalls. */
  readonly scan: WallLandscape;
  /** Bond lengths of the wire chain and the material tensor. */
  readonly h: Float64Array;
  readonly q: Float64Array;
  /** Bootstrap replicates of kappa l, tau l, replicate-major (r * n + i); NaN entries take the central value. */
  readonly replicates: { readonly count: number; readonly kappa: Float64Array; readonly tau: Float64Array | null } | null;
  /**
   * The profile's bias-corrected geometry (kappa l + kappaBias l, tau l + tauBias l per sample;
   * Profile.kappaBias): the depth on it moves the interval's side toward it (the smoothing bias the
   * replicates, recentred on their median, do not carry). Absent or null: noise only.
   */
  readonly bias?: { readonly kappa: Float64Array; readonly tau: Float64Array | null } | null;
  readonly kappaReduced: ArrayLike<number>;
  readonly tauReduced: ArrayLike<number>;
  /** Sample positions s / l and the per-sample validity mask. */
  readonly sReduced: Float64Array;
  readonly validity: Uint8Array;
  /** Magnetic length (m), K l area (J, or null) and k_B T (J). */
  readonly l: number;
  readonly energyUnit: number | null;
  readonly kT: number;
  /** FM with K (J/m^3) and Ms (A/m) known: depinning fields; else null. */
  readonly depinning: { readonly anisotropy: number; readonly saturationMagnetisation: number } | null;
  /** Wall energies (reduced) at the given chain nodes (a well or top and its two sides, -1: NaN) on a reference chain with the same bond lengths but no pinning geometry
   *  (FM: straight; AFM: the constant curvature of the first index), whose landscape would be flat
   *  in the continuum: its variation is the discretisation artefact. Absent: not estimated. */
  readonly reference?: (nodes: readonly number[]) => Float64Array;
  /**
   * 1 at the samples of stretches labelled periodic (at least half a period long). A site or barrier whose relaxation windows reach
   * into one is listed apart as indicative only: its depth depends on the relaxed periodic texture
   * (its phase and where the stretch ends), which the interval does not carry. Absent: none.
   */
  readonly periodic?: Uint8Array;
}

/** Largest bond length (reduced) at which a wall of width l counts as resolved by the chain: the
 *  wall energy of a straight uniform chain is 3.957 at h = 0.5 l against 4 in the continuum (1%;
 *  measured with this code), 5.78 at h = 5 l. Common practice: cells finer than the exchange length. */
export const WALL_RESOLUTION = 0.5;

/** Quantile of sorted values (linear interpolation between order statistics; common practice). */
function quantile(sorted: Float64Array, p: number): number {
  const x = p * (sorted.length - 1);
  const i = Math.floor(x), f = x - i;
  return i + 1 < sorted.length ? sorted[i] * (1 - f) + sorted[i + 1] * f : sorted[i];
}

/**
 * The largest rise of u(q) from index k toward index stop (exclusive of nothing: every step between
 * them), as a slope max (u[j+1] - u[j]) / (q[j+1] - q[j]) for a step direction +1, and the mirrored
 * form for -1. Reduced units. The grid spacing limits it: a coarse grid underestimates the steepest
 * slope (the landscape is sampled more finely near its extremes than on its flanks).
 */
function maxRise(q: Float64Array, u: Float64Array, k: number, stop: number, dir: 1 | -1): number {
  let best = 0;
  for (let j = k; dir > 0 ? j < stop : j > stop; j += dir) {
    const a = u[j], b = u[j + dir];
    if (!Number.isFinite(a) || !Number.isFinite(b)) break;
    best = Math.max(best, (b - a) / Math.abs(q[j + dir] - q[j]));
  }
  return best;
}

/**
 * Depinning field of an FM wall held in a well of U(q) (reduced, units of K l S over units of l):
 * a field H along the wire lowers the Zeeman energy of a head-to-head wall by 2 mu0 Ms S H per unit
 * of displacement, so the wall leaves over a side when 2 mu0 Ms S H exceeds the largest slope of U
 * on that side: H = max |dU/dq| / (2 mu0 Ms S) = max slope (reduced) x K / (2 mu0 Ms) (A/m; the
 * cross-section cancels). Common practice (the quasi-static depinning criterion of a rigid wall).
 * Returns both sides and the smaller; fieldTesla = mu0 H. Cost O(width of the well).
 * @example depinningField(q, u, well, 5e5, 8e5).field // A/m
 */
export function depinningField(q: Float64Array, u: Float64Array, well: Pick<LandscapeWell, "k" | "kLeft" | "kRight">, anisotropy: number, saturationMagnetisation: number): NonNullable<PinningSite["depinning"]> {
  const scale = anisotropy / (2 * MU0 * saturationMagnetisation);
  const plus = well.kRight > well.k ? maxRise(q, u, well.k, well.kRight, 1) * scale : NaN;
  const minus = well.kLeft >= 0 && well.kLeft < well.k ? maxRise(q, u, well.k, well.kLeft, -1) * scale : NaN;
  const field = Math.min(Number.isFinite(plus) ? plus : Infinity, Number.isFinite(minus) ? minus : Infinity);
  return { towardPlus: plus, towardMinus: minus, field: Number.isFinite(field) ? field : NaN, fieldTesla: Number.isFinite(field) ? MU0 * field : NaN };
}

/**
 * Pinning sites and barriers of a wall landscape with what an experiment needs
 * (../shared/PHYSICS.md section 5): positions and depths (reduced, J, k_B T); a 95% interval of each
 * depth from the bootstrap replicates of kappa(s), tau(s) (the wall and background textures of the
 * extremes are held fixed and the window energies recomputed on each replicate's geometry: the
 * first-order response, `wallEnergyWith`; the 2.5% and 97.5% quantiles of the central depth shifted
 * by each replicate's change), widened on both sides by the discretisation error (the same depth on
 * `reference`, a chain with the same spacings whose continuum landscape is flat); relevance (a
 * chain spacing within WALL_RESOLUTION l in the windows, depth above twice the discretisation
 * error, interval above 0 and depth at least 1 k_B T, else listed apart as thermally irrelevant:
 * a straight wire never has a relevant site); the failing validity checks within l/2 of the place; and, for an
 * FM wire with K and Ms, the depinning fields. Cost: replicates x (sites + barriers) x 3 window
 * energies.
 */
export function pinningSummary(input: PinningSummaryInput): { sites: PinningSite[]; minor: PinningSite[]; barriers: PinningSite[] } {
  const { scan, l, energyUnit, kT } = input;
  const n = input.sReduced.length;
  const neg = Float64Array.from(scan.energy, (x) => -x);
  const wells = pinningSites(scan.q, scan.energy);
  const tops = pinningSites(scan.q, neg);
  /** Numerical error of a depth: the largest |U_ref(side) - U_ref(k)| on the reference chain, the
   *  discretisation artefact of the same grid points (0 when not estimated). */
  const numericalError = (w: LandscapeWell): number => {
    if (input.reference === undefined) return 0;
    const u = input.reference([w.k, w.kLeft, w.kRight].map((k) => (k >= 0 ? scan.index[k] : -1)));
    let err = 0;
    for (const j of [1, 2]) {
      if ((j === 1 ? w.kLeft : w.kRight) < 0) continue;
      const d = Math.abs(u[j] - u[0]);
      err = Math.max(err, Number.isFinite(d) ? d : Infinity);
    }
    return err;
  };
  /** Largest bond (reduced) of the relaxation windows behind a depth. */
  const coarsestBond = (w: LandscapeWell): number => {
    let hMax = 0;
    for (const k of [w.k, w.kLeft, w.kRight]) {
      const wall = k >= 0 && scan.walls !== null ? scan.walls[k] : null;
      if (wall === null) continue;
      for (let a = 0; a + 1 < wall.nodes.length; ++a) hMax = Math.max(hMax, input.h[wall.nodes[a]]);
    }
    return hMax;
  };
  /** Whether the relaxation windows behind a depth hold a sample of a periodic stretch. */
  const reachesPeriodic = (w: LandscapeWell): boolean => {
    const mask = input.periodic;
    if (mask === undefined || scan.walls === null) return false;
    for (const k of [w.k, w.kLeft, w.kRight]) {
      const wall = k >= 0 ? scan.walls[k] : null;
      if (wall === null) continue;
      for (const i of wall.nodes) if (mask[i] === 1) return true;
    }
    return false;
  };
  // replicate energies at the grid points the depths use (memoised per grid index)
  const R = input.replicates?.count ?? 0;
  const repK = new Float64Array(n), repT = new Float64Array(n);
  const memo = new Map<number, Float64Array>();
  const energiesAt = (k: number): Float64Array | null => {
    if (R === 0 || scan.walls === null || k < 0) return null;
    const wall = scan.walls[k];
    if (wall === null) return null;
    let e = memo.get(k);
    if (e !== undefined) return e;
    e = new Float64Array(R);
    const rep = input.replicates!;
    const central = wallEnergyWith(wall, input.h, input.q, input.kappaReduced, Float64Array.from(input.tauReduced, (t) => (Number.isFinite(t) ? t : 0)));
    for (let r = 0; r < R; ++r) {
      for (const i of wall.nodes) {
        const kv = rep.kappa[r * n + i];
        repK[i] = Number.isFinite(kv) ? kv : input.kappaReduced[i];
        const tv = rep.tau?.[r * n + i];
        repT[i] = tv !== undefined && Number.isFinite(tv) ? tv : Number.isFinite(input.tauReduced[i]) ? input.tauReduced[i] : 0;
      }
      // the change of U on replicate r (the per-node field and tensor terms do not depend on the geometry and cancel)
      e[r] = wallEnergyWith(wall, input.h, input.q, repK, repT) - central;
    }
    memo.set(k, e);
    return e;
  };
  // the change of the window energies on the bias-corrected geometry (memoised per grid index)
  const biasMemo = new Map<number, number>();
  const biasAt = (k: number): number | null => {
    const b = input.bias;
    if (b === undefined || b === null || scan.walls === null || k < 0) return null;
    const wall = scan.walls[k];
    if (wall === null) return null;
    const seen = biasMemo.get(k);
    if (seen !== undefined) return seen;
    const tauOf = (i: number) => (Number.isFinite(input.tauReduced[i]) ? input.tauReduced[i] : 0);
    for (const i of wall.nodes) {
      repK[i] = Number.isFinite(b.kappa[i]) ? b.kappa[i] : input.kappaReduced[i];
      const tv = b.tau?.[i];
      repT[i] = tv !== undefined && Number.isFinite(tv) ? tv : tauOf(i);
    }
    const central = wallEnergyWith(wall, input.h, input.q, input.kappaReduced, Float64Array.from(input.tauReduced, (t) => (Number.isFinite(t) ? t : 0)));
    const e = wallEnergyWith(wall, input.h, input.q, repK, repT) - central;
    biasMemo.set(k, e);
    return e;
  };
  const describe = (w: LandscapeWell, kind: "site" | "barrier"): PinningSite => {
    const sign = kind === "site" ? 1 : -1;
    const u = kind === "site" ? scan.energy : neg;
    const depthJ = energyUnit !== null ? w.depth * energyUnit : null;
    const toKT = (d: number | null): number | null => (d !== null && energyUnit !== null ? (d * energyUnit) / kT : null);
    let lo: number | null = null, hi: number | null = null;
    const ek = energiesAt(w.k), eL = energiesAt(w.kLeft), eR = energiesAt(w.kRight);
    if (ek !== null && (eL !== null || eR !== null)) {
      const gridDepth = Math.min(w.kLeft >= 0 ? u[w.kLeft] : Infinity, w.kRight >= 0 ? u[w.kRight] : Infinity) - u[w.k];
      const d = new Float64Array(R);
      for (let r = 0; r < R; ++r) {
        const left = eL !== null ? u[w.kLeft] + sign * eL[r] : Infinity, right = eR !== null ? u[w.kRight] + sign * eR[r] : Infinity;
        d[r] = w.depth + (Math.min(left, right) - (u[w.k] + sign * ek[r]) - gridDepth);
      }
      d.sort();
      lo = quantile(d, 0.025);
      hi = quantile(d, 0.975);
      // the smoothing bias: the interval reaches to the depth on the bias-corrected geometry
      const bk = biasAt(w.k), bL = biasAt(w.kLeft), bR = biasAt(w.kRight);
      if (bk !== null && (bL !== null || bR !== null)) {
        const left = bL !== null ? u[w.kLeft] + sign * bL : Infinity, right = bR !== null ? u[w.kRight] + sign * bR : Infinity;
        const shift = Math.min(left, right) - (u[w.k] + sign * bk) - gridDepth;
        if (Number.isFinite(shift)) {
          lo += Math.min(0, shift);
          hi += Math.max(0, shift);
        }
      }
    }
    // the interval carries the discretisation error too (widened by it on both sides)
    const err = numericalError(w);
    if (lo !== null && hi !== null) { lo -= err; hi += err; }
    const depthKT = toKT(w.depth);
    const reasons: string[] = [];
    const hMax = coarsestBond(w);
    if (hMax > WALL_RESOLUTION) reasons.push(`chain spacing up to ${hMax.toPrecision(3)} magnetic lengths there (> ${WALL_RESOLUTION}): the wall is not resolved, the depth is a discretisation artefact`);
    else if (!(w.depth > 2 * err)) reasons.push(`depth within twice its discretisation error (${err.toPrecision(2)} reduced, the same landscape on the chain without the geometry)`);
    if (lo !== null && lo <= 0) reasons.push("the 95% interval of the depth includes 0");
    if (depthKT !== null && depthKT < 1) reasons.push(`depth ${depthKT.toPrecision(2)} k_B T, below 1 k_B T`);
    const indicative = reachesPeriodic(w) ? `indicative only: its relaxation windows reach into a stretch with a periodic ground state, where the depth depends on the relaxed periodic texture (its phase and the stretch ends), which the interval does not carry` : null;
    // validity flags within l/2 of the place
    let i0 = 0;
    while (i0 < n && input.sReduced[i0] < w.q - 0.5) i0++;
    let i1 = i0;
    while (i1 < n && input.sReduced[i1] <= w.q + 0.5) i1++;
    return {
      kind,
      s: w.q * l,
      depthJ,
      depthKT,
      depthReduced: w.depth,
      depthReducedLo: lo,
      depthReducedHi: hi,
      depthKTLo: toKT(lo),
      depthKTHi: toKT(hi),
      relevant: reasons.length === 0 && indicative === null,
      note: reasons.length > 0 || indicative !== null ? [...(reasons.length > 0 ? [`thermally irrelevant: ${reasons.join("; ")}`] : []), ...(indicative !== null ? [indicative] : [])].join("; ") : null,
      flags: validityLines(input.validity, Math.max(0, i0 - 1), Math.max(i1, i0 + 1)),
      depinning: kind === "site" && input.depinning !== null ? depinningField(scan.q, scan.energy, w, input.depinning.anisotropy, input.depinning.saturationMagnetisation) : null,
    };
  };
  const all = wells.map((w) => describe(w, "site"));
  return {
    sites: all.filter((x) => x.relevant),
    minor: all.filter((x) => !x.relevant),
    barriers: tops.map((w) => describe(w, "barrier")),
  };
}
