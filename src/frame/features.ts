/**
 * Named features of a wire: local bends and kinks (curvature peaks), pitch and radius defects in
 * coils, and the ends. Plain data, each linked to the stretches around it. Lengths in m, angles in
 * rad, curvature in 1/m.
 */
import { quantile } from "d3-array";
import type { Feature, Interval, Profile, ProfileKink, Segment } from "../types.js";
import { checkFit, fitCircle } from "./primitives.js";

/** A curvature peak: support [i0, i1) (excess above 10% of the peak height), peak sample, half-height width. */
export interface CurvaturePeak {
  readonly i0: number;
  readonly i1: number;
  readonly ipeak: number;
  /** Samples above half the peak's excess: [h0, h1). */
  readonly h0: number;
  readonly h1: number;
  /** Height above the stretch's median curvature (1/m). */
  readonly excess: number;
  /** Median curvature of the stretch that holds the peak (1/m). */
  readonly base: number;
  /** Noise standard deviation of the curvature the peak was found against (1/m). */
  readonly noise: number;
}

/**
 * Local curvature peaks: runs of samples whose kappa exceeds a running median over +-2.5
 * resolution lengths (the baseline: a peak narrower than half the window does not move it) by more
 * than `sigmas` noise SDs; kept when the half-height width is under 2.5 resolution lengths and
 * under half the wire. The support extends to where the excess falls below 10% of the peak height
 * (or 2 noise SDs) while it keeps falling, and the peak must turn the wire by at least `minAngle`
 * (default 5 degrees: the side lobes of a smoothed sharp bend turn it by 1-2). Common practice (peak finding above a robust baseline); thresholds chosen here.
 * `bounds` is unused by the search (kept for the caller's stretch bookkeeping).
 * @example curvaturePeaks(s, kappa, [0, n], sdKappa, resolution, 6)
 */
export function curvaturePeaks(s: Float64Array, kappa: Float64Array, _bounds: readonly number[], sigmaK: number, resolution: number, sigmas: number, minAngle = (5 * Math.PI) / 180): CurvaturePeak[] {
  const out: CurvaturePeak[] = [];
  const n = kappa.length;
  if (n < 5) return out;
  const base = runningMedian(s, kappa, 2.5 * resolution);
  const ex = (i: number) => kappa[i] - base[i];
  for (let i = 0; i < n; ) {
    if (ex(i) <= sigmas * sigmaK) { ++i; continue; }
    let j = i;
    while (j < n && ex(j) > sigmas * sigmaK) ++j;
    let ip = i;
    for (let q = i; q < j; ++q) if (ex(q) > ex(ip)) ip = q;
    const h = ex(ip);
    let h0 = ip, h1 = ip + 1;
    while (h0 > 0 && ex(h0 - 1) > h / 2) --h0;
    while (h1 < n && ex(h1) > h / 2) ++h1;
    const cut = Math.max(0.1 * h, 2 * sigmaK);
    let i0 = h0, i1 = h1;
    // (descending only: the support stops at a local minimum, so a side lobe never swallows a peak)
    while (i0 > 0 && ex(i0 - 1) > cut && ex(i0 - 1) <= ex(i0)) --i0;
    while (i1 < n && ex(i1) > cut && ex(i1) <= ex(i1 - 1)) ++i1;
    const width = s[h1 - 1] - s[h0];
    let turning = 0;
    for (let q = i0; q + 1 < i1; ++q) turning += 0.5 * (ex(q) + ex(q + 1)) * (s[q + 1] - s[q]);
    if (width < 2.5 * resolution && width < 0.5 * (s[n - 1] - s[0]) && turning >= minAngle) out.push({ i0, i1, ipeak: ip, h0, h1, excess: h, base: base[ip], noise: sigmaK });
    i = j;
  }
  return out;
}

/**
 * Median of y over |s - s_i| <= half at each sample. Computed exactly at every step-th sample
 * (step: 1/32 of the window's samples, at least 1) and linearly interpolated between them, so the
 * cost is O(n log w) however many samples the window holds.
 */
function runningMedian(s: Float64Array, y: Float64Array, half: number): Float64Array {
  const n = y.length, out = new Float64Array(n);
  const ds = n > 1 ? (s[n - 1] - s[0]) / (n - 1) : 1;
  const step = Math.max(1, Math.floor((2 * half) / Math.max(ds, 1e-300) / 32));
  const at: number[] = [];
  for (let i = 0; i < n; i += step) at.push(i);
  if (at[at.length - 1] !== n - 1) at.push(n - 1);
  const vals = new Float64Array(at.length);
  for (let q = 0, lo = 0, hi = 0; q < at.length; ++q) {
    const i = at[q];
    while (s[lo] < s[i] - half) ++lo;
    while (hi < n && s[hi] <= s[i] + half) ++hi;
    vals[q] = quantile(y.subarray(lo, hi), 0.5) ?? y[i];
  }
  for (let q = 0; q + 1 < at.length; ++q) {
    const a = at[q], b = at[q + 1];
    for (let i = a; i <= b; ++i) out[i] = vals[q] + ((vals[q + 1] - vals[q]) * (i - a)) / Math.max(1, b - a);
  }
  if (at.length === 1) out[0] = vals[0];
  return out;
}

/** The feature of a kink found in the points, over [s0, s1], the fit's curvature there peaking at `peak`. */
function pointKink(k: ProfileKink, s0: number, s1: number, peak: number, w: number, count: number): Feature {
  const deg = (k.angle * 180) / Math.PI;
  return {
    kind: "kink", s: k.s, s0, s1, before: w - 1, after: w + 1 < count ? w + 1 : -1, within: w,
    turningAngle: k.angle, minRadius: 1 / peak, lowerBound: true,
    note: `kink turning ${deg.toFixed(0)} deg at input row ${k.inputRow} (a turn within a few points, measured on the points; the fit bends freely there and its curvature is a lower bound)`,
  };
}

/** Options of `findFeatures`. */
export interface FeatureOptions {
  /** Input points of the samples (3n, m), for the circle fit of a bend. */
  readonly points?: Float64Array | null;
  /** Noise SD per coordinate of the points (m), for the fit test. */
  readonly noise?: number;
  /** Noise SD of the torsion samples (1/m), for the warp of a ring. */
  readonly tauNoise?: number;
  /** Relative change of pitch or radius that makes a coil defect (default 0.1). */
  readonly defectRelative?: number;
}

/**
 * Named features from the stretches and the curvature peaks:
 * - "bend": a peak wider than 1.5 resolution lengths at half height: position (the peak), extent
 *   (support), turning angle (on a straight wire, whose running-median curvature is within 6 noise
 *   SDs of zero: the angle between the tangents one resolution length before and after the support;
 *   on a curved one: the integral of kappa above its running median over the support),
 *   minimum radius 1/max kappa of the fit (an upper bound of the true minimum radius: smoothing
 *   flattens peaks), and the radius of a circle fitted to the input points of the half-height
 *   region when it holds at least 5 points;
 * - "kink": the same but no wider than 1.5 resolution lengths: the curvature is a lower bound;
 * - "pitch-defect" / "radius-defect": a run of adjacent helix stretches whose pitch
 *   (2 pi tau / (kappa^2 + tau^2)) or radius (kappa / (kappa^2 + tau^2)), from the primitive when
 *   present, departs in the same direction from the length-weighted median of all helix stretches
 *   by more than `defectRelative`; `ratio` is the largest departure, `within` its stretch;
 * - "end": each end of an open wire.
 * `within` is the stretch that holds the feature (a bend's own stretch), `before`/`after` its neighbours.
 */
export function findFeatures(profile: Profile, segments: readonly Segment[], peaks: readonly CurvaturePeak[], options: FeatureOptions = {}): Feature[] {
  const out: Feature[] = [];
  const n = profile.n;
  if (n === 0 || segments.length === 0) return out;
  const { s, kappa } = profile;
  const res = profile.resolution;
  const stretchOf = (i: number) => segments.findIndex((g) => g.i0 <= i && i < g.i1);
  if (!profile.closed) out.push({ kind: "end", s: s[0], s0: s[0], s1: s[0], before: -1, after: 0, within: 0, note: "start of the wire" });
  // Kinks found in the points (the fit was hinged there): their angle is the turn between the
  // tangents either side, measured on the points; the fit's curvature peak there is the hinge's
  // shape (on an arc of radius 200 nm with a 60 degree kink its excess integrated to 104 degrees).
  const kinks = profile.kinks ?? [];
  const claimed = new Uint8Array(kinks.length);
  const kinkFeatures: Feature[] = [];
  for (const p of peaks) {
    // One resolution length outside the support each side: the tails there sink into the noise and
    // the support misses them (84-87 deg for a 90 deg bend at 1% noise).
    let a = p.i0, b = Math.min(n - 1, Math.max(p.i0, p.i1 - 1));
    const sa = s[a] - res, sb = s[b] + res;
    while (a > 0 && s[a - 1] >= sa) --a;
    while (b < n - 1 && s[b + 1] <= sb) ++b;
    const k = kinks.findIndex((q) => q.s >= s[p.i0] - res && q.s <= s[Math.min(n - 1, p.i1)] + res);
    if (k >= 0) {
      if (!claimed[k]) kinkFeatures.push(pointKink(kinks[k], s[p.i0], s[Math.min(n - 1, p.i1)], kappa[p.ipeak], stretchOf(p.ipeak), segments.length));
      claimed[k] = 1;
      continue;
    }
    let turning = 0;
    if (p.base <= 6 * p.noise) {
      // Straight around the peak (its base curvature is noise): the angle between the tangents.
      const T = profile.T;
      const dot = T[3 * a] * T[3 * b] + T[3 * a + 1] * T[3 * b + 1] + T[3 * a + 2] * T[3 * b + 2];
      turning = Math.acos(Math.min(1, Math.max(-1, dot)));
    } else {
      // On a curved wire: the excess over the running median, integrated over the support.
      for (let i = p.i0; i + 1 < p.i1; ++i) turning += 0.5 * (kappa[i] + kappa[i + 1] - 2 * p.base) * (s[i + 1] - s[i]);
    }
    const width = s[p.h1 - 1] - s[p.h0];
    const w = stretchOf(p.ipeak);
    let radius: Interval | undefined;
    const pts = options.points;
    if (pts !== null && pts !== undefined && p.h1 - p.h0 >= 5) {
      try {
        const fit = fitCircle(pts.subarray(3 * p.h0, 3 * p.h1));
        if (checkFit(fit, options.noise ?? NaN).verdict !== "rejected") radius = fit.radius;
      } catch { /* collinear: no radius */ }
    }
    // narrower than the resolution and no circle through the points: the curvature is a lower bound
    const kink = width <= 1.5 * res && radius === undefined;
    const f: { -readonly [K in keyof Feature]: Feature[K] } = {
      kind: kink ? "kink" : "bend", s: s[p.ipeak], s0: s[p.i0], s1: s[Math.min(n - 1, p.i1)], before: w - 1, after: w + 1 < segments.length ? w + 1 : -1, within: w,
      turningAngle: turning, minRadius: 1 / kappa[p.ipeak],
      note: "",
    };
    if (kink) f.lowerBound = true;
    if (radius !== undefined) f.radius = radius;
    const deg = (turning * 180) / Math.PI;
    f.note = `${f.kind} turning ${deg.toFixed(0)} deg${f.radius !== undefined ? ", radius from a circle through its points" : ""}${kink ? " (narrower than the resolution: the curvature is a lower bound)" : ""}`;
    out.push(f);
  }
  for (let k = 0; k < kinks.length; ++k) {
    if (claimed[k]) continue;
    let i = 0;
    while (i + 1 < n && s[i + 1] <= kinks[k].s) ++i;
    kinkFeatures.push(pointKink(kinks[k], kinks[k].s, kinks[k].s, kappa[i], stretchOf(i), segments.length));
  }
  out.push(...kinkFeatures);
  const rel = options.defectRelative ?? 0.1;
  const geom = (g: Segment) => {
    const k = g.shape !== undefined ? g.shape.kappa.value : g.kappa, t = g.shape !== undefined ? g.shape.tau.value : g.tau;
    const q = k * k + t * t;
    return { radius: k / q, pitch: (2 * Math.PI * Math.abs(t)) / q };
  };
  // coil defects: runs of helix stretches whose pitch (or radius) departs from the coil's
  // length-weighted median by more than `rel`, in the same direction
  const helices = segments.map((g, k) => ({ g, k })).filter((x) => x.g.kind === "helix");
  if (helices.length >= 2) {
    for (const key of ["pitch", "radius"] as const) {
      const vals = helices.map((x) => ({ k: x.k, v: geom(x.g)[key], w: x.g.s1 - x.g.s0 })).filter((x) => Number.isFinite(x.v) && x.v > 0);
      if (vals.length < 2) continue;
      const sorted = [...vals].sort((x, y) => x.v - y.v);
      const total = sorted.reduce((acc, x) => acc + x.w, 0);
      let acc = 0, ref = sorted[0].v;
      for (const x of sorted) { acc += x.w; if (acc >= total / 2) { ref = x.v; break; } }
      for (let q = 0; q < vals.length; ) {
        const dir = Math.sign(vals[q].v / ref - 1);
        if (Math.abs(vals[q].v / ref - 1) <= rel) { ++q; continue; }
        let r = q;
        while (r + 1 < vals.length && vals[r + 1].k === vals[r].k + 1 && Math.abs(vals[r + 1].v / ref - 1) > rel && Math.sign(vals[r + 1].v / ref - 1) === dir) ++r;
        let ext = q;
        for (let j = q; j <= r; ++j) if (Math.abs(vals[j].v / ref - 1) > Math.abs(vals[ext].v / ref - 1)) ext = j;
        const first = segments[vals[q].k], lastSeg = segments[vals[r].k], peak = segments[vals[ext].k];
        const ratio = vals[ext].v / ref;
        out.push({
          kind: key === "pitch" ? "pitch-defect" : "radius-defect", s: 0.5 * (peak.s0 + peak.s1), s0: first.s0, s1: lastSeg.s1,
          before: vals[q].k - 1, after: vals[r].k + 1 < segments.length ? vals[r].k + 1 : -1, within: vals[ext].k, ratio,
          note: `${key} ${ratio.toFixed(2)} x the coil's (length-weighted median of its helix stretches)`,
        });
        q = r + 1;
      }
    }
  }
  // a whole closed arc whose torsion swings about 0 well above its noise: out of plane (a warp)
  if (segments.length === 1 && segments[0].wholeRing === true && segments[0].kind === "arc") {
    let a = 0, c = 0;
    for (let i = 0; i < n; ++i) if (Number.isFinite(profile.tau[i])) { a += profile.tau[i] ** 2; ++c; }
    const rmsT = c > 0 ? Math.sqrt(a / c) : 0;
    if (rmsT > 3 * (options.tauNoise ?? Infinity)) out.push({ kind: "warp", s: 0, s0: s[0], s1: s[n - 1], before: -1, after: -1, within: 0, rmsTorsion: rmsT, note: `closed arc out of plane: torsion swings about 0 (RMS ${(rmsT / (options.tauNoise ?? Infinity)).toFixed(0)} x its noise)` });
  }
  if (!profile.closed) out.push({ kind: "end", s: s[n - 1], s0: s[n - 1], s1: s[n - 1], before: segments.length - 1, after: -1, within: segments.length - 1, note: "end of the wire" });
  return out.sort((x, y) => x.s - y.s);
}
