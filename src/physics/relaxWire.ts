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

/** A named start texture (local components, 3 per node). */
export interface NamedStart {
  readonly name: string;
  readonly local: Float64Array;
}

/** One relaxed texture of the wire. */
export interface RelaxedTexture {
  /** Name of the start it was relaxed from (the caller's name, or homogeneous / uniform-T / uniform-B / uniform-N). */
  readonly name: string;
  readonly local: Float64Array;
  /** Reduced energy (units of K l per cross-section). */
  readonly energy: number;
  readonly iterations: number;
  readonly converged: boolean;
}

/**
 * Relax the texture along the measured kappa(s), tau(s): minimise the 1D energy
 * E = integral (|u'|^2 + u^T Q u) ds of ../shared/PHYSICS.md sections 1-2 on the chain of
 * `wireChain` by L-BFGS (./relaxChain.ts), from several starts: the local homogeneous state of
 * each sample (sign kept continuous along the chain), the uniform local state T (FM) or B and N
 * (AFM), and the caller's `extraStarts` (lab-uniform textures, periodic textures of stretches).
 * Several starts because a single start can stick in a metastable texture (PHYSICS.md section 3:
 * on a closed FM ring the vortex and the onion are both local minima). Every start gets a capped
 * run (500 iterations); starts that end at the same energy (1e-7 relative) are merged (the first
 * name is kept); the lowest is relaxed to convergence and the others are polished (at most 1500
 * more iterations; `converged` says whether they got there) and returned in `alternatives`, lowest first: the metastable textures with their
 * energies. Reduced energies (units of K l per cross-section). Cost: a few hundred to a few
 * thousand O(n) iterations per start.
 * @example relaxWire(chain, system, k, t).energy // -L for a straight FM wire of length L (in l)
 */
export function relaxWire(
  chain: Chain,
  system: ReducedSystem,
  kappaReduced: ArrayLike<number>,
  tauReduced: ArrayLike<number>,
  extraStarts: readonly NamedStart[] = [],
): RelaxedTexture & { readonly alternatives: readonly RelaxedTexture[] } {
  const n = chain.n;
  const startSet: NamedStart[] = [];
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
  startSet.push({ name: "homogeneous", local: hom });
  const uniform = (a: number, b: number, c: number): Float64Array => {
    const v = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) {
      v[3 * i] = a;
      v[3 * i + 1] = b;
      v[3 * i + 2] = c;
    }
    return v;
  };
  if (system.order === "ferro") startSet.push({ name: "uniform-T", local: uniform(1, 0, 0.01) });
  else startSet.push({ name: "uniform-B", local: uniform(0.01, 0, 1) }, { name: "uniform-N", local: uniform(0.01, 1, 0.01) });
  for (const x of extraStarts) {
    if (x.local.length !== 3 * n) throw new RangeError(`relaxWire: start ${x.name} has ${x.local.length / 3} nodes, expected ${n}`);
    startSet.push({ name: x.name, local: Float64Array.from(x.local) });
  }
  // every start gets a capped run; only distinct results are polished
  const gtol = 1e-9 * Math.max(1e-3, minH(chain));
  const runs: RelaxedTexture[] = [];
  for (const st of startSet) {
    const r = relaxChain(chain, st.local, { gradientTolerance: gtol, maxIterations: 500 });
    const same = runs.find((x) => Math.abs(x.energy - r.energy) <= 1e-7 * Math.max(1, Math.abs(r.energy)));
    if (same !== undefined) continue;
    runs.push({ name: st.name, local: st.local, energy: r.energy, iterations: r.iterations, converged: r.converged });
  }
  runs.sort((a, b) => a.energy - b.energy);
  const polished = runs.map((run, k) => polish(chain, run, gtol, k === 0 ? 4 : 1, k === 0 ? 20000 : 1500));
  // polishing can merge states or reorder them
  polished.sort((a, b) => a.energy - b.energy);
  const distinct: RelaxedTexture[] = [];
  for (const p of polished) if (!distinct.some((x) => Math.abs(x.energy - p.energy) <= 1e-7 * Math.max(1, Math.abs(p.energy)))) distinct.push(p);
  return { ...distinct[0], alternatives: distinct.slice(1) };
}

/** Relax a capped run further; a round that no longer moves the energy (1e-11 relative) also counts
 *  as converged (on long chains the gradient target can sit below the round-off of the energy sum). */
function polish(chain: Chain, run: RelaxedTexture, gtol: number, rounds: number, maxIterations: number): RelaxedTexture {
  let best = run;
  for (let round = 0; round < rounds && !best.converged; ++round) {
    const r = relaxChain(chain, best.local, { gradientTolerance: gtol, maxIterations });
    const still = Math.abs(r.energy - best.energy) <= 1e-11 * Math.max(1, Math.abs(r.energy));
    best = { ...best, energy: r.energy, iterations: best.iterations + r.iterations, converged: r.converged || still };
  }
  return { ...best, energy: chainEnergy(chain, best.local, null) };
}

function minH(chain: Chain): number {
  let m = Infinity;
  for (let i = 0; i < chain.h.length; ++i) m = Math.min(m, chain.h[i]);
  return m;
}
