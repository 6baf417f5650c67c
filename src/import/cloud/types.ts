import type { InputUnit, Trace } from "../../types.js";

/** Options of `orderCloud` (and the cloud readers). Defaults in brackets. */
export interface CloudOptions {
  /** Unit of the file the points came from (for `source`; the points themselves are in metres). */
  readonly unit: InputUnit;
  readonly pixelSize?: number;
  /** Neighbours per point in the kNN graph [10]; doubled (up to 40) if the graph falls apart. */
  readonly k?: number;
  /** Force a closed or open curve; undefined: closed when the end gap is under `closeGap` of the length. */
  readonly closed?: boolean;
  /** End gap, as a fraction of the curve length, under which the curve is taken as closed [0.05]. */
  readonly closeGap?: number;
  /** Running-mean window of the path, as a fraction of the path's vertices [0.02]. */
  readonly smoothFraction?: number;
  /**
   * A point is a gross outlier when its distance to its 5th neighbour exceeds this many times the
   * median of that distance over its k neighbours, or its distance to the smoothed curve exceeds this many times the
   * median distance (and 3 median neighbour spacings) in a small side branch [6].
   */
  readonly outlierFactor?: number;
  /**
   * Return a path even where the cloud crosses itself or branches (long side branches, reported in
   * `sideBranches`) [false: such a cloud is refused, naming where].
   */
  readonly allowBranches?: boolean;
  /** Dimensions of the result [2 when every z is 0, else 3]. */
  readonly dims?: 2 | 3;
}

/** A long side branch of the spanning tree: the ordering may be wrong near it. Lengths in m. */
export interface SideBranch {
  readonly x: number;
  readonly y: number;
  readonly z: number;
  /** Largest distance of the branch's points from the curve. */
  readonly extent: number;
  readonly points: number;
}

/** Result of `orderCloud`. */
export interface OrderedCloud {
  /** The input points (outliers left out) in curve order, in metres. */
  readonly trace: Trace;
  /** Number of gross outliers left out. */
  readonly outliers: number;
  /** Input indices of the outliers, ascending. */
  readonly outlierIndices: Uint32Array;
  /** Input index of each point of `trace`, in order. */
  readonly order: Uint32Array;
  /** Curve parameter (arc length along `path`, m) of each point of `trace`. */
  readonly s: Float64Array;
  /** The smoothed tree-diameter path used to order the points (m, interleaved). */
  readonly path: Float64Array;
  readonly closed: boolean;
  readonly sideBranches: readonly SideBranch[];
}
