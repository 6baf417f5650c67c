import { makeChain, chainEnergy, type Chain } from "./chain.js";
import { homogeneousState } from "./homogeneousState.js";
import { relaxChain } from "./relaxChain.js";
import type { ReducedSystem } from "./types.js";

/** The columns of a profile the relaxation needs (SI: s in m, kappa and tau in 1/m). */
export interface WireColumns {
  readonly n: number;
  readonly s: Float64Array;
  readonly kappa: Float64Array;
  readonly tau: Float64Array;
  readonly closed: boolean;
  readonly length: number;
}

/**
 * The discretised wire in reduced units: nodes at the profile samples, kappa l and tau l at the
 * nodes, bond lengths (s_(i+1) - s_i)/l and, for a closed wire, the closing bond
 * (length - s_(n-1) + s_0)/l. See ./chain.ts for the energy. NaN torsion counts as 0.
 */
export function wireChain(p: WireColumns, l: number, system: ReducedSystem, fixed: Uint8Array | null = null): Chain {
  const n = p.n;
  const kr = new Float64Array(n), tr = new Float64Array(n);
  for (let i = 0; i < n; ++i) {
    kr[i] = p.kappa[i] * l;
    tr[i] = Number.isFinite(p.tau[i]) ? p.tau[i] * l : 0;
  }
  const h = new Float64Array(p.closed ? n : n - 1);
  for (let i = 0; i + 1 < n; ++i) h[i] = (p.s[i + 1] - p.s[i]) / l;
  if (p.closed) h[n - 1] = (p.length - p.s[n - 1] + p.s[0]) / l;
  return makeChain(kr, tr, h, system.q, p.closed ? "periodic" : "open", fixed);
}

/**
 * Relax the texture along the measured kappa(s), tau(s): minimise the 1D energy
 * E = integral (|u'|^2 + u^T Q u) ds of ../shared/PHYSICS.md sections 1-2 on the chain of
 * `wireChain` by L-BFGS (./relaxChain.ts), from several starts: the local homogeneous state of
 * each sample (sign kept continuous along the chain), the uniform local state T (FM) or B (AFM),
 * and N (AFM). Returns the lowest, with local components (3 per node) and the reduced energy
 * (units of K l per cross-section). Several starts because a single start can stick in a
 * metastable winding texture (PHYSICS.md section 3). Each start runs at most 500 iterations; the
 * lowest is then relaxed to convergence. Cost: a few hundred to a few thousand O(n) iterations.
 * @example relaxWire(chain, system).energy // -L for a straight FM wire of length L (in l)
 */
export function relaxWire(
  chain: Chain,
  system: ReducedSystem,
  kappaReduced: ArrayLike<number>,
  tauReduced: ArrayLike<number>,
): { local: Float64Array; energy: number; iterations: number; converged: boolean } {
  const n = chain.n;
  const startSet: Float64Array[] = [];
  // start 1: local homogeneous state, sign continuous along the bonds
  const hom = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    const u = homogeneousState(system, kappaReduced[i], tauReduced[i]).u;
    let sgn = 1;
    if (i > 0) {
      const o = 9 * (i - 1), r = chain.rot;
      const pa = r[o] * hom[3 * i - 3] + r[o + 1] * hom[3 * i - 2] + r[o + 2] * hom[3 * i - 1];
      const pb = r[o + 3] * hom[3 * i - 3] + r[o + 4] * hom[3 * i - 2] + r[o + 5] * hom[3 * i - 1];
      const pc = r[o + 6] * hom[3 * i - 3] + r[o + 7] * hom[3 * i - 2] + r[o + 8] * hom[3 * i - 1];
      if (pa * u[0] + pb * u[1] + pc * u[2] < 0) sgn = -1;
    }
    for (let c = 0; c < 3; ++c) hom[3 * i + c] = sgn * u[c];
  }
  startSet.push(hom);
  const uniform = (a: number, b: number, c: number): Float64Array => {
    const v = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) {
      v[3 * i] = a;
      v[3 * i + 1] = b;
      v[3 * i + 2] = c;
    }
    return v;
  };
  if (system.order === "ferro") startSet.push(uniform(1, 0, 0.01));
  else startSet.push(uniform(0.01, 0, 1), uniform(0.01, 1, 0.01));
  // every start gets a capped run; only the lowest is then relaxed to convergence
  const gtol = 1e-9 * Math.max(1e-3, minH(chain));
  let best = { local: startSet[0], energy: Infinity, iterations: 0, converged: false };
  for (const v of startSet) {
    const r = relaxChain(chain, v, { gradientTolerance: gtol, maxIterations: 500 });
    if (r.energy < best.energy) best = { local: v, energy: r.energy, iterations: r.iterations, converged: r.converged };
  }
  // polish the lowest; on long chains the gradient target can sit below the round-off of the
  // energy sum, so a polish round that no longer moves the energy (1e-11 relative) also counts
  for (let round = 0; round < 4 && !best.converged; ++round) {
    const r = relaxChain(chain, best.local, { gradientTolerance: gtol, maxIterations: 20000 });
    const still = Math.abs(r.energy - best.energy) <= 1e-11 * Math.max(1, Math.abs(r.energy));
    best = { local: best.local, energy: r.energy, iterations: best.iterations + r.iterations, converged: r.converged || still };
  }
  return { ...best, energy: chainEnergy(chain, best.local, null) };
}

function minH(chain: Chain): number {
  let m = Infinity;
  for (let i = 0; i < chain.h.length; ++i) m = Math.min(m, chain.h[i]);
  return m;
}
