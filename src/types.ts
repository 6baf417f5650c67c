/**
 * Plain-data types passed between the stages (import -> frame -> physics -> export).
 * Inside `src/` every length is in SI metres, stored as Float64. Other units live only at the edges.
 */

/** Length units accepted at the edges. "A" is the angstrom (1e-10 m). */
export type LengthUnit = "m" | "um" | "nm" | "A";
/** Units a file may use: a length unit, or pixels (then a pixel size in metres is required). */
export type InputUnit = LengthUnit | "px";

/** Exact integers, so `value / PER_METRE[unit]` is correctly rounded (1e-9 is not exact). */
export const PER_METRE: Readonly<Record<LengthUnit, number>> = { m: 1, um: 1e6, nm: 1e9, A: 1e10 };

export const LENGTH_UNITS: readonly LengthUnit[] = ["m", "um", "nm", "A"];
export const INPUT_UNITS: readonly InputUnit[] = ["m", "um", "nm", "A", "px"];

/** Where a dataset came from, and the unit its file used. */
export interface Source {
  readonly file: string;
  readonly unit: InputUnit;
  /** Pixel size in metres when `unit` is "px". */
  readonly pixelSize?: number;
}

/**
 * An ordered trace of a wire: points along the centre line, in metres.
 * `xyz` is interleaved [x0, y0, z0, x1, ...]; 2D inputs have z = 0 and `dims` 2.
 */
export interface Trace {
  readonly xyz: Float64Array;
  /** true/false when known (from the file or the user); undefined: detect from the data. */
  readonly closed?: boolean;
  readonly dims: 2 | 3;
  readonly source: Source;
  /** The trace is a planar projection of a 3D wire (a micrograph): torsion is not measurable. */
  readonly planarProjection?: boolean;
  /** Local tube radius per point (m), when the trace came from a mesh. */
  readonly radius?: Float64Array;
  /** Spread (standard deviation) of the tube radius per point (m). */
  readonly radiusSpread?: Float64Array;
  /**
   * Scale of the tessellation the trace came from (median triangle edge, m), when it came from a
   * mesh: the fit does not resolve features shorter than a few of these (facets are not the wire).
   */
  readonly facetLength?: number;
  /**
   * Set when the order of the points came from the cloud orderer (`orderCloud`), not from the file:
   * the median distance of the points from the orderer's smoothed path (`across`, m) and the median
   * nearest-neighbour spacing of the cloud (`spacing`, m). The fit guard names these when the fit of
   * such a trace fails (a cloud thicker across than its spacing zigzags when ordered).
   */
  readonly cloudOrder?: { readonly across: number; readonly spacing: number };
  /** Everything repaired or dropped at import (one human-readable line each). */
  readonly diagnostics: readonly string[];
  /**
   * Input row of each point: the 1-based line of a text file, or the 1-based point number of a
   * JSON polyline, so results can be traced back to the file. Absent for derived traces (mesh
   * centre lines): then points are named by their 1-based position in the trace.
   */
  readonly rows?: Int32Array;
}

/** Per-sample flag bits of a Profile (`flags[i] & FLAG_...`). */
export const FLAG_TORSION_UNDEFINED = 1; // kappa cannot be told from 0: tau is NaN, Frenet N, B undefined
export const FLAG_FRAME_TRANSPORTED = 2; // N, B come from the twist-free (parallel-transport) frame
export const FLAG_END = 4; // within one resolution length of an open end (3.5 sample spacings on a sparse trace): bias is larger there
export const FLAG_TORSION_NOT_MEASURABLE = 8; // planar projection: torsion cannot be measured
export const FLAG_BIAS = 16; // smoothing bias comparable to the band: the band may under-cover (feature near the resolution)
export const FLAG_JUNCTION_ZONE = 32; // a branch of a wire network near a junction: the geometry there is the junction's, not the wire's (set after the fit, by the network pipeline)

/**
 * Curvature and torsion profile of a fitted wire. All arrays have one entry per sample.
 * Torsion follows B' = -tau N, so a right-handed helix has tau > 0.
 * Units: s, x, y, z, resolution, sigma in m; kappa, tau and their bands in 1/m.
 */
export interface Profile {
  readonly n: number;
  /** Arc length along the fitted curve from its start (m). */
  readonly s: Float64Array;
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly z: Float64Array;
  /** Frames, interleaved 3 per sample. N, B are Frenet where kappa is resolved, transported elsewhere. */
  readonly T: Float64Array;
  readonly N: Float64Array;
  readonly B: Float64Array;
  readonly kappa: Float64Array;
  readonly kappaLo: Float64Array;
  readonly kappaHi: Float64Array;
  /** NaN where undefined (see flags), never an invented number. */
  readonly tau: Float64Array;
  readonly tauLo: Float64Array;
  readonly tauHi: Float64Array;
  readonly flags: Uint8Array;
  /** Total length of the fitted curve (m). */
  readonly length: number;
  readonly closed: boolean;
  /** Shortest length scale the fit resolves (m). */
  readonly resolution: number;
  /** Estimated noise standard deviation per coordinate (m). */
  readonly sigma: number;
  /** Smoothing level used (penalty weight, dimensionless after scaling). */
  readonly lambda: number;
  /** Smoothing level of the torsion estimate (>= lambda: the third derivative wants more smoothing). */
  readonly lambdaTorsion: number;
  /** Number of knot intervals of the quintic spline. */
  readonly segments: number;
  /** Effective degrees of freedom of the fit, per coordinate. */
  readonly edf: number;
  /** Bootstrap replicates used for the bands (0 when none). */
  readonly replicates: number;
  /** Input points left out or given weight below 0.5 by the robust fit (indices into the trace, from 0). */
  readonly outliers: readonly number[];
  /** Input row (Trace.rows, else 1-based trace position) of each sample; -1 for resampled samples. */
  readonly inputRow?: Int32Array;
  /** Input rows left out before the fit as gross outliers. */
  readonly droppedRows?: readonly number[];
  /** Input rows down-weighted (weight < 0.5) by the robust fit. */
  readonly downweightedRows?: readonly number[];
  readonly source: Source;
  readonly planarProjection: boolean;
  readonly diagnostics: readonly string[];
  /**
   * Kinks the fit was hinged at (a turn by a finite angle within a few points, found in the points
   * before the fit: `src/frame/kinks.ts`), in order of s; absent when none.
   */
  readonly kinks?: readonly ProfileKink[];
  /** Optional bootstrap samples, replicate-major: kappaSamples[r * n + i]. Kept when asked for. */
  readonly kappaSamples?: Float64Array;
  readonly tauSamples?: Float64Array;
  /**
   * Kept with the samples: the bands' estimate of the smoothing bias at each sample (1/m, signed):
   * the fit smoothed less (a quarter of the level) minus the estimate, extrapolated as the bands
   * extrapolate it (src/frame/bands.ts). kappa + kappaBias is the bias-corrected curvature the bands
   * reach to; the physics stage widens derived intervals (pinning depths) by it. NaN where tau is.
   */
  readonly kappaBias?: Float64Array;
  readonly tauBias?: Float64Array;
}

/** A kink of a profile. */
export interface ProfileKink {
  /** Arc length of the kink's point from the profile's start (m). */
  readonly s: number;
  /** Angle between the wire's tangents before and after it (rad). */
  readonly angle: number;
  /** Input row of the kink's point (Trace.rows, else 1-based trace position). */
  readonly inputRow: number;
  /**
   * The stretch where the fit bends freely (the points two detection windows either side), as arc
   * lengths (m); on a ring s0 may be below 0 or s1 beyond the length.
   */
  readonly s0: number;
  readonly s1: number;
}

export type SegmentKind = "straight" | "arc" | "helix" | "irregular";

/** A value with its 95% interval (same unit as the value). */
export interface Interval {
  readonly value: number;
  readonly lo: number;
  readonly hi: number;
}

/**
 * The exact primitive refitted to a stretch's input points (orthogonal-distance least squares,
 * `src/frame/primitives.ts`). Lengths in m, kappa and tau in 1/m, each with its 95% interval.
 */
export interface StretchShape {
  readonly primitive: "line" | "circle" | "helix";
  readonly points: number;
  /** NaN for a line. */
  readonly radius: Interval;
  /** Pitch 2 pi |c| (m): 0 for a circle, NaN for a line. */
  readonly pitch: Interval;
  /** +1 right-handed, -1 left-handed, 0 circle or line. */
  readonly handedness: -1 | 0 | 1;
  readonly kappa: Interval;
  /** NaN for a line. */
  readonly tau: Interval;
  /** Helix axis, circle normal or line direction (unit vector). */
  readonly axis: readonly [number, number, number];
  /** Point on the axis, circle centre or centroid (m). */
  readonly centre: readonly [number, number, number];
  /** RMS orthogonal residual (m). */
  readonly rms: number;
  /** Shape test against the noise: "untested" when the noise is unknown. */
  readonly verdict: "confirmed" | "rejected" | "untested";
  readonly reason: string;
}

/** A stretch of near-constant geometry, s0..s1 in m, mean kappa and tau in 1/m with 95% bands. */
export interface Segment {
  readonly s0: number;
  readonly s1: number;
  /** Sample indices [i0, i1) covered by the stretch. */
  readonly i0: number;
  readonly i1: number;
  readonly kind: SegmentKind;
  readonly kappa: number;
  readonly kappaLo: number;
  readonly kappaHi: number;
  readonly tau: number;
  readonly tauLo: number;
  readonly tauHi: number;
  /** The primitive refitted to the stretch's input points, when they were given. */
  readonly shape?: StretchShape;
  /** Why the stretch is "irregular" when its primitive was rejected (one line). */
  readonly demoted?: string;
  /** The stretch is the whole of a closed wire (a ring or a closed coil), with no seam. */
  readonly wholeRing?: boolean;
}

/** Kinds of named features: see `findFeatures` in src/frame/features.ts. */
export type FeatureKind = "bend" | "kink" | "pitch-defect" | "radius-defect" | "warp" | "end";

/**
 * A named feature of the wire (plain data). Position s and extent s0..s1 in m along the profile.
 * `before`/`after`: indices of the stretches on either side (-1 when none); `within`: the stretch
 * that holds the feature (-1 when it lies on a boundary).
 */
export interface Feature {
  readonly kind: FeatureKind;
  readonly s: number;
  readonly s0: number;
  readonly s1: number;
  readonly before: number;
  readonly after: number;
  readonly within: number;
  /** Bends and kinks: turning angle (rad) and the smallest radius of curvature (m). */
  readonly turningAngle?: number;
  readonly minRadius?: number;
  /** Bends: radius of a circle fitted to the input points of the bend (m, 95% interval). */
  readonly radius?: Interval;
  /** Kinks: the curvature there is a lower bound (the feature is narrower than the resolution). */
  readonly lowerBound?: boolean;
  /** Warp of a closed arc: RMS torsion (1/m). */
  readonly rmsTorsion?: number;
  /** Coil defects: the defect's pitch or radius over its neighbours' (dimensionless). */
  readonly ratio?: number;
  /** One human-readable line. */
  readonly note: string;
}
