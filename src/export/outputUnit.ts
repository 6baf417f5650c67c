import { ParameterError } from "../errors.js";
import { LENGTH_UNITS, type LengthUnit, type Source } from "../types.js";

/**
 * Default length unit of an output: the input's unit when it is a length, else (pixels) "um".
 * @example defaultOutputUnit({ file: "a.csv", unit: "px", pixelSize: 2e-9 }) // "um"
 */
export function defaultOutputUnit(source: Source): LengthUnit {
  return source.unit === "px" ? "um" : source.unit;
}

/** `unit` if it is a length unit, else the default for `source`; `where` names the caller in errors. */
export function resolveOutputUnit(unit: string | undefined, source: Source, where: string): LengthUnit {
  if (unit === undefined) return defaultOutputUnit(source);
  if (!(LENGTH_UNITS as readonly string[]).includes(unit)) {
    throw new ParameterError(where, "unit", `must be one of ${LENGTH_UNITS.map((u) => `"${u}"`).join(", ")} (got ${JSON.stringify(unit)})`);
  }
  return unit as LengthUnit;
}
