/**
 * Fast, exact reading of plain decimal numbers from a slice of a string, for the delimited parser.
 *
 * Method: Clinger's fast path (W. D. Clinger, "How to read floating point numbers accurately",
 * PLDI 1990, sec. 3): when the decimal significand m has at most 15 digits (so m < 2^53 is exact)
 * and the power of ten |e| <= 22 (so 10^|e| is exact), m * 10^e or m / 10^-e is one IEEE 754
 * operation and hence correctly rounded: the same double `Number()` returns. Anything else
 * (more digits, larger exponents, or text that is not a plain decimal) returns NaN, and the caller
 * falls back to `Number()` on the slice, which also produces the error message.
 */

const POW10 = new Float64Array(23);
for (let k = 0, p = 1; k <= 22; ++k, p *= 10) POW10[k] = p;

/**
 * The value of text[start, end) when it is a plain decimal (`-12.5`, `.5`, `3.`, `+1e-7`) with
 * at most 15 significant digits and a total power of ten within +-22; otherwise NaN (not an error:
 * the caller then uses `Number()`).
 * Cost: one pass over the characters, no allocation.
 * @example fastDecimal("x=-1.25e2", 2, 9) // -125
 */
export function fastDecimal(text: string, start: number, end: number): number {
  let i = start;
  let negative = false;
  let c = text.charCodeAt(i);
  if (c === 45 || c === 43) {
    negative = c === 45;
    c = text.charCodeAt(++i);
  }
  let m = 0;
  let digits = 0; // significant digits taken into m
  let any = false; // at least one digit in the significand
  let scale = 0; // power of ten from the fraction
  while (i < end && c >= 48 && c <= 57) {
    any = true;
    if (m !== 0 || c !== 48) {
      if (++digits > 15) return NaN;
      m = m * 10 + (c - 48);
    }
    c = text.charCodeAt(++i);
  }
  if (i < end && c === 46) {
    c = text.charCodeAt(++i);
    while (i < end && c >= 48 && c <= 57) {
      any = true;
      if (m !== 0 || c !== 48) {
        if (++digits > 15) return NaN;
        m = m * 10 + (c - 48);
      }
      --scale;
      c = text.charCodeAt(++i);
    }
  }
  if (!any) return NaN;
  if (i < end && (c === 101 || c === 69)) {
    c = text.charCodeAt(++i);
    let expNegative = false;
    if (c === 45 || c === 43) {
      expNegative = c === 45;
      c = text.charCodeAt(++i);
    }
    let e = 0;
    let expDigits = 0;
    while (i < end && c >= 48 && c <= 57) {
      if (++expDigits > 4) return NaN;
      e = e * 10 + (c - 48);
      c = text.charCodeAt(++i);
    }
    if (expDigits === 0) return NaN;
    scale += expNegative ? -e : e;
  }
  if (i !== end) return NaN;
  let v: number;
  if (m === 0) v = 0;
  else if (scale >= 0 && scale <= 22) v = m * POW10[scale];
  else if (scale < 0 && scale >= -22) v = m / POW10[-scale];
  else return NaN;
  return negative ? -v : v;
}
