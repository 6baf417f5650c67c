import { ParameterError } from "../../errors.js";
import { PER_METRE, type InputUnit, type LengthUnit, type Source } from "../../types.js";

/**
 * Converter from a file's unit to metres: `toMetres(v)` is `v / PER_METRE[unit]` for a length unit
 * (division by an exact integer, so correctly rounded) or `v * pixelSize` for "px".
 *
 * @throws {ParameterError} for "px" without a positive finite pixel size, or an unknown unit.
 */
export function unitToMetres(unit: InputUnit, pixelSize: number | undefined, where: string): (v: number) => number {
  if (unit === "px") {
    if (pixelSize === undefined || !(pixelSize > 0) || !Number.isFinite(pixelSize)) {
      throw new ParameterError(where, "pixelSize", `unit "px" needs a positive pixel size in metres (got ${String(pixelSize)})`);
    }
    const size = pixelSize;
    return (v) => v * size;
  }
  const perMetre = PER_METRE[unit as LengthUnit];
  if (perMetre === undefined) throw new ParameterError(where, "unit", `unknown unit ${JSON.stringify(unit)}`);
  return (v) => v / perMetre;
}

/** Inverse of `unitToMetres`, for messages that quote positions in the file's own unit. */
export function metresToUnit(unit: InputUnit, pixelSize: number | undefined): (v: number) => number {
  if (unit === "px") {
    const size = pixelSize ?? 1;
    return (v) => v / size;
  }
  const perMetre = PER_METRE[unit as LengthUnit] ?? 1;
  return (v) => v * perMetre;
}

/** The `source` record of a trace read from `file` in `unit`. */
export function makeSource(file: string, unit: InputUnit, pixelSize: number | undefined): Source {
  return unit === "px" && pixelSize !== undefined ? { file, unit, pixelSize } : { file, unit };
}

/** "(1.2, 3.4, 5) nm": a position in metres, printed in the file's unit with 4 significant digits. */
export function formatPoint(x: number, y: number, z: number, unit: InputUnit, pixelSize: number | undefined): string {
  const f = metresToUnit(unit, pixelSize);
  const g = (v: number) => String(Number(f(v).toPrecision(4)));
  return `(${g(x)}, ${g(y)}, ${g(z)}) ${unit}`;
}

/** A length in metres, printed in the file's unit with 3 significant digits. */
export function formatLength(v: number, unit: InputUnit, pixelSize: number | undefined): string {
  return `${Number(metresToUnit(unit, pixelSize)(v).toPrecision(3))} ${unit}`;
}
