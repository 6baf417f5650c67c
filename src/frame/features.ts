/**
 * Named features of a wire: local bends and kinks (curvature peaks), pitch and radius defects in
 * coils, and the ends. Plain data, each linked to the stretches around it. Lengths in m, angles in
 * rad, curvature in 1/m.
 */
import { quantile } from "d3-array";
import type { Feature, Interval, Profile, Segment } from "../types.js";
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
  const base = new Float64Array(n);
  const half = 2.5 * resolution;
  for (let i = 0, lo = 0, hi = 0; i < n; ++i) {
    while (s[lo] < s[i] - half) ++lo;
    while (hi < n && s[hi] <= s[i] + half) ++hi;
    base[i] = quantile(Array.from(kappa.subarray(lo, hi)), 0.5) ?? kappa[i];
  }
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
    if (width < 2.5 * resolution && width < 0.5 * (s[n - 1] - s[0]) && turning >= minAngle) out.push({ i0, i1, ipeak: ip, h0, h1, excess: h, base: base[ip] });
    i = j;
  }
  return out;
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
 *   (support), turning angle (integral of kappa over the support minus the stretch's median
 *   times the support's length, for a planar bend the angle between the tangents before and after),
 *   minimum radius 1/max kappa of the fit (an upper bound of the true minimum radius: smoothing
 *   flattens peaks), and the radius of a circle fitted to the input points of the half-height
 *   region when it holds at least 5 points;
 * - "kink": the same but no wider than 1.5 resolution lengths: the curvature is a lower bound;
 * - "pitch-defect" / "radius-defect": a helix stretch between two helix stretches whose pitch
 *   (2 pi tau / (kappa^2 + tau^2)) or radius (kappa / (kappa^2 + tau^2)), from the primitive when
 *   present, differs from both neighbours by more than `defectRelative`;
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
  for (const p of peaks) {
    let turning = 0;
    for (let i = p.i0; i + 1 < p.i1; ++i) turning += 0.5 * (kappa[i] + kappa[i + 1] - 2 * p.base) * (s[i + 1] - s[i]);
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
  const rel = options.defectRelative ?? 0.1;
  const geom = (g: Segment) => {
    const k = g.shape !== undefined ? g.shape.kappa.value : g.kappa, t = g.shape !== undefined ? g.shape.tau.value : g.tau;
    const q = k * k + t * t;
    return { radius: k / q, pitch: (2 * Math.PI * Math.abs(t)) / q };
  };
  for (let k = 1; k + 1 < segments.length; ++k) {
    const [a, g, b] = [segments[k - 1], segments[k], segments[k + 1]];
    if (a.kind !== "helix" || g.kind !== "helix" || b.kind !== "helix") continue;
    const ga = geom(a), gg = geom(g), gb = geom(b);
    for (const key of ["pitch", "radius"] as const) {
      const ra = gg[key] / ga[key], rb = gg[key] / gb[key];
      if (Math.abs(ra - 1) > rel && Math.abs(rb - 1) > rel && Math.sign(ra - 1) === Math.sign(rb - 1)) {
        const ratio = (2 * gg[key]) / (ga[key] + gb[key]);
        out.push({ kind: key === "pitch" ? "pitch-defect" : "radius-defect", s: 0.5 * (g.s0 + g.s1), s0: g.s0, s1: g.s1, before: k - 1, after: k + 1, within: k, ratio, note: `${key} ${ratio.toFixed(2)} x its neighbours'` });
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
