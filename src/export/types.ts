import type { LengthUnit } from "../types.js";

/** Options of the profile writers. */
export interface ProfileWriteOptions {
  /** Length unit of the output (curvature and torsion then in 1/unit). Default: the input's unit; for pixels see defaultOutputUnit (nm for nm-sized pixels). */
  readonly unit?: LengthUnit;
  /** Seed of the bootstrap stream, recorded in the output (the Profile does not carry it). */
  readonly seed?: number;
}
