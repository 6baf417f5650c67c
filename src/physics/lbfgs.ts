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
  // the current and trial points and gradients swap buffers instead of being copied; x itself is
  // written back at the end. Every pass below performs the same floating-point operations in the
  // same order as the plain two-loop recursion (passes are fused only where one pass reads what
  // the previous one wrote at the same index), so the iterates are bit-identical to it.
  let xc: Float64Array = x, xt: Float64Array = new Float64Array(n);
  let g: Float64Array = new Float64Array(n), gt: Float64Array = new Float64Array(n);
  const d = new Float64Array(n);
  let fx = f(xc, g);
  let count = 0, head = 0, gamma = 1;
  let history = fx;
  const maxAbs = (v: Float64Array): number => {
    let a = 0;
    for (let i = 0; i < n; ++i) a = Math.max(a, Math.abs(v[i]));
    return a;
  };
  const done = (energy: number, iterations: number, converged: boolean): LbfgsResult => {
    if (xc !== x) x.set(xc);
    return { energy, iterations, converged };
  };
  if (maxAbs(g) < gtol) return done(fx, 0, true);
  for (let it = 1; it <= maxIt; ++it) {
    // two-loop recursion: d = -H g (Nocedal & Wright algorithm 7.4)
    let slope = 0;
    if (count === 0) {
      for (let i = 0; i < n; ++i) d[i] = -g[i] * gamma;
    } else {
      // first loop, newest pair first; each update of d is fused with the next pair's dot product
      let j = (head - 1 + m) % m;
      let a = 0;
      let s = S[j];
      for (let i = 0; i < n; ++i) {
        const di = -g[i];
        d[i] = di;
        a += s[i] * di;
      }
      for (let k = 0; k < count; ++k) {
        a *= rho[j];
        alpha[j] = a;
        const y = Y[j];
        if (k + 1 < count) {
          const jn = (head - 2 - k + m) % m;
          const sn = S[jn];
          let an = 0;
          for (let i = 0; i < n; ++i) {
            const di = d[i] - a * y[i];
            d[i] = di;
            an += sn[i] * di;
          }
          j = jn;
          a = an;
        } else {
          // last update of the first loop, fused with the scaling by gamma and the first dot
          // product of the second loop (oldest pair)
          const jo = (head - count + m) % m;
          const yo = Y[jo];
          let b = 0;
          for (let i = 0; i < n; ++i) {
            const di = (d[i] - a * y[i]) * gamma;
            d[i] = di;
            b += yo[i] * di;
          }
          // second loop, oldest pair first
          let jj = jo;
          for (let kk = count - 1; kk >= 0; --kk) {
            b *= rho[jj];
            const c = alpha[jj] - b;
            s = S[jj];
            if (kk > 0) {
              const jn = (head - kk + m) % m;
              const yn = Y[jn];
              let bn = 0;
              for (let i = 0; i < n; ++i) {
                const di = d[i] + c * s[i];
                d[i] = di;
                bn += yn[i] * di;
              }
              jj = jn;
              b = bn;
            } else {
              for (let i = 0; i < n; ++i) {
                const di = d[i] + c * s[i];
                d[i] = di;
                slope += g[i] * di;
              }
            }
          }
        }
      }
    }
    if (count === 0) for (let i = 0; i < n; ++i) slope += g[i] * d[i];
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
      for (let i = 0; i < n; ++i) xt[i] = xc[i] + step * d[i];
      fNew = f(xt, gt);
      if (Number.isFinite(fNew) && fNew <= fx + 1e-4 * step * slope) {
        accepted = true;
        break;
      }
      step *= ls < 2 ? 0.5 : 0.2;
    }
    // no decrease found: the energy is flat to round-off along d. Count that as converged when
    // the predicted decrease is below the round-off of f (an n-term sum carries ~n ulps).
    if (!accepted) return done(fx, it, maxAbs(g) < 100 * gtol || -slope < 1e-14 * n * Math.max(1, Math.abs(fx)));
    const s = S[head], y = Y[head];
    let sy = 0, yy = 0, gMax = 0;
    for (let i = 0; i < n; ++i) {
      const si = xt[i] - xc[i], yi = gt[i] - g[i];
      s[i] = si;
      y[i] = yi;
      sy += si * yi;
      yy += yi * yi;
      gMax = Math.max(gMax, Math.abs(gt[i]));
    }
    if (sy > 1e-300 && yy > 0) {
      rho[head] = 1 / sy;
      gamma = sy / yy;
      head = (head + 1) % m;
      count = Math.min(count + 1, m);
    }
    let tmp = xc;
    xc = xt;
    xt = tmp;
    tmp = g;
    g = gt;
    gt = tmp;
    const fOld = fx;
    fx = fNew;
    if (gMax < gtol) return done(fx, it, true);
    if (it % 10 === 0) {
      if (Math.abs(history - fx) <= etol * Math.max(1, Math.abs(fx))) return done(fx, it, true);
      history = fx;
    }
    if (fOld === fx && step < 1e-12) return done(fx, it, false);
  }
  return done(fx, maxIt, false);
}
