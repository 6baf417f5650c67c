/**
 * Limited-memory BFGS minimiser with a backtracking (Armijo) line search.
 * Method: Nocedal & Wright, Numerical Optimization, 2nd ed., algorithms 7.4 (two-loop recursion)
 * and 3.1 (backtracking); the initial Hessian is scaled by s.y / y.y. Pairs with s.y <= 0 are
 * skipped. Works in place on x. Cost per iteration O(m n) plus one or a few evaluations of f.
 */
export interface LbfgsOptions {
  /** Memory (pairs kept), default 8. */
  readonly memory?: number;
  readonly maxIterations?: number;
  /** Stop when the largest gradient component is below this (default 1e-9). */
  readonly gradientTolerance?: number;
  /** Stop when the relative energy decrease over 10 iterations is below this (default 1e-14). */
  readonly energyTolerance?: number;
}

export interface LbfgsResult {
  readonly energy: number;
  readonly iterations: number;
  readonly converged: boolean;
}

/**
 * Minimise f over x in place. f(x, g) returns the value and writes the gradient into g.
 * @example lbfgs((x, g) => { g[0] = 2 * (x[0] - 1); return (x[0] - 1) ** 2; }, Float64Array.of(5)) // x -> 1
 */
export function lbfgs(
  f: (x: Float64Array, g: Float64Array) => number,
  x: Float64Array,
  options: LbfgsOptions = {},
): LbfgsResult {
  const n = x.length;
  const m = options.memory ?? 8;
  const maxIt = options.maxIterations ?? 5000;
  const gtol = options.gradientTolerance ?? 1e-9;
  const etol = options.energyTolerance ?? 1e-14;
  const S = Array.from({ length: m }, () => new Float64Array(n));
  const Y = Array.from({ length: m }, () => new Float64Array(n));
  const rho = new Float64Array(m), alpha = new Float64Array(m);
  const g = new Float64Array(n), gNew = new Float64Array(n), d = new Float64Array(n), xNew = new Float64Array(n);
  let fx = f(x, g);
  let count = 0, head = 0, gamma = 1;
  let history = fx;
  const maxAbs = (v: Float64Array): number => {
    let a = 0;
    for (let i = 0; i < n; ++i) a = Math.max(a, Math.abs(v[i]));
    return a;
  };
  if (maxAbs(g) < gtol) return { energy: fx, iterations: 0, converged: true };
  for (let it = 1; it <= maxIt; ++it) {
    // two-loop recursion: d = -H g
    for (let i = 0; i < n; ++i) d[i] = -g[i];
    for (let k = 0; k < count; ++k) {
      const j = (head - 1 - k + m) % m;
      let a = 0;
      const s = S[j], y = Y[j];
      for (let i = 0; i < n; ++i) a += s[i] * d[i];
      a *= rho[j];
      alpha[j] = a;
      for (let i = 0; i < n; ++i) d[i] -= a * y[i];
    }
    for (let i = 0; i < n; ++i) d[i] *= gamma;
    for (let k = count - 1; k >= 0; --k) {
      const j = (head - 1 - k + m) % m;
      let b = 0;
      const s = S[j], y = Y[j];
      for (let i = 0; i < n; ++i) b += y[i] * d[i];
      b *= rho[j];
      const c = alpha[j] - b;
      for (let i = 0; i < n; ++i) d[i] += c * s[i];
    }
    let slope = 0;
    for (let i = 0; i < n; ++i) slope += g[i] * d[i];
    if (!(slope < 0)) {
      // not a descent direction: restart along the steepest descent
      count = 0;
      gamma = 1 / Math.max(1, maxAbs(g));
      slope = 0;
      for (let i = 0; i < n; ++i) {
        d[i] = -g[i] * gamma;
        slope += g[i] * d[i];
      }
    }
    let step = 1, fNew = NaN, accepted = false;
    for (let ls = 0; ls < 40; ++ls) {
      for (let i = 0; i < n; ++i) xNew[i] = x[i] + step * d[i];
      fNew = f(xNew, gNew);
      if (Number.isFinite(fNew) && fNew <= fx + 1e-4 * step * slope) {
        accepted = true;
        break;
      }
      step *= ls < 2 ? 0.5 : 0.2;
    }
    // no decrease found: the energy is flat to round-off along d. Count that as converged when
    // the predicted decrease is below the round-off of f (an n-term sum carries ~n ulps).
    if (!accepted) return { energy: fx, iterations: it, converged: maxAbs(g) < 100 * gtol || -slope < 1e-14 * n * Math.max(1, Math.abs(fx)) };
    const s = S[head], y = Y[head];
    let sy = 0, yy = 0;
    for (let i = 0; i < n; ++i) {
      s[i] = xNew[i] - x[i];
      y[i] = gNew[i] - g[i];
      sy += s[i] * y[i];
      yy += y[i] * y[i];
    }
    if (sy > 1e-300 && yy > 0) {
      rho[head] = 1 / sy;
      gamma = sy / yy;
      head = (head + 1) % m;
      count = Math.min(count + 1, m);
    }
    x.set(xNew);
    g.set(gNew);
    const fOld = fx;
    fx = fNew;
    if (maxAbs(g) < gtol) return { energy: fx, iterations: it, converged: true };
    if (it % 10 === 0) {
      if (Math.abs(history - fx) <= etol * Math.max(1, Math.abs(fx))) return { energy: fx, iterations: it, converged: true };
      history = fx;
    }
    if (fOld === fx && step < 1e-12) return { energy: fx, iterations: it, converged: false };
  }
  return { energy: fx, iterations: maxIt, converged: false };
}
