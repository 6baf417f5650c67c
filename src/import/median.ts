/** Median of the values (NaN for none; the mean of the two middle values for an even count). */
export function median(values: ArrayLike<number>): number {
  const s = Float64Array.from(values).sort();
  const n = s.length;
  return n === 0 ? NaN : n % 2 ? s[(n - 1) >> 1] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
}
