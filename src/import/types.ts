/**
 * Options and reader types of the import stage (ordered traces).
 * Lengths given here are in SI metres, like everything inside `src/`.
 */
import type { InputUnit, Trace } from "../types.js";

/** Unit assumed when neither the file nor the caller names one. */
export const DEFAULT_INPUT_UNIT: InputUnit = "nm";

/** Options every trace reader accepts. */
export interface TraceReadOptions {
  /**
   * Unit of the numbers in the file. When the file declares a unit too (a JSON `unit`, a
   * `# unit: nm` comment, a header such as `x_nm`), the two must agree. Default: the file's
   * declaration, else {@link DEFAULT_INPUT_UNIT}.
   */
  readonly unit?: InputUnit;
  /** Size of one pixel in metres; required when the unit is "px", refused otherwise. */
  readonly pixelSize?: number;
  /** Closed (periodic) or open wire. The caller's choice wins over the file's declaration. */
  readonly closed?: boolean;
}

/** A parser of one text format: text in, validated `Trace` out, no file-system access. */
export interface TextTraceReader {
  readonly kind: "text";
  /** File-name endings (lowercase, with the dot) that select this reader. */
  readonly extensions: readonly string[];
  parse(text: string, file: string, options: TraceReadOptions): Trace;
}

/** A parser of one binary format (for example binary STL), given the file's bytes. */
export interface BinaryTraceReader {
  readonly kind: "binary";
  readonly extensions: readonly string[];
  parse(data: Uint8Array, file: string, options: TraceReadOptions): Trace;
}

/** One entry of the format table (see traceReaders.ts). */
export type TraceReader = TextTraceReader | BinaryTraceReader;
