/** Options of `parseSvgPaths`. */
export interface SvgOptions {
  /** Metres per SVG user unit (one micrograph pixel); overrides the root's physical width/height. */
  readonly pixelSize?: number;
  /** Sampling step for curves and arcs, in user units; default 1/1000 of each path's length. */
  readonly maxStep?: number;
}
