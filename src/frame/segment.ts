import { quantile } from "d3-array";
import { FLAG_END, FLAG_TORSION_NOT_MEASURABLE, FLAG_TORSION_UNDEFINED, type Feature, type Profile, type ProfileKink, type Segment, type SegmentKind, type StretchShape, type Trace } from "../types.js";
import { curvaturePeaks, findFeatures, type CurvaturePeak } from "./features.js";
import { checkFit, fitCircle, fitHelix, fitLine, type FitCheck, type PrimitiveFit } from "./primitives.js";

/** Weight of an end sample (flag 4) in the change-point cost and the stretch means, relative to 1. */
const END_WEIGHT = 0.01;

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
  /**
   * The input points of the samples, interleaved (3n, m), e.g. from `samplePoints`: each stretch is
   * then refitted by its primitive (line, circle, helix) on them, and local bends get a circle fit.
   */
  readonly points?: Float64Array;
  /** Height of a curvature peak above its surroundings, in noise SDs of kappa, that makes a bend (default 6). */
  readonly bendSigmas?: number;
  /** Smallest turning angle of a bend (rad, default 5 degrees). */
  readonly bendMinAngle?: number;
  /**
   * An irregular stretch joins a regular neighbour when the neighbour's primitive fitted to both
   * keeps its RMS residual within this factor of the neighbour's own (default 1.25).
   */
  readonly absorbRatio?: number;
  /** Noise SD per coordinate of the points (m) for the shape test (default: the profile's sigma). */
  readonly pointNoise?: number;
}

/**
 * Split a profile into stretches (see `segmentWire`); the stretches only.
 * @example segment(helixProfile).map((g) => g.kind) // ["helix"]
 */
export function segment(profile: Profile, options: SegmentOptions = {}): Segment[] {
  return segmentWire(profile, options).segments;
}

/**
 * Robust noise SD of a sampled series from second differences at a lag of about one correlation
 * length: sd = 1.4826 MAD(x[i+l] - 2 x[i] + x[i-l]) / sqrt(6) (a difference-based estimate in the
 * spirit of Rice, Ann. Stat. 12, 1215 (1984), with the MAD for robustness to jumps; from memory).
 * Samples with use[i] = 0 are skipped. NaN when fewer than 5 differences.
 */
export function seriesNoise(x: ArrayLike<number>, use: ArrayLike<number>, lag: number): number {
  const d: number[] = [];
  for (let i = lag; i + lag < x.length; ++i) {
    if (!use[i] || !use[i - lag] || !use[i + lag]) continue;
    const v = x[i + lag] - 2 * x[i] + x[i - lag];
    if (Number.isFinite(v)) d.push(v);
  }
  if (d.length < 5) return NaN;
  const med = quantile(d, 0.5)!;
  const mad = quantile(d.map((v) => Math.abs(v - med)), 0.5)!;
  return (1.4826 * mad) / Math.sqrt(6);
}

/**
 * The input point of each sample of a profile, interleaved (3n, m), matched through the input rows
 * (`Profile.inputRow` against `Trace.rows`, else 1-based positions). null when the profile was
 * resampled (no one-to-one input point) or a row is missing.
 */
export function samplePoints(trace: Trace, profile: Profile): Float64Array | null {
  const rows = profile.inputRow;
  if (rows === undefined) return null;
  const n = trace.xyz.length / 3;
  const index = new Map<number, number>();
  for (let i = 0; i < n; ++i) index.set(trace.rows !== undefined ? trace.rows[i] : i + 1, i);
  const out = new Float64Array(3 * profile.n);
  for (let j = 0; j < profile.n; ++j) {
    const i = index.get(rows[j]);
    if (i === undefined) return null;
    out[3 * j] = trace.xyz[3 * i]; out[3 * j + 1] = trace.xyz[3 * i + 1]; out[3 * j + 2] = trace.xyz[3 * i + 2];
  }
  return out;
}

/**
 * Split a profile into stretches of near-constant (kappa, tau) by a penalised change-point fit,
 * refit each stretch by its exact primitive when the input points are given, and name the
 * features (bends, kinks, coil defects, ends).
 *
 * Change points: exact optimal partitioning with PELT pruning (Jackson et al., IEEE Signal Process.
 * Lett. 12, 105 (2005); Killick, Fearnhead & Eckley, JASA 107, 1590 (2012); both cited from memory).
 * Cost of a stretch: the sum of squares of kappa and tau about their means over their noise
 * variances, times ds/resolution (neighbouring samples of a smoothing fit are correlated over about
 * one resolution length); undefined torsion has weight 0. The noise SDs come from the profile
 * itself (`seriesNoise` at a lag of one resolution length for kappa, of the torsion resolution
 * (resolution x (lambdaTorsion / lambda)^(1/6), the half-power wavelength law of a third-derivative
 * penalty) for tau), never from the bootstrap bands: the stretches and their labels are the same
 * with or without bands. Floor: 1e-3 of the median |kappa|. Penalty 3 ln(n_eff) per change
 * (BIC-like), n_eff = length / resolution. Stretches shorter than max(resolution, minLength) are
 * merged into the neighbour whose merged cost rises least, then adjacent stretches whose merged cost
 * rises by less than the penalty are joined.
 * Closed wires: the cut partition pays one more change point (the seam); the whole wire as one
 * stretch competes with it, so a near-constant ring is one stretch (`wholeRing`), not two cut at
 * the start point.
 * Bends: a curvature peak above `bendSigmas` noise SDs over a running median (`curvaturePeaks`),
 * narrower than 2.5 resolution lengths at half height and turning by at least `bendMinAngle`, becomes
 * a stretch of its own (its half-height region, so it is never inside "straight") and a named
 * feature (`findFeatures`). Not within one resolution length of an open end.
 * Labels (from the noise SDs, so independent of the bootstrap): "straight" when most samples have
 * undefined torsion or the 95% band of the mean kappa reaches 0; "irregular" when the reduced
 * chi-square exceeds irregularChi2 and the RMS variation of (kappa, tau) exceeds irregularRelative of
 * their magnitude; "arc" when the band of tau contains 0 (or torsion is not measurable); else "helix".
 * Then, with points: straight -> line, arc -> circle, helix -> helix, fitted to the stretch's
 * input points and tested against the noise (`checkFit`); a rejected shape demotes the stretch to
 * "irregular" with the reason in `demoted`; a confirmed (or untested) circle or helix gives the
 * stretch its kappa and tau with their intervals.
 * Reported bands without a shape: 2.5/97.5% quantiles of the per-replicate stretch means when the
 * profile keeps its replicates, else the profile's mean half-band over sqrt(n_eff), else (no
 * bands) the noise-SD band of the mean. The labels use the noise-SD bands only.
 * Degenerate input: n < 2 gives one stretch (or none for n = 0). Cost O(n) typical (PELT), O(n^2)
 * worst case, plus the primitive fits (O(n) per iteration).
 * @example segmentWire(meanderProfile, { points }).features.map((f) => f.kind) // ["end", "bend", "end"]
 */
export function segmentWire(profile: Profile, options: SegmentOptions = {}): { segments: Segment[]; features: Feature[] } {
  const n = profile.n;
  if (n === 0) return { segments: [], features: [] };
  const { s, kappa, tau, flags } = profile;
  const res = profile.resolution > 0 ? profile.resolution : (s[n - 1] - s[0]) / Math.max(1, n - 1);
  const ds = n > 1 ? (s[n - 1] - s[0]) / (n - 1) : res;
  const rho = Math.min(1, ds / res);
  const kv = Float64Array.from(kappa, (x) => (Number.isFinite(x) ? x : 0));
  const defined = Uint8Array.from({ length: n }, (_, i) => (Number.isFinite(tau[i]) && !(flags[i] & (FLAG_TORSION_UNDEFINED | FLAG_TORSION_NOT_MEASURABLE)) ? 1 : 0));
  const tv = Float64Array.from(tau, (t, i) => (defined[i] ? t : 0));
  // Samples near a kink found in the points (the fit is hinged there: its curvature is the hinge's
  // shape, not the wire's) count like end samples: barely in the stretch means, not in their
  // spread, and each kink is a change point (an arc of radius 200 nm with a 60 degree kink had been
  // cut into arc, a 180 nm "irregular" stretch around the kink, and arc).
  const kinks = profile.kinks ?? [];
  const zone = kinkZoneMask(s, kinks, profile.length, profile.closed);
  const edge = (i: number) => (flags[i] & FLAG_END) !== 0 || zone[i] === 1;
  const sigmaK = noiseSd(kv, Uint8Array.from(kappa, (k, i) => (Number.isFinite(k) && !edge(i) ? 1 : 0)), res, ds, kv);
  const resT = profile.lambdaTorsion > 0 && profile.lambda > 0 ? res * Math.max(1, (profile.lambdaTorsion / profile.lambda) ** (1 / 6)) : res;
  const sigmaT = noiseSd(tv, Uint8Array.from(defined, (d, i) => (d && !edge(i) ? 1 : 0)), resT, ds, kv);
  // End samples (flag 4) carry the fit's end bias, not the wire's shape: at 1% of the weight they
  // cannot open a stretch of their own but still give an all-end stretch its mean. At full weight
  // the near-interpolated ends of sparse helices (curvature +11%, +6% at the third and fourth
  // points) cut ideal 20-60-atom helices into 3-7 stretches.
  const wk = Float64Array.from(kappa, (k, i) => (Number.isFinite(k) ? (edge(i) ? END_WEIGHT : 1) / (sigmaK * sigmaK) : 0));
  const wt = Float64Array.from(defined, (d, i) => (d ? (edge(i) ? END_WEIGHT : 1) / (sigmaT * sigmaT) : 0));
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
  // Change points on a grid of 1/8 of the shortest stretch (at least every sample): far finer than
  // the resolution, and PELT's pruning is weak on homogeneous data (O(n^2)), so this keeps dense
  // wires fast (20000 samples, 800 per resolution length: 13 s -> well under 1 s).
  const stride = Math.max(1, Math.floor(minSamples / 8));
  for (let t = Math.ceil(minSamples / stride) * stride; t <= n; t = t === n ? n + 1 : Math.min(n, t + stride)) {
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
  // closed wire: k stretches on a ring have k change points (the seam is one); the whole ring as
  // one stretch has none
  if (profile.closed && bounds.length > 2) {
    let cut = 0;
    for (let k = 0; k + 1 < bounds.length; ++k) cut += cost(bounds[k], bounds[k + 1]);
    // ...and a near-constant ring (RMS variation of kappa, tau within irregularRelative of their
    // magnitude, the practical rule of the labels) is one stretch even when the variation is significant
    // (curvature only: an out-of-plane warp makes torsion swing about 0 and is named as a feature)
    const km = mean(kv, 0, n), rv = Math.sqrt(spread(kv, 0, n)) / km;
    if (cost(0, n) <= cut + (bounds.length - 1) * beta || rv <= (options.irregularRelative ?? 0.1)) bounds = [0, n];
  }
  // each kink is a change point, and no other lies in its zone
  const kinkAt = kinkIndices(s, kinks);
  if (kinkAt.length > 0) bounds = [...new Set([...bounds.filter((b) => b === 0 || b === n || zone[b] === 0), ...kinkAt])].sort((a, b) => a - b);
  const isKinkBound = (b: number) => kinkAt.includes(b);
  // local bends become stretches of their own
  // (not within one resolution length of an open end, where the fit's curvature is biased, nor
  // at a kink: a feature, not a stretch)
  const peaks = curvaturePeaks(s, kv, bounds, sigmaK, res, options.bendSigmas ?? 6, options.bendMinAngle ?? (5 * Math.PI) / 180).filter((p) => !edge(p.ipeak));
  if (peaks.length > 0) {
    bounds = splitAtPeaks(bounds, peaks, minSamples);
    const peakAt = (k: number) => peaks.some((p) => bounds[k] <= p.ipeak && p.ipeak < bounds[k + 1]);
    // a flank left between a bend and a change point (shorter than 2 minLen: the smoothed bend's
    // shoulders reach about one resolution length out) joins its other neighbour
    for (let k = 0; k + 1 < bounds.length; ++k) {
      if (peakAt(k) || s[Math.min(n - 1, bounds[k + 1] - 1)] - s[bounds[k]] + ds >= 2 * minLen) continue;
      if (k > 0 && peakAt(k - 1) && k + 2 < bounds.length && !peakAt(k + 1) && !isKinkBound(bounds[k + 1])) { bounds.splice(k + 1, 1); --k; }
      else if (k + 2 < bounds.length && peakAt(k + 1) && k > 0 && !peakAt(k - 1) && !isKinkBound(bounds[k])) { bounds.splice(k, 1); --k; }
    }
    // and neighbours that are not bends are joined again by the criterion of the fit
    for (;;) {
      let best = -1, bestRise = beta;
      for (let k = 0; k + 2 < bounds.length; ++k) {
        if (peakAt(k) || peakAt(k + 1) || isKinkBound(bounds[k + 1])) continue;
        const rise = cost(bounds[k], bounds[k + 2]) - cost(bounds[k], bounds[k + 1]) - cost(bounds[k + 1], bounds[k + 2]);
        if (rise < bestRise) { best = k; bestRise = rise; }
      }
      if (best < 0) break;
      bounds.splice(best + 1, 1);
    }
  }
  const isPeak = new Set<number>();
  for (let k = 0; k + 1 < bounds.length; ++k) if (peaks.some((p) => bounds[k] <= p.ipeak && p.ipeak < bounds[k + 1])) isPeak.add(bounds[k]);
  const points = options.points !== undefined && options.points.length === 3 * n ? options.points : null;
  const noise = options.pointNoise ?? profile.sigma;
  const out: Segment[] = [];
  const reps = profile.kappaSamples !== undefined && profile.replicates > 0 ? profile.replicates : 0;
  for (let k = 0; k + 1 < bounds.length; ++k) {
    const i0 = bounds[k], i1 = bounds[k + 1];
    const wK = K.a[i1] - K.a[i0], wT = Tt.a[i1] - Tt.a[i0];
    const km = wK > 0 ? (K.b[i1] - K.b[i0]) / wK : mean(kv, i0, i1);
    const tm = wT > 0 ? (Tt.b[i1] - Tt.b[i0]) / wT : NaN;
    const segLen = s[i1 - 1] - s[i0] + ds;
    const nSeg = Math.max(1, segLen / res);
    // bands of the means from the noise SDs (these decide the labels)
    const hk = (1.96 * sigmaK) / Math.sqrt(nSeg);
    const nT = Math.max(1, (defined.subarray(i0, i1).reduce((a, b) => a + b, 0) * ds) / resT);
    const ht = (1.96 * sigmaT) / Math.sqrt(nT);
    let kLo = Math.max(0, km - hk), kHi = km + hk, tLo = wT > 0 ? tm - ht : NaN, tHi = wT > 0 ? tm + ht : NaN;
    // classification
    let undefinedCount = 0;
    for (let i = i0; i < i1; ++i) if (flags[i] & FLAG_TORSION_UNDEFINED) undefinedCount++;
    const chi2 = ((ss(K, i0, i1) + ss(Tt, i0, i1)) * rho) / Math.max(1, nSeg);
    // Practical size of the variation: RMS deviation of kappa and tau about their means, relative
    // to the stretch's |Darboux| = sqrt(kappa^2 + tau^2). A statistically significant but small
    // variation (a few %) still describes a helix or an arc to the model.
    // The samples within one resolution length of an open end (flag 4) carry the end's extra bias:
    // they do not count in the variation unless fewer than 5 others are left (and they are most of
    // the stretch): counted whenever they were most of it, they made a clean 20-point DNA-like helix
    // (8 non-end samples) "irregular" in 4 draws of 6.
    let j0 = i0, j1 = i1;
    while (j0 < j1 && edge(j0)) ++j0;
    while (j1 > j0 && edge(j1 - 1)) --j1;
    if (j1 - j0 < Math.min(5, 0.5 * (i1 - i0))) { j0 = i0; j1 = i1; }
    const rmsK = Math.sqrt(spread(kv, j0, j1)), rmsT = Math.sqrt(spreadWhere(tv, wt, j0, j1));
    const darboux = Math.hypot(km, Number.isFinite(tm) ? tm : 0);
    const relVar = darboux > 0 ? Math.hypot(rmsK, rmsT) / darboux : Infinity;
    let kind: SegmentKind;
    if (bounds.length === 2 && profile.closed && !(undefinedCount > 0.5 * (i1 - i0) || kHi - kLo >= km || km <= 0) && rmsK <= (options.irregularRelative ?? 0.1) * km) kind = !Number.isFinite(tm) || profile.planarProjection || (tLo <= 0 && tHi >= 0) ? "arc" : "helix";
    else if (isPeak.has(i0)) kind = !Number.isFinite(tm) || profile.planarProjection || (tLo <= 0 && tHi >= 0) ? "arc" : "helix";
    else if (undefinedCount > 0.5 * (i1 - i0) || kHi - kLo >= km || km <= 0) kind = "straight";
    else if (chi2 > (options.irregularChi2 ?? 4) && relVar > (options.irregularRelative ?? 0.1)) kind = "irregular";
    else if (!Number.isFinite(tm) || profile.planarProjection || (tLo <= 0 && tHi >= 0)) kind = "arc";
    else kind = "helix";
    // reported bands: the replicates' stretch means when kept, else the profile's mean half-band
    // over sqrt(n_eff) when it has bands, else (no bootstrap) the noise-SD bands above
    let hkB = 0, htB = 0, ctB = 0, okB = true;
    for (let i = i0; i < i1; ++i) {
      const h = 0.5 * (profile.kappaHi[i] - profile.kappaLo[i]);
      if (!Number.isFinite(h)) { okB = false; break; }
      if (i < j0 || i >= j1) continue;
      hkB += h;
      if (defined[i]) { const q = 0.5 * (profile.tauHi[i] - profile.tauLo[i]); if (Number.isFinite(q)) { htB += q; ctB++; } }
    }
    if (reps === 0 && okB) {
      const sq = Math.sqrt(nSeg);
      hkB /= j1 - j0;
      kLo = Math.max(0, km - hkB / sq); kHi = km + hkB / sq;
      if (ctB > 0 && wT > 0) { htB /= ctB; tLo = tm - htB / sq; tHi = tm + htB / sq; }
    }
    if (reps > 0) {
      const km_r: number[] = [], tm_r: number[] = [];
      for (let r = 0; r < reps; ++r) {
        let a = 0, b = 0, c = 0, d = 0;
        for (let i = j0; i < j1; ++i) {
          const kr = profile.kappaSamples![r * n + i];
          if (Number.isFinite(kr)) { a += kr; b += 1; }
          const tr = profile.tauSamples !== undefined ? profile.tauSamples[r * n + i] : NaN;
          if (Number.isFinite(tr) && defined[i]) { c += tr; d += 1; }
        }
        if (b > 0) km_r.push(a / b);
        if (d > 0) tm_r.push(c / d);
      }
      kLo = Math.min(km, quantile(km_r, 0.025) ?? km); kHi = Math.max(km, quantile(km_r, 0.975) ?? km);
      if (tm_r.length > 0) { tLo = Math.min(tm, quantile(tm_r, 0.025)!); tHi = Math.max(tm, quantile(tm_r, 0.975)!); }
    }
    let g: { -readonly [P in keyof Segment]: Segment[P] } = { s0: s[i0], s1: i1 < n ? s[i1] : s[n - 1], i0, i1, kind, kappa: km, kappaLo: kLo, kappaHi: kHi, tau: tm, tauLo: tLo, tauHi: tHi };
    if (bounds.length === 2 && profile.closed) g.wholeRing = true;
    if (points !== null && kind !== "irregular") g = { ...g, ...shapeOf(points.subarray(3 * i0, 3 * i1), kind, noise, g) };
    out.push(g);
  }
  if (points !== null) absorbIrregular(out, points, noise, isPeak, options.absorbRatio ?? 1.25);
  const features = findFeatures(profile, out, peaks, { points, noise, tauNoise: sigmaT });
  return { segments: out, features };
}

/**
 * Irregular stretches whose points lie on a regular neighbour's primitive join it: the spline's
 * curvature is biased near open ends and on sparse traces, so a stretch can look irregular to the
 * change-point fit while its points sit on the neighbour's helix, circle or line. The union is
 * refitted; it is accepted when the fit is not rejected by `checkFit` and its RMS residual stays
 * within `ratio` of the neighbour's own. Likewise two neighbours of the same regular kind whose
 * union fits one primitive within `ratio` of the larger of their RMS residuals (a helix cut in two
 * by the spline's noise). Bends are never joined. In place; repeated until nothing joins.
 */
function absorbIrregular(out: Segment[], points: Float64Array, noise: number, isPeak: ReadonlySet<number>, ratio: number): void {
  for (let changed = true; changed; ) {
    changed = false;
    // two neighbours of the same regular kind whose union fits one primitive as well as each alone
    for (let k = 0; k + 1 < out.length && !changed; ++k) {
      const a = out[k], b = out[k + 1];
      if (a.kind !== b.kind || a.kind === "irregular" || a.shape === undefined || b.shape === undefined || isPeak.has(a.i0) || isPeak.has(b.i0)) continue;
      const joined = shapeOf(points.subarray(3 * a.i0, 3 * b.i1), a.kind, noise, a);
      const sh = joined.shape;
      if (sh === undefined || sh.verdict === "rejected" || joined.kind === "irregular" || !(sh.rms <= ratio * Math.max(a.shape.rms, b.shape.rms))) continue;
      out.splice(k, 2, { ...a, ...joined, i1: b.i1, s1: b.s1 });
      changed = true;
    }
    for (let k = 0; k < out.length && !changed; ++k) {
      const g = out[k];
      if (g.kind !== "irregular" || isPeak.has(g.i0)) continue;
      const options = [k - 1, k + 1].filter((j) => j >= 0 && j < out.length && out[j].kind !== "irregular" && out[j].shape !== undefined && !isPeak.has(out[j].i0));
      let best: { j: number; seg: Segment; rms: number } | null = null;
      for (const j of options) {
        const h = out[j];
        const i0 = Math.min(g.i0, h.i0), i1 = Math.max(g.i1, h.i1);
        const joined = shapeOf(points.subarray(3 * i0, 3 * i1), h.kind, noise, h);
        const sh = joined.shape;
        if (sh === undefined || sh.verdict === "rejected" || !(sh.rms <= ratio * h.shape!.rms)) continue;
        const seg: Segment = { ...h, ...joined, i0, i1, s0: Math.min(g.s0, h.s0), s1: Math.max(g.s1, h.s1) };
        if (best === null || sh.rms < best.rms) best = { j, seg, rms: sh.rms };
      }
      if (best !== null) {
        out.splice(Math.min(k, best.j), 2, best.seg);
        changed = true;
      }
    }
  }
}

/** Noise SD of a kappa or tau series at a lag of one correlation length, floored at 1e-3 of the median |kappa|. */
function noiseSd(x: Float64Array, use: Uint8Array, corr: number, ds: number, kv: Float64Array): number {
  const lag = Math.max(1, Math.round(corr / Math.max(ds, 1e-300)));
  let sd = seriesNoise(x, use, lag);
  if (!Number.isFinite(sd)) sd = seriesNoise(x, use, 1);
  // Too few non-end samples (a short trace): every finite sample, end samples included (their
  // bias only raises the scale). The floor alone cut ideal 14-atom sparse helices into 5-7 stretches.
  if (!Number.isFinite(sd)) sd = seriesNoise(x, Uint8Array.from(x, (v) => (Number.isFinite(v) ? 1 : 0)), 1);
  const medK = quantile(Array.from(kv, Math.abs), 0.5) ?? 0;
  const floor = Math.max(1e-3 * medK, 1e-300);
  return Number.isFinite(sd) ? Math.max(sd, floor) : floor;
}

/** 1 for the samples within a kink's zone (its s0..s1; on a ring also one length either way), else 0. */
function kinkZoneMask(s: Float64Array, kinks: readonly ProfileKink[], length: number, closed: boolean): Uint8Array {
  const n = s.length, out = new Uint8Array(n);
  const shifts = closed ? [0, -length, length] : [0];
  for (const k of kinks) {
    for (let i = 0; i < n; ++i) if (shifts.some((d) => s[i] + d >= k.s0 && s[i] + d <= k.s1)) out[i] = 1;
  }
  return out;
}

/** Sample index of each kink (the first sample at or beyond its s; not the ends), ascending. */
function kinkIndices(s: Float64Array, kinks: readonly ProfileKink[]): number[] {
  const n = s.length, out: number[] = [];
  for (const k of kinks) {
    let i = 0;
    while (i < n && s[i] < k.s) ++i;
    if (i > 0 && i < n) out.push(i);
  }
  return [...new Set(out)].sort((a, b) => a - b);
}

/** Insert the edges of each peak into the stretch bounds; a leftover shorter than minSamples joins the peak. */
function splitAtPeaks(bounds: number[], peaks: readonly CurvaturePeak[], minSamples: number): number[] {
  const set = new Set(bounds);
  for (const p of peaks) {
    // the stretch that holds the peak
    let k = 0;
    while (k + 2 < bounds.length && bounds[k + 1] <= p.ipeak) ++k;
    const a = bounds[k], b = bounds[k + 1];
    const lo = p.h0 - a < minSamples ? a : p.h0, hi = b - p.h1 < minSamples ? b : p.h1;
    set.add(lo); set.add(hi);
  }
  return [...set].sort((x, y) => x - y);
}

/** The primitive of a stretch's kind fitted to its points and tested against the noise. */
function shapeOf(pts: Float64Array, kind: SegmentKind, noise: number, g: Segment): Partial<Segment> {
  const m = pts.length / 3;
  let fit: PrimitiveFit;
  try {
    if (kind === "straight") { if (m < 3) return {}; fit = fitLine(pts); }
    else if (kind === "arc") { if (m < 4) return {}; fit = fitCircle(pts); }
    else { if (m < 6) return {}; fit = fitHelix(pts); }
  } catch {
    return {};
  }
  const check: FitCheck = checkFit(fit, noise);
  const shape: StretchShape = {
    primitive: fit.kind, points: m, radius: fit.radius, pitch: fit.pitch, handedness: fit.handedness, kappa: fit.kappa, tau: fit.tau,
    axis: fit.axis, centre: fit.centre, rms: fit.rms, verdict: check.verdict, reason: check.reason,
  };
  if (check.verdict === "rejected") return { shape, kind: "irregular", demoted: check.reason };
  if (fit.kind === "line") return { shape };
  return {
    shape, kappa: fit.kappa.value, kappaLo: Math.min(fit.kappa.lo, fit.kappa.value), kappaHi: Math.max(fit.kappa.hi, fit.kappa.value),
    tau: fit.kind === "circle" && !Number.isFinite(g.tau) ? NaN : fit.tau.value,
    tauLo: fit.kind === "circle" && !Number.isFinite(g.tau) ? NaN : fit.tau.lo, tauHi: fit.kind === "circle" && !Number.isFinite(g.tau) ? NaN : fit.tau.hi,
  };
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
