import type { Source, Trace } from "../../types.js";

/**
 * A network of wires, as found in a branched mesh or cloud: plain data. Every length in metres,
 * positions [x, y, z]. Ids are 1-based and stable: branches longest first; junctions and free ends
 * numbered in the order the branches first meet them (branch 1's start, then its end, then branch 2's ...).
 */
export interface WireNetwork {
  readonly source: Source;
  readonly junctions: readonly NetworkJunction[];
  readonly ends: readonly NetworkEnd[];
  readonly branches: readonly NetworkBranch[];
  /**
   * Independent cycles: cycle rank branches - (junctions + ends) + pieces of the network graph (a ring
   * counts itself as one vertex); pieces, not `components`: wires that touch without a junction share
   * an input component but not a piece. Never negative.
   */
  readonly cycles: number;
  /** Connected pieces of the input that held wires. */
  readonly components: number;
  /** File-wide notes (welding, skipped debris, pruned spurs, junction fits that fell back). */
  readonly diagnostics: readonly string[];
}

/** A place where three or more branches meet (or two, when a ring is attached by one junction). */
export interface NetworkJunction {
  readonly id: number;
  /** Where the branches' axes meet, by least squares over their end tangents. */
  readonly position: readonly [number, number, number];
  /** Ids of the branches meeting here, one entry per branch end (a branch leaving and returning appears twice). */
  readonly branches: readonly number[];
  /** Unit tangent of each of those branch ends, pointing away from the junction (same order). */
  readonly tangents: readonly (readonly [number, number, number])[];
  /** Angle between every pair of those tangents, degrees (0..180). */
  readonly angles: readonly { readonly between: readonly [number, number]; readonly degrees: number }[];
  /** RMS distance of the branch axes from `position`. */
  readonly axisMiss: number;
  /** Radius of the junction zone: samples of a branch closer than this to `position` are in the zone. */
  readonly zoneRadius: number;
  /** Distance from the skeleton's first estimate (the merging level sets) to `position`. */
  readonly shift: number;
}

/** A free end of a branch (a cap tip or the open end of a tube). */
export interface NetworkEnd {
  readonly id: number;
  readonly position: readonly [number, number, number];
  readonly branch: number;
}

/** A terminal of a branch: a junction or a free end, by id. */
export type NetworkNode = { readonly kind: "junction" | "end"; readonly id: number };

/** One wire between two terminals (or a ring with none): its centre line as an ordered trace. */
export interface NetworkBranch {
  readonly id: number;
  /** Ordered from `from` to `to`; with `radius` for meshes. */
  readonly trace: Trace;
  readonly from: NetworkNode | null;
  readonly to: NetworkNode | null;
  readonly closed: boolean;
  /** Centre-line length (polyline, closing segment included when closed). */
  readonly length: number;
  /** Median tube radius (meshes), else null. */
  readonly radius: number | null;
  /** Arc length from the start and from the end over which the branch lies in a junction zone (0 at free ends). */
  readonly zoneStart: number;
  readonly zoneEnd: number;
  /** Per sample of `trace`: 1 inside a junction zone. */
  readonly inZone: Uint8Array;
  /** Connected piece of the input (1-based). */
  readonly component: number;
}
