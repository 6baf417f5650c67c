import { chainEnergy, makeChain, normalise, type Chain } from "./chain.js";
import { bondRotation } from "./linalg.js";
import { relaxChain } from "./relaxChain.js";
import type { MagneticOrder } from "./types.js";

/** Options of the wall-pinning landscape; lengths reduced (units of l). */
export interface PinningOptions {
  /** Spacing of wall positions (default 0.25). */
  readonly qStep?: number;
  /** Half-width of the relaxed window around the wall (default 6 for FM, 6/kappa for AFM, at most 60;
   *  the wall energy density decays like exp(-2|x|/width), so the cut costs ~1e-5 of the wall energy). */
  readonly window?: number;
  /** Wall positions closer than this to an open end are skipped (default: the window half-width). */
  readonly endMargin?: number;
  /** AFM: no wall where kappa l is below this (the wall is not localised; default 0.1). */
  readonly afmMinKappa?: number;
  /** Reduced node range [from, to) of wall positions to consider (default: all). */
  readonly from?: number;
  readonly to?: number;
  /** Explicit wall positions (node indices, ascending); overrides from/to/qStep. */
  readonly nodes?: ArrayLike<number>;
  /** Gradient tolerance per unit node spacing of the window relaxations (default 1e-6). */
  readonly tolerance?: number;
  /** Keep the relaxed wall and background textures of every window (for the replicate depths). */
  readonly keepWalls?: boolean;
}

/** The relaxed wall of one window: window node indices, wall and background textures (3 per node). */
export interface RelaxedWall {
  readonly nodes: Int32Array;
  readonly wall: Float64Array;
  readonly background: Float64Array;
  readonly fixed: Uint8Array;
}

/** Landscape along a list of wall positions (reduced units; NaN where no wall is computed). */
export interface WallLandscape {
  /** Node index of every wall position. */
  readonly index: Int32Array;
  readonly q: Float64Array;
  /** The lower of the senses computed at each position. */
  readonly energy: Float64Array;
  /** Energy of each sense (FM: [-N]; AFM: [+N, -N]). */
  readonly bySense: readonly Float64Array[];
  /** Sense of the kept wall: +1 through +N, -1 through -N, 0 where none. */
  readonly sense: Int8Array;
  /** Relaxed walls when `keepWalls` was asked for, else null. */
  readonly walls: readonly (RelaxedWall | null)[] | null;
  readonly iterations: number;
}

interface WallTrack { readonly centre: number; readonly nodes: Int32Array; readonly v: Float64Array }

/**
 * Start texture of a window: a tanh wall from bg to -bg whose centre points along sign * N
 * (orthogonalised against bg at the centre), or the previous relaxed wall of the same sense
 * shifted to the new centre (warm start). The centre node holds the centre direction.
 */
function wallStart(bg: Float64Array, iq: number, vb: Float64Array, sPos: Float64Array, c0: number, width: number, sign: number, prev: WallTrack | null): Float64Array {
  const m = sPos.length;
  const bq = 3 * iq;
  let wx = -bg[bq + 1] * sign * bg[bq], wy = sign * (1 - bg[bq + 1] * bg[bq + 1]), wz = -bg[bq + 1] * sign * bg[bq + 2];
  let wn = Math.hypot(wx, wy, wz);
  if (wn < 1e-6) {
    // bg along N: rotate through the binormal instead
    wx = 0; wy = 0; wz = sign; wn = 1;
  }
  wx /= wn; wy /= wn; wz /= wn;
  const v = new Float64Array(3 * m);
  for (let a = 0; a < m; ++a) {
    const bx = vb[3 * a], by = vb[3 * a + 1], bz = vb[3 * a + 2];
    // centre direction transported only approximately: orthogonalise the global w against bg here
    const dot = wx * bx + wy * by + wz * bz;
    let ux = wx - dot * bx, uy = wy - dot * by, uz = wz - dot * bz;
    const un = Math.hypot(ux, uy, uz) || 1;
    ux /= un; uy /= un; uz /= un;
    const phi = 0.5 * Math.PI * (1 + Math.tanh(sPos[a] / width));
    const c = Math.cos(phi), sn = Math.sin(phi);
    v[3 * a] = c * bx + sn * ux;
    v[3 * a + 1] = c * by + sn * uy;
    v[3 * a + 2] = c * bz + sn * uz;
  }
  if (prev !== null) {
    const pc0 = prev.nodes.indexOf(prev.centre);
    for (let a = 0; a < m; ++a) {
      const pa = a - c0 + pc0; // same offset from the wall centre
      if (pa >= 0 && pa < prev.nodes.length) for (let c = 0; c < 3; ++c) v[3 * a + c] = prev.v[3 * pa + c];
    }
  }
  v[3 * c0] = wx; v[3 * c0 + 1] = wy; v[3 * c0 + 2] = wz;
  return v;
}

/** Gather a window of a chain (node indices, consecutive along the chain) into an open chain. */
function windowChain(chain: Chain, nodes: Int32Array, fixed: Uint8Array): Chain {
  const m = nodes.length;
  const rot = new Float64Array(9 * (m - 1)), h = new Float64Array(m - 1), w = new Float64Array(m);
  for (let k = 0; k + 1 < m; ++k) {
    const b = nodes[k];
    rot.set(chain.rot.subarray(9 * b, 9 * b + 9), 9 * k);
    h[k] = chain.h[b];
    w[k] += 0.5 * h[k];
    w[k + 1] += 0.5 * h[k];
  }
  const pick = (src: Float64Array | null | undefined, stride: number): Float64Array | null => {
    if (src === null || src === undefined) return null;
    const out = new Float64Array(stride * m);
    for (let k = 0; k < m; ++k) out.set(src.subarray(stride * nodes[k], stride * nodes[k] + stride), stride * k);
    return out;
  };
  return { n: m, rot, h, w, q: chain.q, closure: "open", fixed, field: pick(chain.field, 3), nodeTensor: pick(chain.nodeTensor, 9) };
}

/**
 * Domain-wall energy landscape U(q) along a wire by constrained relaxation (the general algorithm
 * of ../shared/PHYSICS.md section 5): for each wall position q (a node), the texture in a window
 * around q starts as a wall between the background texture bg and -bg (tanh profile), the node at
 * q is held at the wall-centre direction, the window ends are held at +-bg, and the rest is
 * relaxed by L-BFGS; U(q) = E_window(wall) - E_window(bg). Senses: FM through -N only (the pinned
 * sense of a planar wire; torsion does not split it at first order); AFM through +N and through -N,
 * keeping the lower at every q, because torsion splits the two senses (PHYSICS.md section 5,
 * correction: 4 pi |tau cos theta0 - kappa sin theta0| at first order) and a mirror image
 * (tau -> -tau) swaps them. Warm starts from the previous q of the same sense (shifted).
 * With a Zeeman field on the chain (open wires) the reversed domain beyond the window is added, so
 * U(q) carries the field's slope 2 h . bg per unit length of wall displacement.
 * bg must be the relaxed wall-free texture (local components) of the same chain.
 * Reduced energies (K l per cross-section). Positions where no wall is computed hold NaN.
 * Cost: (number of q) x (a few hundred iterations on 2 window/h nodes).
 */
export function pinningLandscape(
  chain: Chain,
  s: Float64Array,
  bg: Float64Array,
  kappaReduced: ArrayLike<number>,
  order: MagneticOrder,
  options: PinningOptions = {},
): WallLandscape {
  const n = chain.n;
  const closed = chain.closure !== "open";
  let hMean = 0;
  for (let i = 0; i < chain.h.length; ++i) hMean += chain.h[i];
  hMean /= chain.h.length;
  const stride = Math.max(1, Math.round((options.qStep ?? 0.25) / hMean));
  const afmMin = options.afmMinKappa ?? 0.1;
  let index: Int32Array;
  if (options.nodes !== undefined) index = Int32Array.from(options.nodes);
  else {
    const indices: number[] = [];
    const from = options.from ?? 0, to = options.to ?? n;
    for (let i = from; i < to; i += stride) indices.push(i);
    index = Int32Array.from(indices);
  }
  const energy = new Float64Array(index.length).fill(NaN);
  // FM: the pinned sense only (through -N, PHYSICS.md section 5); AFM: both senses, the lower kept
  const senses = order === "ferro" ? [-1] : [1, -1];
  const bySense = senses.map(() => new Float64Array(index.length).fill(NaN));
  const sense = new Int8Array(index.length);
  const prev: (WallTrack | null)[] = senses.map(() => null);
  const walls: (RelaxedWall | null)[] | null = options.keepWalls ? new Array<RelaxedWall | null>(index.length).fill(null) : null;
  let iterations = 0;
  // With a field, the reversed domain beyond the window (open wire: from the window's right end to
  // the wire's end, -bg instead of bg) costs 2 w_i h_i . bg_i per node: suffix sums of that.
  const zeemanTail = new Float64Array(n + 1);
  if (chain.field && !closed) {
    const f = chain.field;
    for (let i = n - 1; i >= 0; --i) zeemanTail[i] = zeemanTail[i + 1] + 2 * chain.w[i] * (f[3 * i] * bg[3 * i] + f[3 * i + 1] * bg[3 * i + 1] + f[3 * i + 2] * bg[3 * i + 2]);
  }
  for (let k = 0; k < index.length; ++k) {
    const iq = index[k];
    const kq = kappaReduced[iq];
    if (order === "antiferro" && !(kq >= afmMin)) {
      prev.fill(null);
      continue;
    }
    const half = options.window ?? Math.min(60, order === "ferro" ? 6 : 6 / Math.max(kq, 0.2));
    const margin = options.endMargin ?? half;
    // window nodes around iq by arc length
    const left: number[] = [], right: number[] = [];
    let acc = 0, i = iq;
    let leftOpen = false, rightOpen = false;
    while (acc < half) {
      const j = i - 1;
      if (j < 0 && !closed) { leftOpen = true; break; }
      const jj = (j + n) % n;
      acc += chain.h[jj];
      left.push(jj);
      i = jj;
      if (left.length + 1 >= n / 2) break;
    }
    if (!closed && acc < margin && leftOpen) continue;
    acc = 0;
    i = iq;
    while (acc < half) {
      const j = i + 1;
      if (j >= n && !closed) { rightOpen = true; break; }
      acc += chain.h[i % n];
      right.push(j % n);
      i = j % n;
      if (right.length + 1 >= n / 2) break;
    }
    if (!closed && acc < margin && rightOpen) continue;
    const nodes = Int32Array.from([...left.reverse(), iq, ...right]);
    const m = nodes.length, c0 = left.length;
    const fixed = new Uint8Array(m);
    fixed[c0] = 1;
    if (!leftOpen) fixed[0] = 1;
    if (!rightOpen) fixed[m - 1] = 1;
    const sub = windowChain(chain, nodes, fixed);
    const width = order === "ferro" ? 1 : 1 / Math.max(kq, 0.2);
    const sPos = new Float64Array(m);
    let sRel = 0;
    for (let a = c0 - 1; a >= 0; --a) { sRel -= sub.h[a]; sPos[a] = sRel; }
    sRel = 0;
    for (let a = c0 + 1; a < m; ++a) { sRel += sub.h[a - 1]; sPos[a] = sRel; }
    const vb = new Float64Array(3 * m);
    for (let a = 0; a < m; ++a) for (let c = 0; c < 3; ++c) vb[3 * a + c] = bg[3 * nodes[a] + c];
    let hMin = Infinity;
    for (let a = 0; a < sub.h.length; ++a) hMin = Math.min(hMin, sub.h[a]);
    const eBg = chainEnergy({ ...sub, fixed: null }, vb, null);
    let bestE = Infinity, bestV: Float64Array | null = null, bestSense = 0;
    // a planar window (every bond rotates about B) with no per-node terms is symmetric under
    // u_B -> -u_B, which maps the wall through +N onto the one through -N: compute one sense
    let planar = senses.length > 1 && !chain.field && !chain.nodeTensor && chain.q[2] === 0 && chain.q[5] === 0;
    for (let a = 0; planar && a + 1 < m; ++a) {
      const o = 9 * nodes[a], r = chain.rot;
      if (r[o + 2] !== 0 || r[o + 5] !== 0 || r[o + 6] !== 0 || r[o + 7] !== 0) planar = false;
    }
    for (let si = 0; si < senses.length; ++si) {
      if (planar && si > 0) {
        bySense[si][k] = bySense[0][k];
        prev[si] = null;
        continue;
      }
      const v = wallStart(bg, iq, vb, sPos, c0, width, senses[si], prev[si]);
      if (fixed[0]) { v[0] = vb[0]; v[1] = vb[1]; v[2] = vb[2]; }
      if (fixed[m - 1]) { v[3 * m - 3] = -vb[3 * m - 3]; v[3 * m - 2] = -vb[3 * m - 2]; v[3 * m - 1] = -vb[3 * m - 1]; }
      normalise(v);
      // depths need ~1e-7 relative: stop when the energy changes by < 1e-10 relative over 10 steps
      const r = relaxChain(sub, v, { gradientTolerance: (options.tolerance ?? 1e-6) * hMin, energyTolerance: 1e-10, maxIterations: 20000 });
      iterations += r.iterations;
      const e = r.energy - eBg + (closed ? 0 : zeemanTail[nodes[m - 1] + 1]);
      bySense[si][k] = e;
      prev[si] = { centre: iq, nodes, v };
      if (e < bestE) { bestE = e; bestV = v; bestSense = senses[si]; }
    }
    energy[k] = bestE;
    sense[k] = bestSense;
    if (walls !== null && bestV !== null) walls[k] = { nodes, wall: bestV, background: vb, fixed };
  }
  const q = new Float64Array(index.length);
  for (let k = 0; k < index.length; ++k) q[k] = s[index[k]];
  return { index, q, energy, bySense, sense, walls, iterations };
}

/**
 * First-order (fast preview) wall energy along a wire, reduced.
 * FM planar head-to-head wall through -N: U(q) = 4 - 2 integral kappa(s) sech(s - q) ds, the
 * curvature convolved with a sech kernel of width l (../shared/PHYSICS.md section 5; background
 * Yershov, Kravchuk, Sheka, Gaididei, PRB 92, 104412 (2015)).
 * For an AFM there is no first-order formula in PHYSICS.md: NaN (use the constrained relaxation).
 * s and kappaReduced are reduced; trapezoid rule over all samples within 25 kernel widths.
 * Cost O(n x window).
 * @example firstOrderPinning(s, k, q, "ferro") // 4 - 2*pi*k0 for a constant curvature k0
 */
export function firstOrderPinning(s: Float64Array, kappaReduced: ArrayLike<number>, q: Float64Array, order: MagneticOrder): Float64Array {
  const n = s.length;
  const out = new Float64Array(q.length);
  if (order !== "ferro") return out.fill(NaN);
  for (let k = 0; k < q.length; ++k) {
    const qk = q[k];
    const width = 1;
    let acc = 0;
    for (let i = 0; i + 1 < n; ++i) {
      const x0 = s[i] - qk, x1 = s[i + 1] - qk;
      if (Math.abs(x0) > 25 * width && Math.abs(x1) > 25 * width) continue;
      const f = (x: number, kap: number): number => (-2 * kap) / Math.cosh(x);
      acc += 0.5 * (x1 - x0) * (f(x0, kappaReduced[i]) + f(x1, kappaReduced[i + 1]));
    }
    out[k] = 4 + acc;
  }
  return out;
}

/** A local minimum of a landscape (reduced units) with the grid indices that set its depth. */
export interface LandscapeWell {
  /** Position and energy refined by a parabola through the three nearest points. */
  readonly q: number;
  readonly energy: number;
  /** Lower of the two barriers to the highest points before the neighbouring minima (or the ends). */
  readonly depth: number;
  /** Grid index of the minimum, and of the highest point on each side (-1 when none). */
  readonly k: number;
  readonly kLeft: number;
  readonly kRight: number;
}

/**
 * Pinning sites of a landscape U(q): interior local minima, position and energy refined by a
 * parabola through the three nearest points, depth = the lower of the two barriers to the
 * highest points between this minimum and its neighbouring minima (or the ends). NaN entries
 * split the landscape; depths below minDepth (default 1e-6 of max |U|) are dropped. Sorted deepest
 * first. Barriers (maxima: a wall pushed away) are the wells of -U. Reduced units in, reduced out.
 * Cost O(m).
 * @example pinningSites(q, U)[0].depth // U(far) - U(0) for a single bump
 */
export function pinningSites(q: Float64Array, u: Float64Array, minDepth?: number): LandscapeWell[] {
  const m = q.length;
  let scale = 0;
  for (let k = 0; k < m; ++k) if (Number.isFinite(u[k])) scale = Math.max(scale, Math.abs(u[k]));
  // default: depths below 1e-6 of the wall energy are round-off, not sites
  const floor = minDepth ?? 1e-6 * Math.max(scale, 1e-12);
  const minima: number[] = [];
  for (let k = 1; k + 1 < m; ++k) {
    if (!Number.isFinite(u[k - 1]) || !Number.isFinite(u[k]) || !Number.isFinite(u[k + 1])) continue;
    if (u[k] < u[k - 1] && u[k] <= u[k + 1]) minima.push(k);
  }
  const out: LandscapeWell[] = [];
  minima.forEach((k, idx) => {
    const stopL = idx > 0 ? minima[idx - 1] : -1, stopR = idx + 1 < minima.length ? minima[idx + 1] : m;
    let maxL = -Infinity, maxR = -Infinity, kL = -1, kR = -1;
    for (let j = k - 1; j > stopL && Number.isFinite(u[j]); --j) if (u[j] > maxL) { maxL = u[j]; kL = j; }
    for (let j = k + 1; j < stopR && Number.isFinite(u[j]); ++j) if (u[j] > maxR) { maxR = u[j]; kR = j; }
    // parabola through k-1, k, k+1 (uneven spacing allowed)
    const x0 = q[k - 1], x1 = q[k], x2 = q[k + 1], y0 = u[k - 1], y1 = u[k], y2 = u[k + 1];
    const d0 = (y1 - y0) / (x1 - x0), d1 = (y2 - y1) / (x2 - x1);
    const a = (d1 - d0) / (x2 - x0);
    let qm = x1, um = y1;
    if (a > 0) {
      const b = d0 - a * (x0 + x1);
      qm = Math.min(x2, Math.max(x0, -b / (2 * a)));
      um = y1 + (qm - x1) * (d0 + a * (qm - x0));
      um = Math.min(um, y1);
    }
    const depth = Math.min(maxL, maxR) - um;
    if (depth > floor) out.push({ q: qm, depth, energy: um, k, kLeft: kL, kRight: kR });
  });
  return out.sort((x, y) => y.depth - x.depth);
}

/**
 * Wall energy U = E(wall) - E(background) of a relaxed window (`keepWalls`) on a chain with other
 * kappa l, tau l at its nodes, the textures held fixed. Because both textures are constrained
 * minima, this is the first-order (Hellmann-Feynman) response of U to a change of the geometry
 * (common practice in perturbation theory; exact to first order in the change, the relaxation of the
 * textures only enters at second order). Used for the bootstrap replicates of kappa(s), tau(s).
 * h: the chain's bond lengths (reduced). Cost O(window).
 */
export function wallEnergyWith(wall: RelaxedWall, h: Float64Array, q: Float64Array, kappaReduced: ArrayLike<number>, tauReduced: ArrayLike<number>): number {
  // The same floating-point operations as chainEnergy on makeChain(window kappa, tau, h) for both
  // textures (so the same value to the last bit), without building the chain: each bond rotation is
  // computed once and shared by the two textures.
  const nodes = wall.nodes, m = nodes.length, vw = wall.wall, vb = wall.background;
  const q0 = q[0], q1 = q[1], q2 = q[2], q4 = q[4], q5 = q[5], q8 = q[8];
  if (wallScratch.length < 6 * m) wallScratch = new Float64Array(6 * m);
  const cw = wallScratch, cb = 3 * m;
  let eW = 0, eB = 0;
  for (let a = 0; a < m; ++a) {
    // node weight as makeChain accumulates it: half of the bond before, then half of the bond after
    let wa = 0;
    if (a > 0) wa += 0.5 * h[nodes[a - 1]];
    if (a + 1 < m) wa += 0.5 * h[nodes[a]];
    for (let t = 0; t < 2; ++t) {
      const v = t === 0 ? vw : vb, o = t === 0 ? 3 * a : cb + 3 * a;
      const x = v[3 * a], y = v[3 * a + 1], z = v[3 * a + 2];
      const inv = 1 / Math.sqrt(x * x + y * y + z * z);
      const ca = x * inv, cbb = y * inv, cc = z * inv;
      cw[o] = ca; cw[o + 1] = cbb; cw[o + 2] = cc;
      const e = wa * (q0 * ca * ca + q4 * cbb * cbb + q8 * cc * cc + 2 * (q1 * ca * cbb + q2 * ca * cc + q5 * cbb * cc));
      if (t === 0) eW += e;
      else eB += e;
    }
  }
  const r = wallRot;
  for (let b = 0; b + 1 < m; ++b) {
    const i = nodes[b], j = nodes[b + 1];
    const ti = tauReduced[i], tj = tauReduced[j];
    const tb = Number.isFinite(ti) ? ti : 0, tjj = Number.isFinite(tj) ? tj : 0;
    const hb = h[i];
    bondRotation(r, 0.5 * (kappaReduced[i] + kappaReduced[j]), 0.5 * (tb + tjj), hb);
    const f = 2 / hb;
    for (let t = 0; t < 2; ++t) {
      const o = t === 0 ? 0 : cb;
      const ai = cw[o + 3 * b], bi = cw[o + 3 * b + 1], ci = cw[o + 3 * b + 2];
      const aj = cw[o + 3 * b + 3], bj = cw[o + 3 * b + 4], cj = cw[o + 3 * b + 5];
      const pa = r[0] * ai + r[1] * bi + r[2] * ci, pb = r[3] * ai + r[4] * bi + r[5] * ci, pc = r[6] * ai + r[7] * bi + r[8] * ci;
      const e = f * (1 - (aj * pa + bj * pb + cj * pc));
      if (t === 0) eW += e;
      else eB += e;
    }
  }
  return eW - eB;
}

let wallScratch = new Float64Array(0);
const wallRot = new Float64Array(9);

/**
 * Two-stage landscape: constrained relaxation on a coarse grid of wall positions (step `coarse`,
 * reduced, default 1), then on a fine grid (step `fine`, default 0.25) within one coarse step of
 * every coarse local minimum and maximum, merged in order. Same method and units as
 * `pinningLandscape`; the extremes are what the site depths need. Cost ~ L/coarse + 8 per extremum
 * window relaxations.
 */
export function pinningScan(
  chain: Chain,
  s: Float64Array,
  bg: Float64Array,
  kappaReduced: ArrayLike<number>,
  order: MagneticOrder,
  options: PinningOptions & { readonly coarse?: number; readonly fine?: number } = {},
): WallLandscape {
  const n = chain.n;
  let hMean = 0;
  for (let i = 0; i < chain.h.length; ++i) hMean += chain.h[i];
  hMean /= chain.h.length;
  const cs = Math.max(1, Math.round((options.coarse ?? 1) / hMean));
  const fs = Math.max(1, Math.round((options.fine ?? 0.25) / hMean));
  const coarseNodes: number[] = [];
  for (let i = 0; i < n; i += cs) coarseNodes.push(i);
  const first = pinningLandscape(chain, s, bg, kappaReduced, order, { ...options, nodes: coarseNodes });
  const extra = new Set<number>();
  const e = first.energy, idx = first.index;
  for (let k = 0; k < e.length; ++k) {
    if (!Number.isFinite(e[k])) continue;
    const l = k > 0 && Number.isFinite(e[k - 1]) ? e[k - 1] : NaN;
    const r = k + 1 < e.length && Number.isFinite(e[k + 1]) ? e[k + 1] : NaN;
    // extremes must stand out from round-off (1e-7 of the wall energy), else a flat landscape
    // would be refined everywhere
    const tol = 1e-7 * Math.max(1, Math.abs(e[k]));
    const anyNeighbour = Number.isFinite(l) || Number.isFinite(r);
    // NaN neighbours count as "not lower" / "not higher"
    const isMin = anyNeighbour && !(l < e[k] - tol) && !(r < e[k] - tol) && (l > e[k] + tol || r > e[k] + tol);
    const isMax = anyNeighbour && !(l > e[k] + tol) && !(r > e[k] + tol) && (l < e[k] - tol || r < e[k] - tol);
    if (!isMin && !isMax) continue;
    for (let i = idx[k] - cs + fs; i < idx[k] + cs; i += fs) if (i >= 0 && i < n && i !== idx[k]) extra.add(i);
  }
  const fineNodes = [...extra].sort((a, b) => a - b);
  const second = fineNodes.length > 0 ? pinningLandscape(chain, s, bg, kappaReduced, order, { ...options, nodes: fineNodes }) : null;
  return mergeLandscapes(second !== null ? [first, second] : [first]);
}

/**
 * Merge landscapes computed at different wall positions of the same chain into one, in node order
 * (positions present twice keep the first). All parts must have the same senses and all or none
 * kept walls. Cost O(m log m).
 */
export function mergeLandscapes(parts: readonly WallLandscape[]): WallLandscape {
  const all: { part: WallLandscape; k: number }[] = [];
  const seen = new Set<number>();
  for (const part of parts) for (let k = 0; k < part.index.length; ++k) {
    if (seen.has(part.index[k])) continue;
    seen.add(part.index[k]);
    all.push({ part, k });
  }
  all.sort((x, y) => x.part.index[x.k] - y.part.index[y.k]);
  const pick = <T>(f: (x: { part: WallLandscape; k: number }) => T): T[] => all.map(f);
  const first = parts[0];
  return {
    index: Int32Array.from(pick((x) => x.part.index[x.k])),
    q: Float64Array.from(pick((x) => x.part.q[x.k])),
    energy: Float64Array.from(pick((x) => x.part.energy[x.k])),
    bySense: first.bySense.map((_, si) => Float64Array.from(pick((x) => x.part.bySense[si][x.k]))),
    sense: Int8Array.from(pick((x) => x.part.sense[x.k])),
    walls: parts.every((p) => p.walls !== null) ? pick((x) => x.part.walls![x.k]) : null,
    iterations: parts.reduce((acc, p) => acc + p.iterations, 0),
  };
}

/**
 * Wall energies on a reference chain whose continuum landscape is flat, for the discretisation
 * error of a landscape (`pinningSummary`'s `reference`): the same bond lengths and closure as
 * `chain`, no field or lab-fixed terms, FM straight (kappa = tau = 0, background T: a straight wire
 * has no curvature pinning, PHYSICS.md section 5), AFM planar with the constant curvature of the
 * first grid point (background B, the exact ground state of a planar curve, PHYSICS.md section 3;
 * a straight AFM wall is not localised). Whatever U varies by on it is the chain's artefact
 * (uneven spacing, a wall not resolved). The returned function takes chain node indices (-1 gives
 * NaN). Reduced energies. Cost: one window relaxation per grid point (FM results
 * are memoised per node).
 */
export function flatReference(
  chain: Chain,
  s: Float64Array,
  kappaReduced: ArrayLike<number>,
  order: MagneticOrder,
  options: PinningOptions = {},
): (nodes: readonly number[]) => Float64Array {
  const n = chain.n;
  const closure = chain.closure === "open" ? "open" : "periodic";
  const zeros = new Float64Array(n);
  const fmChain = order === "ferro" ? makeChain(zeros, zeros, chain.h, chain.q, closure) : null;
  const memo = new Map<number, number>();
  const { nodes: _n, keepWalls: _k, from: _f, to: _t, ...rest } = options;
  return (grid) => {
    const out = new Float64Array(grid.length).fill(NaN);
    const want = [...new Set(grid.filter((g) => g >= 0))].sort((a, b) => a - b);
    if (want.length === 0) return out;
    let byNode: Map<number, number>;
    if (fmChain !== null) {
      const todo = want.filter((i) => !memo.has(i));
      if (todo.length > 0) {
        const bg = new Float64Array(3 * n);
        for (let i = 0; i < n; ++i) bg[3 * i] = 1;
        const r = pinningLandscape(fmChain, s, bg, zeros, order, { ...rest, nodes: todo });
        todo.forEach((i, k) => memo.set(i, r.energy[k]));
      }
      byNode = memo;
    } else {
      const k0 = kappaReduced[grid[0]];
      const kc = new Float64Array(n).fill(k0);
      const bg = new Float64Array(3 * n);
      for (let i = 0; i < n; ++i) bg[3 * i + 2] = 1;
      const r = pinningLandscape(makeChain(kc, zeros, chain.h, chain.q, closure), s, bg, kc, order, { ...rest, nodes: want });
      byNode = new Map(want.map((i, k) => [i, r.energy[k]]));
    }
    grid.forEach((g, k) => { if (g >= 0) out[k] = byNode.get(g) ?? NaN; });
    return out;
  };
}
