import { quantile } from "d3-array";
import { FLAG_END, FLAG_TORSION_NOT_MEASURABLE, FLAG_TORSION_UNDEFINED, type Profile, type Segment, type SegmentKind } from "../types.js";

/** Options of `segment`. Lengths in metres. */
export interface SegmentOptions {
  /** Multiplier of the default penalty 3 ln(n_eff) (default 1): larger gives fewer stretches. */
  readonly penaltyScale?: number;
  /** Stretches shorter than this are merged into a neighbour (default: the profile resolution). */
  readonly minLength?: number;
  /** Reduced chi-square per effective sample above which a stretch is "irregular" (default 4). */
  readonly irregularChi2?: number;
  /** ...and relative RMS variation of (kappa, tau) against |(kappa, tau)| above which (default 0.1). */
  readonly irregularRelative?: number;
}

/**
 * Split a profile into stretches of near-constant (kappa, tau) by a penalised change-point fit:
 * exact optimal partitioning with PELT pruning (Jackson et al., IEEE Signal Process. Lett. 12,
 * 105 (2005), optimal partitioning; Killick, Fearnhead & Eckley, JASA 107, 1590 (2012), PELT;
 * both cited from memory). Cost of a stretch: the weighted sum of squares of kappa and tau about
 * their weighted means, weights 1/sigma^2 from the 95% bootstrap bands (sigma = (hi - lo)/3.92),
 * times ds/resolution because neighbouring samples of a smoothing fit are correlated over about one
 * resolution length; undefined torsion has weight 0. Penalty 3 ln(n_eff) per change (BIC-like: two
 * means and a position), n_eff = length / resolution, so the penalty comes from the bands through
 * the chi-square scale. Stretches shorter than max(resolution, minLength) are merged into the
 * neighbour whose merged cost rises least, then adjacent stretches whose merged cost rises by less
 * than the penalty are joined.
 * Labels: "straight" when most samples have undefined torsion or the kappa band of the mean reaches
 * 0 (band width >= mean); "irregular" when the within-stretch reduced chi-square exceeds
 * irregularChi2 and the RMS variation of (kappa, tau) exceeds irregularRelative (10%) of their
 * magnitude, so that a significant but small variation still counts as a helix or an arc; "arc" when the tau band contains 0 (or torsion is not measurable); else "helix".
 * Means are weighted; bands are 2.5/97.5% quantiles of the per-replicate stretch means when the
 * profile keeps its replicates, else the mean half-band divided by sqrt(max(1, stretch/resolution)).
 * Degenerate input: n < 2 gives one stretch (or none for n = 0). Cost O(n) typical (PELT), O(n^2)
 * worst case.
 * @example segment(helixProfile).map((g) => g.kind) // ["helix"]
 */
export function segment(profile: Profile, options: SegmentOptions = {}): Segment[] {
  const n = profile.n;
  if (n === 0) return [];
  const { s, kappa, tau, flags } = profile;
  const res = profile.resolution > 0 ? profile.resolution : (s[n - 1] - s[0]) / Math.max(1, n - 1);
  const ds = n > 1 ? (s[n - 1] - s[0]) / (n - 1) : res;
  const rho = Math.min(1, ds / res);
  // weights from the bands, with a floor so that a zero-width band does not dominate
  const wk = new Float64Array(n), wt = new Float64Array(n), tv = new Float64Array(n);
  let kScale = 0;
  for (let i = 0; i < n; ++i) kScale = Math.max(kScale, Math.abs(kappa[i]));
  const floor = 1e-6 * (kScale || 1 / res);
  for (let i = 0; i < n; ++i) {
    const sk = Math.max(floor, (profile.kappaHi[i] - profile.kappaLo[i]) / 3.92);
    wk[i] = Number.isFinite(kappa[i]) ? 1 / (sk * sk) : 0;
    const defined = Number.isFinite(tau[i]) && !(flags[i] & (FLAG_TORSION_UNDEFINED | FLAG_TORSION_NOT_MEASURABLE));
    const st = Math.max(floor, (profile.tauHi[i] - profile.tauLo[i]) / 3.92);
    wt[i] = defined && Number.isFinite(st) ? 1 / (st * st) : 0;
    tv[i] = defined ? tau[i] : 0;
  }
  const kv = Float64Array.from(kappa, (x) => (Number.isFinite(x) ? x : 0));
  const prefix = (w: Float64Array, x: Float64Array) => {
    const a = new Float64Array(n + 1), b = new Float64Array(n + 1), c = new Float64Array(n + 1);
    for (let i = 0; i < n; ++i) {
      a[i + 1] = a[i] + w[i];
      b[i + 1] = b[i] + w[i] * x[i];
      c[i + 1] = c[i] + w[i] * x[i] * x[i];
    }
    return { a, b, c };
  };
  const K = prefix(wk, kv), Tt = prefix(wt, tv);
  const ss = (p: { a: Float64Array; b: Float64Array; c: Float64Array }, i0: number, i1: number): number => {
    const w = p.a[i1] - p.a[i0];
    if (w <= 0) return 0;
    const m = p.b[i1] - p.b[i0];
    return Math.max(0, p.c[i1] - p.c[i0] - (m * m) / w);
  };
  const cost = (i0: number, i1: number): number => rho * (ss(K, i0, i1) + ss(Tt, i0, i1));
  const length = s[n - 1] - s[0];
  const nEff = Math.max(2, length / res);
  const beta = (options.penaltyScale ?? 1) * 3 * Math.log(nEff);
  const minLen = Math.max(res, options.minLength ?? 0);
  const minSamples = Math.max(2, Math.floor(res / Math.max(ds, 1e-300)));
  // PELT (Killick et al. 2012): F(t) = min_{u in R} F(u) + C(u, t) + beta
  const F = new Float64Array(n + 1).fill(Infinity), last = new Int32Array(n + 1);
  F[0] = -beta;
  let cand: number[] = [0];
  for (let t = minSamples; t <= n; ++t) {
    let best = Infinity, arg = 0;
    for (const u of cand) {
      if (t - u < minSamples && !(t === n && u === 0)) continue;
      const v = F[u] + cost(u, t) + beta;
      if (v < best) { best = v; arg = u; }
    }
    if (best === Infinity) { best = F[0] + cost(0, t) + beta; arg = 0; }
    F[t] = best;
    last[t] = arg;
    cand = cand.filter((u) => t - u < minSamples || F[u] + cost(u, t) <= F[t]);
    if (t + 1 - minSamples >= 0 && F[t] < Infinity) cand.push(t);
  }
  const cuts: number[] = [n];
  for (let t = n; t > 0; ) {
    const u = last[t];
    cuts.push(u);
    t = u;
  }
  cuts.reverse();
  let bounds = cuts.filter((v, i, a) => i === 0 || v !== a[i - 1]);
  // merge stretches shorter than minLen into the neighbour whose merged cost rises least
  for (;;) {
    let worst = -1, worstLen = Infinity;
    for (let k = 0; k + 1 < bounds.length; ++k) {
      const len = s[Math.min(n - 1, bounds[k + 1] - 1)] - s[bounds[k]] + ds;
      if (len < minLen && len < worstLen && bounds.length > 2) { worst = k; worstLen = len; }
    }
    if (worst < 0) break;
    const k = worst;
    const leftGain = k > 0 ? cost(bounds[k - 1], bounds[k + 1]) - cost(bounds[k - 1], bounds[k]) - cost(bounds[k], bounds[k + 1]) : Infinity;
    const rightGain = k + 2 < bounds.length ? cost(bounds[k], bounds[k + 2]) - cost(bounds[k], bounds[k + 1]) - cost(bounds[k + 1], bounds[k + 2]) : Infinity;
    bounds.splice(leftGain <= rightGain ? k : k + 1, 1);
  }
  // after merging, neighbours may no longer justify their change point: join adjacent stretches
  // while the merged cost rises by less than the penalty (the criterion of the fit itself)
  for (;;) {
    let best = -1, bestRise = beta;
    for (let k = 0; k + 2 < bounds.length; ++k) {
      const rise = cost(bounds[k], bounds[k + 2]) - cost(bounds[k], bounds[k + 1]) - cost(bounds[k + 1], bounds[k + 2]);
      if (rise < bestRise) { best = k; bestRise = rise; }
    }
    if (best < 0) break;
    bounds.splice(best + 1, 1);
  }
  const out: Segment[] = [];
  const reps = profile.kappaSamples !== undefined && profile.replicates > 0 ? profile.replicates : 0;
  for (let k = 0; k + 1 < bounds.length; ++k) {
    const i0 = bounds[k], i1 = bounds[k + 1];
    const wK = K.a[i1] - K.a[i0], wT = Tt.a[i1] - Tt.a[i0];
    const km = wK > 0 ? (K.b[i1] - K.b[i0]) / wK : mean(kv, i0, i1);
    const tm = wT > 0 ? (Tt.b[i1] - Tt.b[i0]) / wT : NaN;
    const segLen = s[i1 - 1] - s[i0] + ds;
    const nSeg = Math.max(1, segLen / res);
    let kLo: number, kHi: number, tLo: number, tHi: number;
    if (reps > 0) {
      const km_r: number[] = [], tm_r: number[] = [];
      for (let r = 0; r < reps; ++r) {
        let a = 0, b = 0, c = 0, d = 0;
        for (let i = i0; i < i1; ++i) {
          const kr = profile.kappaSamples![r * n + i];
          if (Number.isFinite(kr)) { a += wk[i] * kr; b += wk[i]; }
          const tr = profile.tauSamples !== undefined ? profile.tauSamples[r * n + i] : NaN;
          if (Number.isFinite(tr) && wt[i] > 0) { c += wt[i] * tr; d += wt[i]; }
        }
        if (b > 0) km_r.push(a / b);
        if (d > 0) tm_r.push(c / d);
      }
      kLo = quantile(km_r, 0.025) ?? km; kHi = quantile(km_r, 0.975) ?? km;
      tLo = quantile(tm_r, 0.025) ?? NaN; tHi = quantile(tm_r, 0.975) ?? NaN;
    } else {
      let hk = 0, ht = 0, ct = 0;
      for (let i = i0; i < i1; ++i) {
        hk += 0.5 * (profile.kappaHi[i] - profile.kappaLo[i]);
        if (wt[i] > 0) { ht += 0.5 * (profile.tauHi[i] - profile.tauLo[i]); ct++; }
      }
      hk /= i1 - i0;
      const sq = Math.sqrt(nSeg);
      kLo = km - hk / sq; kHi = km + hk / sq;
      if (ct > 0) { ht /= ct; tLo = tm - ht / sq; tHi = tm + ht / sq; } else { tLo = NaN; tHi = NaN; }
    }
    // classification
    let undefinedCount = 0;
    for (let i = i0; i < i1; ++i) if (flags[i] & FLAG_TORSION_UNDEFINED) undefinedCount++;
    const chi2 = (ss(K, i0, i1) + ss(Tt, i0, i1)) * rho / Math.max(1, nSeg);
    // Practical size of the variation: RMS deviation of kappa and tau about their means, relative
    // to the stretch's |Darboux| = sqrt(kappa^2 + tau^2). A statistically significant but small
    // variation (a few %) still describes a helix or an arc to the model.
    // The samples within one resolution length of an open end (flag 4) carry the end's extra bias:
    // they do not count in the variation unless they are most of the stretch.
    let j0 = i0, j1 = i1;
    while (j0 < j1 && flags[j0] & FLAG_END) ++j0;
    while (j1 > j0 && flags[j1 - 1] & FLAG_END) --j1;
    if (j1 - j0 < 0.5 * (i1 - i0)) { j0 = i0; j1 = i1; }
    const rmsK = Math.sqrt(spread(kv, j0, j1)), rmsT = Math.sqrt(spreadWhere(tv, wt, j0, j1));
    const darboux = Math.hypot(km, Number.isFinite(tm) ? tm : 0);
    const relVar = darboux > 0 ? Math.hypot(rmsK, rmsT) / darboux : Infinity;
    let kind: SegmentKind;
    if (undefinedCount > 0.5 * (i1 - i0) || kHi - kLo >= km || km <= 0) kind = "straight";
    else if (chi2 > (options.irregularChi2 ?? 4) && relVar > (options.irregularRelative ?? 0.1)) kind = "irregular";
    else if (!Number.isFinite(tm) || profile.planarProjection || (tLo <= 0 && tHi >= 0)) kind = "arc";
    else kind = "helix";
    out.push({ s0: s[i0], s1: i1 < n ? s[i1] : s[n - 1], i0, i1, kind, kappa: km, kappaLo: kLo, kappaHi: kHi, tau: tm, tauLo: tLo, tauHi: tHi });
  }
  return out;
}

function mean(x: Float64Array, i0: number, i1: number): number {
  let a = 0;
  for (let i = i0; i < i1; ++i) a += x[i];
  return a / Math.max(1, i1 - i0);
}

/** Variance of x over [i0, i1). */
function spread(x: Float64Array, i0: number, i1: number): number {
  const m = mean(x, i0, i1);
  let a = 0;
  for (let i = i0; i < i1; ++i) a += (x[i] - m) ** 2;
  return a / Math.max(1, i1 - i0);
}

/** Variance of x over the samples of [i0, i1) with positive weight (0 when none). */
function spreadWhere(x: Float64Array, w: Float64Array, i0: number, i1: number): number {
  let a = 0, b = 0, c = 0;
  for (let i = i0; i < i1; ++i) if (w[i] > 0) { a += x[i]; b += x[i] * x[i]; ++c; }
  return c > 1 ? Math.max(0, b / c - (a / c) ** 2) : 0;
}
