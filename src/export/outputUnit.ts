import { ParameterError } from "../errors.js";
import { LENGTH_UNITS, type LengthUnit, type Source } from "../types.js";

/**
 * Default length unit of an output: the input's unit when it is a length; for pixels, the unit in
 * which one pixel is between 1 and 1000 (nm below 1 um, um below 1 mm, else m), "um" when the pixel
 * size is not known.
 * @example defaultOutputUnit({ file: "a.csv", unit: "px", pixelSize: 2e-9 }) // "nm"
 */
export function defaultOutputUnit(source: Source): LengthUnit {
  if (source.unit !== "px") return source.unit;
  const p = source.pixelSize;
  if (p === undefined || !(p > 0)) return "um";
  return p < 1e-6 ? "nm" : p < 1e-3 ? "um" : "m";
}

/** `unit` if it is a length unit, else the default for `source`; `where` names the caller in errors. */
export function resolveOutputUnit(unit: string | undefined, source: Source, where: string): LengthUnit {
  if (unit === undefined) return defaultOutputUnit(source);
  if (!(LENGTH_UNITS as readonly string[]).includes(unit)) {
    throw new ParameterError(where, "unit", `must be one of ${LENGTH_UNITS.map((u) => `"${u}"`).join(", ")} (got ${JSON.stringify(unit)})`);
  }
  return unit as LengthUnit;
}
