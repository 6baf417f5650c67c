/**
 * The largest 1, 2 or 5 times a power of ten that is not above `v` (for scale bars and legends).
 * Method: split v into mantissa and power of ten. Degenerate input (v <= 0 or not finite): NaN.
 * @example niceLength(0.37) // 0.2
 */
export function niceLength(v: number): number {
  if (!(Number.isFinite(v) && v > 0)) return NaN;
  const p = 10 ** Math.floor(Math.log10(v));
  const f = v / p;
  // f can land a hair below 1 or above 10 through rounding of log10
  const m = f >= 5 - 1e-12 ? 5 : f >= 2 - 1e-12 ? 2 : 1;
  return f >= 10 - 1e-12 ? 10 * p : m * p;
}
