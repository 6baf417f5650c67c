import { chainEnergy, normalise, type Chain } from "./chain.js";
import { lbfgs, type LbfgsOptions } from "./lbfgs.js";

/**
 * Relax a chain texture by L-BFGS on unnormalised vectors (c = v/|v|, so the unit-length
 * constraint is exact and the gradient is the tangent-plane projection; a common practice for
 * micromagnetic energy minimisation). Works in place on v (3 per node) and normalises it.
 * Method: Nocedal & Wright, Numerical Optimization, 2nd ed., section 7.2. Reduced energy.
 * Cost O(n) per iteration; typically a few hundred iterations.
 */
export function relaxChain(chain: Chain, v: Float64Array, options: LbfgsOptions = {}): { energy: number; iterations: number; converged: boolean } {
  normalise(v);
  const r = lbfgs((x, g) => chainEnergy(chain, x, g), v, {
    gradientTolerance: 1e-10,
    maxIterations: 20000,
    ...options,
  });
  normalise(v);
  return { energy: chainEnergy(chain, v, null), iterations: r.iterations, converged: r.converged };
}
