/** Significant digits kept in outputs: far finer than any fitted estimate, and round-trip stable. */
export const OUTPUT_DIGITS = 12;

/**
 * A number for a text output: rounded to 12 significant digits, then written in the shortest form
 * that reads back to that value ("3", not "3.00000000000" or "2.9999999999999996"); NaN as "NaN".
 * @example formatNumber(3e-10 * 1e10) // "3"
 */
export function formatNumber(value: number): string {
  if (Number.isNaN(value)) return "NaN";
  if (!Number.isFinite(value)) return value > 0 ? "Infinity" : "-Infinity";
  return String(Number(value.toPrecision(OUTPUT_DIGITS)));
}

/** The same rounding for JSON: a number, or null where the value is NaN or infinite. */
export function jsonNumber(value: number): number | null {
  return Number.isFinite(value) ? Number(value.toPrecision(OUTPUT_DIGITS)) : null;
}
