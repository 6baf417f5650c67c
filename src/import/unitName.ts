/** Unit names as people write them, mapped onto the units of `src/types.ts`. */
import { INPUT_UNITS, type InputUnit } from "../types.js";

const ALIASES: Readonly<Record<string, InputUnit>> = {
  m: "m",
  um: "um",
  "\u00b5m": "um", // micro sign
  "\u03bcm": "um", // Greek mu
  micron: "um",
  nm: "nm",
  a: "A",
  "\u00e5": "A", // A with ring above
  "\u212b": "A", // angstrom sign
  angstrom: "A",
  px: "px",
  pixel: "px",
  pixels: "px",
};

/**
 * Reads a unit name: the canonical names "m", "um", "nm", "A", "px", plus the spellings "µm",
 * "micron", "Å", "angstrom", "pixel(s)"; case is ignored. Returns null for anything else.
 * @example parseUnitName("Å") // "A"
 */
export function parseUnitName(name: string): InputUnit | null {
  const exact = (INPUT_UNITS as readonly string[]).includes(name) ? (name as InputUnit) : undefined;
  if (exact !== undefined) return exact;
  const lower = name.toLowerCase();
  return Object.hasOwn(ALIASES, lower) ? ALIASES[lower] : null;
}

/** The message fragment for a bad unit name: `must be one of "m", "um", ... (got "mm")`. */
export function badUnitProblem(name: string, units: readonly string[] = INPUT_UNITS): string {
  return `must be one of ${units.map((u) => `"${u}"`).join(", ")} (got ${JSON.stringify(name)})`;
}
