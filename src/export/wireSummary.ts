import { quantile } from "d3-array";
import { PER_METRE, type LengthUnit, type Profile } from "../types.js";
import type { Analysis } from "./analyzeTrace.js";
import type { ModelDocument } from "./modelDocument.js";

/** A statistic with its 95% bootstrap interval (NaN where undefined). */
export interface Banded {
  readonly value: number;
  readonly lo: number;
  readonly hi: number;
}

/** One wire's line in summary.csv; lengths in `unit`, kappa and tau in 1/unit. */
export interface WireSummary {
  readonly unit: LengthUnit;
  readonly points: number;
  readonly length: number;
  readonly closed: boolean;
  readonly resolution: number;
  readonly kappaMean: Banded;
  readonly kappaMax: Banded;
  readonly tauMean: Banded;
  /** Arc-length weighted mean of |tau| (not |mean tau|: a ring's alternating torsion averages out, its |tau| does not). */
  readonly tauAbsMean: Banded;
  readonly tauMaxAbs: Banded;
  readonly stretches: { readonly straight: number; readonly arc: number; readonly helix: number; readonly irregular: number };
  /** Pinning sites (null without a material) and the deepest depth in k_B T. */
  readonly pinningSites: number | null;
  readonly deepestPinKT: number | null;
  /** Total length of stretches whose homogeneous state is metastable / whose ground state is periodic (null without a material). */
  readonly metastableLength: number | null;
  readonly periodicLength: number | null;
  readonly warnings: readonly string[];
}

/** Arc-length weights of the samples (trapezoid rule; a closed wire wraps). */
function arcWeights(p: Profile): Float64Array {
  const n = p.n, s = p.s, w = new Float64Array(n);
  if (n === 1) { w[0] = 1; return w; }
  for (let i = 0; i < n; ++i) {
    const prev = i > 0 ? s[i] - s[i - 1] : p.closed ? s[0] + p.length - s[n - 1] : 0;
    const next = i < n - 1 ? s[i + 1] - s[i] : p.closed ? s[0] + p.length - s[n - 1] : 0;
    w[i] = 0.5 * (prev + next);
  }
  return w;
}

/** Weighted mean and maximum (of |x| when abs: both are then of |x|) over finite entries of x[off .. off + n). */
function stats(x: ArrayLike<number>, off: number, w: Float64Array, abs: boolean): [number, number] {
  let a = 0, b = 0, m = -Infinity;
  for (let i = 0; i < w.length; ++i) {
    const v = abs ? Math.abs(x[off + i]) : x[off + i];
    if (!Number.isFinite(v)) continue;
    a += w[i] * v; b += w[i];
    m = Math.max(m, v);
  }
  return [b > 0 ? a / b : NaN, m === -Infinity ? NaN : m];
}

/**
 * The 95% band of a whole-wire statistic from its values over the replicates, centred on the
 * estimate as the per-sample bands are (src/frame/bands.ts, bandOffsets): the replicates' 2.5% and
 * 97.5% quantiles taken relative to their own median and added to `value`. A maximum or a mean of
 * |tau| over noisy replicates sits above the estimate's (noise only adds to a maximum or a
 * magnitude), and a planar wire's torsion is 0 while its replicates carry the noise: raw replicate
 * quantiles then miss the estimate (a ring's kappa_max 0.0200131 with band [0.0200157, 0.0200478]).
 * Centred this way the band always contains the estimate (the median lies between the quantiles).
 * `nonNegative`: a statistic that cannot be negative (kappa, |tau|) has its lower end floored at 0.
 * No band (NaN) with fewer than 2 finite replicates or a non-finite estimate.
 */
function banded(value: number, reps: number[], nonNegative: boolean): Banded {
  const finite = reps.filter(Number.isFinite);
  if (finite.length < 2 || !Number.isFinite(value)) return { value, lo: NaN, hi: NaN };
  const med = quantile(finite, 0.5)!, q1 = quantile(finite, 0.025)!, q2 = quantile(finite, 0.975)!;
  const lo = value + Math.min(0, q1 - med), hi = value + Math.max(0, q2 - med);
  return { value, lo: nonNegative ? Math.max(0, lo) : lo, hi };
}

/**
 * The numbers of one wire for a batch summary: arc-length weighted mean and maximum of kappa, mean
 * torsion, mean |tau| and maximum |tau| (undefined torsion skipped), each with a 95% interval from the same
 * statistic over the bootstrap replicates (2.5% and 97.5% quantiles about their median, R-7 as d3-array's
 * quantile, added to the estimate: {@link banded}),
 * stretch counts by kind, pinning sites, the deepest site in k_B T, the metastable and periodic
 * lengths, and the warnings (model warnings, export warnings, fit diagnostics).
 * Cost O(n R) for R replicates.
 */
export function wireSummary(a: Analysis, doc: ModelDocument): WireSummary {
  const unit = doc.unit;
  const k = PER_METRE[unit];
  const p = a.profile;
  const w = arcWeights(p);
  const [km, kx] = stats(p.kappa, 0, w, false);
  const [tm] = stats(p.tau, 0, w, false);
  const [ta, tx] = stats(p.tau, 0, w, true);
  const R = p.kappaSamples !== undefined ? p.replicates : 0;
  const rk: number[] = [], rkx: number[] = [], rt: number[] = [], rta: number[] = [], rtx: number[] = [];
  for (let r = 0; r < R; ++r) {
    const [a1, b1] = stats(p.kappaSamples!, r * p.n, w, false);
    rk.push(a1); rkx.push(b1);
    if (p.tauSamples !== undefined) {
      const [c1] = stats(p.tauSamples, r * p.n, w, false);
      const [e1, d1] = stats(p.tauSamples, r * p.n, w, true);
      rt.push(c1); rta.push(e1); rtx.push(d1);
    }
  }
  const scale = (b: Banded, f: number): Banded => ({ value: b.value * f, lo: b.lo * f, hi: b.hi * f });
  const count = (kind: string) => a.segments.filter((g) => g.kind === kind).length;
  const hasModel = a.model !== null;
  const lengthWhere = (test: (i: number) => boolean): number =>
    doc.segments.reduce((sum, g, i) => (test(i) ? sum + g.length : sum), 0);
  return {
    unit,
    points: a.trace.xyz.length / 3,
    length: p.length * k,
    closed: p.closed,
    resolution: p.resolution * k,
    kappaMean: scale(banded(km, rk, true), 1 / k),
    kappaMax: scale(banded(kx, rkx, true), 1 / k),
    tauMean: scale(banded(tm, rt, false), 1 / k),
    tauAbsMean: scale(banded(ta, rta, true), 1 / k),
    tauMaxAbs: scale(banded(tx, rtx, true), 1 / k),
    stretches: { straight: count("straight"), arc: count("arc"), helix: count("helix"), irregular: count("irregular") },
    pinningSites: hasModel ? doc.pinning.length : null,
    deepestPinKT: hasModel ? doc.pinning[0]?.depthKT ?? null : null,
    metastableLength: hasModel ? lengthWhere((i) => doc.segments[i].homogeneousStability === "metastable") : null,
    periodicLength: hasModel ? lengthWhere((i) => doc.segments[i].state === "periodic") : null,
    warnings: [...doc.warnings, ...doc.geometry.diagnostics],
  };
}
