/**
 * A number for a sentence or a table: 4 significant digits, shortest form ("0.02353", "1.2e-7");
 * NaN and infinities as "NaN", "Infinity".
 * @example brief(0.0235294117647) // "0.02353"
 */
export function brief(value: number): string {
  return Number.isFinite(value) ? String(Number(value.toPrecision(4))) : String(value);
}
