import type { InputUnit } from "../../types.js";

/**
 * A welded triangle mesh: `positions` interleaved [x0, y0, z0, ...] in metres (Float64),
 * `index` three vertex indices per triangle. `diagnostics` lists what the reader repaired or dropped.
 */
export interface Mesh {
  readonly positions: Float64Array;
  readonly index: Uint32Array;
  readonly diagnostics: readonly string[];
}

/** Options of the mesh readers. */
export interface MeshReadOptions {
  /** Unit of the coordinates in the file (meshes carry none). "px" means voxels and needs `pixelSize`. */
  readonly unit: InputUnit;
  /** Voxel (pixel) size in metres when `unit` is "px". */
  readonly pixelSize?: number;
  /**
   * Weld tolerance relative to the bounding-box diagonal (default 1e-6, about 16 float32 ulps of the
   * diagonal). Vertices that snap to the same grid cell of this size are merged.
   */
  readonly weldTolRel?: number;
}

/** What `meshCenterline` does with a branched component. */
export type BranchPolicy = "error" | "longest";

/** Options of `meshCenterline`. Lengths in metres. */
export interface CenterlineOptions {
  /** Unit and pixel size of the file, used for `source` and to quote positions in messages. */
  readonly unit: InputUnit;
  readonly pixelSize?: number;
  /** Spacing of the output samples along the wire (m); default half the median tube radius. */
  readonly step?: number;
  /** "error" (default): a branched component raises InputError; "longest": keep its longest path, with a diagnostic. */
  readonly branches?: BranchPolicy;
  /** Components with fewer triangles are skipped as debris, with a diagnostic (default 20). */
  readonly minTriangles?: number;
  /** Side spurs of the level-set graph shorter than this many tube radii are pruned (default 2.5). */
  readonly spurRadii?: number;
  /** Orthogonal-cut refinement passes (default 3). */
  readonly passes?: number;
}
