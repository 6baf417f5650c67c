import { uniformChain } from "./chain.js";
import { homogeneousState } from "./homogeneousState.js";
import { bondRotation, symEigen3 } from "./linalg.js";
import { relaxChain } from "./relaxChain.js";
import type { ReducedSystem } from "./types.js";

/** Options of the periodic-state search; lengths reduced (units of l). */
export interface PeriodicOptions {
  /** Largest node spacing (default 0.2, as ../shared/PHYSICS.md section 4 asks). */
  readonly hMax?: number;
  /** Period bracket (default 1.5 to 200). */
  readonly pMin?: number;
  readonly pMax?: number;
  /** Periods on the logarithmic scan (default 12). */
  readonly scan?: number;
  /** Golden-section refinements around the best scanned period (default 8). */
  readonly refine?: number;
  /** Re-relax the best cell at half the spacing and extrapolate the margin to h -> 0
   *  (Richardson, O(h^2) error; default true). */
  readonly extrapolate?: boolean;
}

/** Result of the periodic-state search (reduced units). */
export interface PeriodicResult {
  /** Best periodic energy density found, corrected for the discretisation (e0 + discrete margin). */
  readonly energy: number;
  /** Homogeneous energy density (continuum closed form or eigen-solve). */
  readonly e0: number;
  /** energy - e0 (negative: the periodic state wins). */
  readonly margin: number;
  /** The margin at the search spacing, before the extrapolation (equal to margin without it). */
  readonly marginAtSpacing: number;
  /** Node spacing of the search (reduced). */
  readonly spacing: number;
  /** Half-period p of the best texture: the length holding one half-turn of the vector, over which
   *  the energy repeats; the vector field itself repeats over 2p. */
  readonly period: number;
  /** The best period sits at pMax: a dilute kink lattice (continuous transition). */
  readonly atUpperBound: boolean;
  /** Best texture, local components, 3 per node, spacing period / nodes. */
  readonly texture: Float64Array;
}

/** Discrete homogeneous energy density at spacing h: lowest eigenvalue of (2I - R - R^T)/h^2 + Q. */
export function discreteE0(system: ReducedSystem, kappa: number, tau: number, h: number): number {
  const r = bondRotation(new Float64Array(9), kappa, tau, h);
  const m = new Float64Array(9);
  for (let i = 0; i < 3; ++i)
    for (let j = 0; j < 3; ++j) m[3 * i + j] = ((i === j ? 2 : 0) - r[3 * i + j] - r[3 * j + i]) / (h * h) + system.q[3 * i + j];
  return symEigen3(m).values[0];
}

/** Resample an antiperiodic cell texture onto m nodes (linear interpolation, then normalised by the relaxer). */
function resampleCell(src: Float64Array, m: number): Float64Array {
  const n = src.length / 3;
  const out = new Float64Array(3 * m);
  for (let i = 0; i < m; ++i) {
    const x = (i * n) / m;
    const k = Math.floor(x), f = x - k;
    const k1 = k + 1;
    for (let c = 0; c < 3; ++c) {
      const a = src[3 * k + c];
      const b = k1 < n ? src[3 * k1 + c] : -src[c];
      out[3 * i + c] = (1 - f) * a + f * b;
    }
  }
  return out;
}

/**
 * Best spatially periodic texture of an infinite stretch of constant reduced kappa, tau.
 * Method (../shared/PHYSICS.md section 4, own algorithm): one period p holds half a turn of the
 * vector (antiperiodic cell in local components, so n -> -n across the cell, allowed because the
 * energy is even in n); the exact chain energy of ./chain.ts is minimised by L-BFGS from eight
 * starts (local-frame spirals about T, N, B and the best planar-spiral axis, both senses), scanned over p on a logarithmic grid
 * (warm starts from the previous p), then refined by golden section in ln p around the best.
 * The discrete margin E_cell/p - e0_h (against the homogeneous energy of the same lattice) cancels
 * most of the O(h^2) error; the best cell is then relaxed again at h/2 and the margin extrapolated
 * to h -> 0 (Richardson); energy = e0 + margin. At (0.3, 0.8), h = 0.2: 0.027704 at h, 0.027057 at
 * h/2, extrapolated 0.026841 (PHYSICS.md: 0.02684, converged continuum value). Degenerate input: kappa = 0 (no easy axis set by
 * the geometry) still runs but its margin is >= 0. Cost: ~100 cell relaxations of p/h nodes
 * (tens of ms to a few s).
 * @example periodicState(plainSystem("antiferro"), 1, 1).energy // ~0.191 (e0 0.382)
 */
export function periodicState(
  system: ReducedSystem,
  kappa: number,
  tau: number,
  options: PeriodicOptions = {},
): PeriodicResult {
  const hMax = options.hMax ?? 0.2;
  const pMin = options.pMin ?? 1.5, pMax = options.pMax ?? 200;
  const nScan = options.scan ?? 12, nRefine = options.refine ?? 8;
  const hom = homogeneousState(system, kappa, tau);
  const e0 = hom.energy;
  const u0 = hom.u;
  const evalCell = (p: number, start: Float64Array | null, makeStart: ((m: number) => Float64Array) | null, nodes?: number) => {
    const m = nodes ?? Math.max(12, Math.ceil(p / hMax));
    const h = p / m;
    const chain = uniformChain(m, kappa, tau, h, system.q, "antiperiodic");
    const v = start !== null ? resampleCell(start, m) : makeStart!(m);
    const r = relaxChain(chain, v, { gradientTolerance: 1e-9 * h, maxIterations: 4000 });
    return { margin: r.energy / p - discreteE0(system, kappa, tau, h), v };
  };
  // start textures: half-turn spirals about a local axis a, in the plane (e1, e2 = a x e1).
  // Axes: T, N, B, and the normal a_sp of the best planar spiral. Own derivation: the uniform
  // spiral c = cos(ks) e1 + sin(ks) e2 about a has the mean energy density
  // k^2 + 2k D.a + |D|^2/2 + (D.a)^2/2 + tr(Q)/2 - a^T Q a/2, least at k = -D.a, where it is
  // |D|^2/2 + tr(Q)/2 - a^T (D D^T + Q) a/2: a is the top eigenvector of D D^T + Q and the
  // half-turn period is pi/|D.a| (for the plain AFM this is the closed-form spiral bound).
  const t0 = Number.isFinite(tau) ? tau : 0;
  const dq = Float64Array.from(system.q);
  dq[0] += t0 * t0;
  dq[2] += t0 * kappa;
  dq[6] += t0 * kappa;
  dq[8] += kappa * kappa;
  const top = symEigen3(dq).vectors;
  const aSp = [top[6], top[7], top[8]];
  const dA = Math.abs(t0 * aSp[0] + kappa * aSp[2]);
  const pSpiral = dA > 0 ? Math.PI / dA : Infinity;
  const axes = [[1, 0, 0], [0, 1, 0], [0, 0, 1], aSp];
  const starts: ((m: number) => Float64Array)[] = [];
  for (const a of axes) {
    // e1: the homogeneous state projected off a (or any perpendicular axis)
    const ua = u0[0] * a[0] + u0[1] * a[1] + u0[2] * a[2];
    let e1 = [u0[0] - ua * a[0], u0[1] - ua * a[1], u0[2] - ua * a[2]];
    let norm = Math.hypot(e1[0], e1[1], e1[2]);
    if (norm < 1e-6) {
      e1 = Math.abs(a[1]) < 0.9 ? [a[2], 0, -a[0]] : [1, 0, 0];
      norm = Math.hypot(e1[0], e1[1], e1[2]);
    }
    e1 = e1.map((x) => x / norm);
    const e2 = [a[1] * e1[2] - a[2] * e1[1], a[2] * e1[0] - a[0] * e1[2], a[0] * e1[1] - a[1] * e1[0]];
    for (const sense of [1, -1]) {
      starts.push((m: number) => {
        const v = new Float64Array(3 * m);
        for (let i = 0; i < m; ++i) {
          const phi = (sense * Math.PI * i) / m;
          const c = Math.cos(phi), s = Math.sin(phi);
          // a small tilt toward the axis breaks the symmetry of exactly planar starts
          for (let k = 0; k < 3; ++k) v[3 * i + k] = c * e1[k] + s * e2[k] + 0.01 * Math.sin((2 * Math.PI * i) / m) * a[k];
        }
        return v;
      });
    }
  }
  const lnMin = Math.log(pMin), lnMax = Math.log(pMax);
  const grid = Array.from({ length: nScan }, (_, i) => Math.exp(lnMin + ((lnMax - lnMin) * i) / (nScan - 1)));
  if (pSpiral > pMin && pSpiral < pMax) {
    grid.push(pSpiral);
    grid.sort((x, y) => x - y);
  }
  let best: { margin: number; p: number; v: Float64Array; index: number } = { margin: Infinity, p: pMax, v: new Float64Array(0), index: 0 };
  const tracks: (Float64Array | null)[] = starts.map(() => null);
  const trackMargin = new Float64Array(starts.length).fill(Infinity);
  grid.forEach((p, gi) => {
    const atSpiral = p === pSpiral;
    starts.forEach((mk, si) => {
      const spiralStart = si >= 6;
      // at the natural spiral period the spiral starts run cold (their own optimum)
      const cold = tracks[si] === null || (atSpiral && spiralStart);
      // drop tracks that have been clearly worse than the best for a while
      if (!cold && gi >= 3 && trackMargin[si] > best.margin + 0.05 * Math.abs(best.margin) + 0.02) return;
      const r = evalCell(p, cold ? null : tracks[si], cold ? mk : null);
      tracks[si] = r.v;
      trackMargin[si] = r.margin;
      if (r.margin < best.margin) best = { margin: r.margin, p, v: r.v, index: gi };
    });
  });
  // golden section on ln p around the best grid period
  let lo = Math.log(grid[Math.max(0, best.index - 1)]), hi = Math.log(grid[Math.min(grid.length - 1, best.index + 1)]);
  const gr = 0.5 * (Math.sqrt(5) - 1);
  let seed: Float64Array = best.v;
  const f = (lnp: number): number => {
    const r = evalCell(Math.exp(lnp), seed, null);
    if (r.margin < best.margin) {
      best = { margin: r.margin, p: Math.exp(lnp), v: r.v, index: best.index };
      seed = r.v;
    }
    return r.margin;
  };
  let x1 = hi - gr * (hi - lo), x2 = lo + gr * (hi - lo);
  let f1 = nRefine > 0 ? f(x1) : 0, f2 = nRefine > 0 ? f(x2) : 0;
  for (let it = 2; it < nRefine; ++it) {
    if (f1 < f2) {
      hi = x2; x2 = x1; f2 = f1; x1 = hi - gr * (hi - lo); f1 = f(x1);
    } else {
      lo = x1; x1 = x2; f1 = f2; x2 = lo + gr * (hi - lo); f2 = f(x2);
    }
  }
  // Richardson step: the discrete margin converges as O(h^2), so m(h/2) + (m(h/2) - m(h))/3 removes
  // the leading error (common practice; PHYSICS.md section 4 asks for two resolutions h, h/2)
  const mBest = Math.max(12, Math.ceil(best.p / hMax));
  let margin = best.margin;
  if (options.extrapolate ?? true) {
    const half = evalCell(best.p, best.v, null, 2 * mBest);
    margin = half.margin + (half.margin - best.margin) / 3;
  }
  return {
    energy: e0 + margin,
    e0,
    margin,
    marginAtSpacing: best.margin,
    spacing: best.p / mBest,
    period: best.p,
    atUpperBound: best.index === grid.length - 1 && best.p >= grid[grid.length - 2],
    texture: best.v,
  };
}
