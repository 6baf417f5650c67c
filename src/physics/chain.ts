import { bondRotation } from "./linalg.js";

/**
 * A discretised wire in local-frame components (internal to the physics stage).
 * Energy (reduced, units of K l per cross-section), exact for the discrete chain:
 *   E = sum_b |c_j - R_b c_i|^2 / h_b + sum_i w_i c_i^T Q c_i  (+ the optional per-node terms)
 * for bonds b = (i -> j = i + 1) with the frame rotation R_b = exp(-h_b [D_b]x) (D the Darboux
 * vector (tau, 0, kappa) at the bond midpoint), node weights w_i (the length each node represents)
 * and the material tensor Q (local, constant along the wire). |c_j - R c_i|^2 = 2 - 2 c_j . R c_i
 * on the unit sphere. This is the bond-rotation form recommended by ../shared/PHYSICS.md section 4:
 * it needs no Frenet frame, only kappa and tau, and it reproduces |u'|^2 = sum (u_a')^2 +
 * 2 D . (u x u') + |D|^2 - (D . u)^2 to O(h^2).
 * closure: "open" (n-1 bonds), "periodic" (bond n-1 -> 0) or "antiperiodic" (bond n-1 -> 0 with
 * c_0 replaced by -c_0: a cell holding half a turn of n).
 */
export interface Chain {
  readonly n: number;
  /** 9 per bond, row-major. Bond b joins node b to node b + 1 (mod n). */
  readonly rot: Float64Array;
  readonly h: Float64Array;
  readonly w: Float64Array;
  readonly q: Float64Array;
  readonly closure: "open" | "periodic" | "antiperiodic";
  /** 1 where the node is held fixed (its gradient is zeroed). */
  readonly fixed: Uint8Array | null;
  /** Optional per-node terms (local components): a Zeeman field h (3 per node; energy
   *  -sum_i w_i h_i . c_i, h = mu0 Ms H / K) and an extra anisotropy tensor (9 per node, row-major,
   *  energy sum_i w_i c_i^T P_i c_i, e.g. an intrinsic axis fixed in the lab). */
  readonly field?: Float64Array | null;
  readonly nodeTensor?: Float64Array | null;
}

/**
 * Build a chain from reduced kappa, tau at nodes and reduced spacings h (n - 1 values for an
 * open chain, n for a closed one: h[n-1] is the closing bond). NaN torsion counts as 0 (a
 * twist-free frame where the Frenet frame is undefined).
 */
export function makeChain(
  kappa: ArrayLike<number>,
  tau: ArrayLike<number>,
  h: ArrayLike<number>,
  q: Float64Array,
  closure: Chain["closure"],
  fixed: Uint8Array | null = null,
): Chain {
  const n = kappa.length;
  const nb = closure === "open" ? n - 1 : n;
  const rot = new Float64Array(9 * nb), hb = new Float64Array(nb), w = new Float64Array(n);
  const r = new Float64Array(9);
  for (let b = 0; b < nb; ++b) {
    const j = (b + 1) % n;
    const tb = Number.isFinite(tau[b]) ? tau[b] : 0, tj = Number.isFinite(tau[j]) ? tau[j] : 0;
    hb[b] = h[b];
    bondRotation(r, 0.5 * (kappa[b] + kappa[j]), 0.5 * (tb + tj), h[b]);
    rot.set(r, 9 * b);
    w[b] += 0.5 * h[b];
    w[j] += 0.5 * h[b];
  }
  return { n, rot, h: hb, w, q, closure, fixed };
}

/** A uniform chain: n nodes, constant kappa, tau, spacing h. */
export function uniformChain(
  n: number,
  kappa: number,
  tau: number,
  h: number,
  q: Float64Array,
  closure: Chain["closure"],
): Chain {
  return makeChain(new Float64Array(n).fill(kappa), new Float64Array(n).fill(tau), new Float64Array(n).fill(h), q, closure);
}

/** Scratch buffer of normalised vectors, grown on demand (no allocation per call). */
let scratch = new Float64Array(0);

/** 2 / h per bond of a chain (the same IEEE values chainEnergy computed per call), cached by the h array. */
const twoOverH = new WeakMap<Float64Array, Float64Array>();
function bondFactors(h: Float64Array): Float64Array {
  let f = twoOverH.get(h);
  if (f === undefined) {
    f = new Float64Array(h.length);
    for (let b = 0; b < h.length; ++b) f[b] = 2 / h[b];
    twoOverH.set(h, f);
  }
  return f;
}

/**
 * Energy of the chain at unnormalised vectors v (3 per node; c = v/|v|), and its gradient with
 * respect to v written into g (projected on the tangent planes, zero at fixed nodes). O(n).
 */
export function chainEnergy(chain: Chain, v: Float64Array, g: Float64Array | null): number {
  const { n, rot, h, w, q, closure, fixed } = chain;
  const field = chain.field ?? null, pt = chain.nodeTensor ?? null;
  const nb = closure === "open" ? n - 1 : n;
  const q0 = q[0], q1 = q[1], q2 = q[2], q4 = q[4], q5 = q[5], q8 = q[8];
  if (scratch.length < 4 * n) scratch = new Float64Array(4 * n);
  // c = v/|v| (3 per node) and 1/|v| (at 3n + i), computed once
  const c = scratch, invOff = 3 * n;
  const fb = bondFactors(h);
  let e = 0;
  for (let i = 0; i < n; ++i) {
    const x = v[3 * i], y = v[3 * i + 1], z = v[3 * i + 2];
    const inv = 1 / Math.sqrt(x * x + y * y + z * z);
    const a = x * inv, b = y * inv, cc = z * inv;
    c[3 * i] = a; c[3 * i + 1] = b; c[3 * i + 2] = cc; c[invOff + i] = inv;
    const wi = w[i];
    e += wi * (q0 * a * a + q4 * b * b + q8 * cc * cc + 2 * (q1 * a * b + q2 * a * cc + q5 * b * cc));
    if (g !== null) {
      // the first write of this node's gradient (0 + x = x)
      g[3 * i] = 2 * wi * (q0 * a + q1 * b + q2 * cc);
      g[3 * i + 1] = 2 * wi * (q1 * a + q4 * b + q5 * cc);
      g[3 * i + 2] = 2 * wi * (q2 * a + q5 * b + q8 * cc);
    }
    if (field !== null) {
      const hx = field[3 * i], hy = field[3 * i + 1], hz = field[3 * i + 2];
      e -= wi * (hx * a + hy * b + hz * cc);
      if (g !== null) {
        g[3 * i] -= wi * hx;
        g[3 * i + 1] -= wi * hy;
        g[3 * i + 2] -= wi * hz;
      }
    }
    if (pt !== null) {
      const o = 9 * i;
      // symmetric tensor: P c
      const pa = pt[o] * a + pt[o + 1] * b + pt[o + 2] * cc, pb = pt[o + 3] * a + pt[o + 4] * b + pt[o + 5] * cc, pc = pt[o + 6] * a + pt[o + 7] * b + pt[o + 8] * cc;
      e += wi * (a * pa + b * pb + cc * pc);
      if (g !== null) {
        g[3 * i] += 2 * wi * pa;
        g[3 * i + 1] += 2 * wi * pb;
        g[3 * i + 2] += 2 * wi * pc;
      }
    }
  }
  for (let bnd = 0; bnd < nb; ++bnd) {
    const i = bnd, j = bnd + 1 === n ? 0 : bnd + 1;
    const sgn = closure === "antiperiodic" && j === 0 ? -1 : 1;
    const ai = c[3 * i], bi = c[3 * i + 1], ci = c[3 * i + 2];
    const aj = sgn * c[3 * j], bj = sgn * c[3 * j + 1], cj = sgn * c[3 * j + 2];
    const o = 9 * bnd;
    const r0 = rot[o], r1 = rot[o + 1], r2 = rot[o + 2], r3 = rot[o + 3], r4 = rot[o + 4];
    const r5 = rot[o + 5], r6 = rot[o + 6], r7 = rot[o + 7], r8 = rot[o + 8];
    // R c_i
    const pa = r0 * ai + r1 * bi + r2 * ci, pb = r3 * ai + r4 * bi + r5 * ci, pc = r6 * ai + r7 * bi + r8 * ci;
    const f = fb[bnd];
    e += f * (1 - (aj * pa + bj * pb + cj * pc));
    if (g !== null) {
      // d/dc_i = -f R^T c_j ; d/dc_j = -f R c_i (times sgn for the flipped node)
      g[3 * i] -= f * (r0 * aj + r3 * bj + r6 * cj);
      g[3 * i + 1] -= f * (r1 * aj + r4 * bj + r7 * cj);
      g[3 * i + 2] -= f * (r2 * aj + r5 * bj + r8 * cj);
      g[3 * j] -= sgn * f * pa;
      g[3 * j + 1] -= sgn * f * pb;
      g[3 * j + 2] -= sgn * f * pc;
    }
  }
  if (g !== null) {
    for (let i = 0; i < n; ++i) {
      if (fixed !== null && fixed[i]) {
        g[3 * i] = g[3 * i + 1] = g[3 * i + 2] = 0;
        continue;
      }
      const a = c[3 * i], b = c[3 * i + 1], cc = c[3 * i + 2], inv = c[invOff + i];
      const gx = g[3 * i], gy = g[3 * i + 1], gz = g[3 * i + 2];
      const dot = gx * a + gy * b + gz * cc;
      g[3 * i] = (gx - dot * a) * inv;
      g[3 * i + 1] = (gy - dot * b) * inv;
      g[3 * i + 2] = (gz - dot * cc) * inv;
    }
  }
  return e;
}

/** Normalise v in place (3 per node). */
export function normalise(v: Float64Array): Float64Array {
  for (let i = 0; i < v.length; i += 3) {
    const inv = 1 / Math.hypot(v[i], v[i + 1], v[i + 2]);
    v[i] *= inv;
    v[i + 1] *= inv;
    v[i + 2] *= inv;
  }
  return v;
}
