/**
 * Options and reader types of the import stage: every format (ordered traces, meshes, point
 * clouds, SVG path data) reads into a list of `Trace`s, one per wire in the file.
 * Lengths given here are in SI metres, like everything inside `src/`.
 */
import type { InputUnit, Trace } from "../types.js";
import type { BranchPolicy } from "./mesh/types.js";

/** Unit assumed when neither the file nor the caller names one. */
export const DEFAULT_INPUT_UNIT: InputUnit = "nm";

/** Options every trace reader accepts (each format uses those that mean something to it). */
export interface TraceReadOptions {
  /**
   * Unit of the numbers in the file. When the file declares a unit too (a JSON `unit`, a
   * `# unit: nm` comment, a header such as `x_nm`), the two must agree. Default: the file's
   * declaration, else {@link DEFAULT_INPUT_UNIT}. SVG drawings are always in user units ("px").
   */
  readonly unit?: InputUnit;
  /**
   * Size of one pixel (or voxel, for a mesh or cloud in voxel coordinates) in metres; required
   * when the unit is "px", refused for other units. For SVG: metres per user unit, which
   * overrides the calibration from the root's physical width and height.
   */
  readonly pixelSize?: number;
  /** Closed (periodic) or open wire. The caller's choice wins over the file's declaration or the topology. */
  readonly closed?: boolean;
  /** Meshes only: what to do with a branched wire ("error", the default, or keep the "longest" path). */
  readonly branches?: BranchPolicy;
}

/** A parser of one text format: text in, validated traces (one per wire, at least one) out, no file-system access. */
export interface TextTraceReader {
  readonly kind: "text";
  /** File-name endings (lowercase, with the dot) that select this reader; empty: only by name. */
  readonly extensions: readonly string[];
  /** May be asynchronous: heavy parsers (three.js loaders, ajv) are loaded on first use only. */
  parse(text: string, file: string, options: TraceReadOptions): Trace[] | Promise<Trace[]>;
}

/** A parser of one binary format (for example binary STL), given the file's bytes. */
export interface BinaryTraceReader {
  readonly kind: "binary";
  readonly extensions: readonly string[];
  parse(data: Uint8Array, file: string, options: TraceReadOptions): Trace[] | Promise<Trace[]>;
}

/** One entry of the format table (see traceReaders.ts). */
export type TraceReader = TextTraceReader | BinaryTraceReader;
