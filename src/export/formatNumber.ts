/** Significant digits kept in outputs: far finer than any fitted estimate, and round-trip stable. */
export const OUTPUT_DIGITS = 12;

/** Longest text {@link writeNumber} writes for one number ("-1.23456789012e-300" and the like). */
export const MAX_NUMBER_BYTES = 24;

/** Exact powers of ten 10^0 .. 10^22 (every one of them is a double exactly). */
const POW10 = Float64Array.from({ length: 23 }, (_, i) => Number(`1e${i}`));
/** Half-width of the band around a rounding tie where the fast path defers to toPrecision. */
const TIE_BAND = 1e-3;

/** The reference: 12 significant digits by `toPrecision`, then the shortest form that reads back. */
function slow(value: number): string {
  return String(Number(value.toPrecision(OUTPUT_DIGITS)));
}

/** `a * 10^k` for |k| <= 44, with at most two roundings (each power used is exact). */
function scale(a: number, k: number): number {
  if (k >= 0) return k <= 22 ? a * POW10[k] : a * POW10[22] * POW10[k - 22];
  return k >= -22 ? a / POW10[-k] : a / POW10[22] / POW10[-k - 22];
}

/** Digits of an integer 0 <= r < 1e12 as 12 characters, leading zeros kept (two small-integer conversions). */
function twelveDigits(r: number): string {
  const hi = Math.floor(r / 1e6);
  const lo = r - hi * 1e6;
  const l = String(lo);
  return String(hi) + "000000".slice(l.length) + l;
}

/**
 * A number for a text output: rounded to 12 significant digits, then written in the shortest form
 * that reads back to that value ("3", not "3.00000000000" or "2.9999999999999996"); NaN as "NaN".
 * The text is exactly `String(Number(value.toPrecision(12)))` (the property test checks it against
 * that), made 3-5x faster here and 8-10x in {@link writeNumber}, which the table writers use
 * (bench/io.ts): the value is scaled by an exact power of ten and rounded to a 12-digit integer r,
 * and the digits of r (trailing zeros dropped) are placed as ECMAScript's Number::toString places
 * them (https://tc39.es/ecma262/#sec-numeric-types-number-tostring).
 * Why the digits are right: a decimal of at most 15 significant digits is the shortest form of the
 * double nearest to it (IEEE 754 binary64 keeps 15 decimal digits), so the 12-digit rounding,
 * read back and written shortest, is its own digits. The scaling adds at most two roundings, so
 * within 1e-3 of a tie the fast path hands over to toPrecision.
 * @example formatNumber(3e-10 * 1e10) // "3"
 */
export function formatNumber(value: number): string {
  if (Number.isInteger(value) && value < 1e12 && value > -1e12) return String(value === 0 ? 0 : value);
  if (textBuffer !== null) return textBuffer.latin1Slice(0, writeNumber(textBuffer, 0, value, "NaN"));
  return formatByString(value);
}

/** Node's Buffer (its latin1Slice makes a short ASCII string fastest), or null in a browser. */
const textBuffer: (Uint8Array & { latin1Slice(start: number, end: number): string }) | null =
  typeof Buffer === "undefined" ? null : (Buffer.alloc(MAX_NUMBER_BYTES) as unknown as Uint8Array & { latin1Slice(start: number, end: number): string });

/** {@link formatNumber} by string operations, where there is no Buffer. */
export function formatByString(value: number): string {
  if (value !== value) return "NaN";
  if (!Number.isFinite(value)) return value > 0 ? "Infinity" : "-Infinity";
  const a = value < 0 ? -value : value;
  let e = Math.floor(Math.log10(a)); // 10^e <= a < 10^(e+1), up to one off: corrected below
  if (e > 33 || e < -33) return slow(value);
  let x = scale(a, 11 - e);
  if (x >= 1e12) { e += 1; x = scale(a, 11 - e); } else if (x < 1e11) { e -= 1; x = scale(a, 11 - e); }
  let r = Math.floor(x);
  const frac = x - r;
  if (frac > 0.5 - TIE_BAND && frac < 0.5 + TIE_BAND) return slow(value);
  if (frac > 0.5) r += 1;
  if (r >= 1e12) { r = 1e11; e += 1; } // 999999999999.7 rounds up to the next power of ten
  let digits = twelveDigits(r);
  let end = 12;
  while (digits.charCodeAt(end - 1) === 48) --end;
  digits = digits.slice(0, end);
  // ECMAScript Number::toString with k = end digits and n = e + 1 (value = 0.digits x 10^n)
  const n = e + 1;
  let s: string;
  if (end <= n && n <= 21) s = digits + "0".repeat(n - end);
  else if (0 < n && n <= 21) s = `${digits.slice(0, n)}.${digits.slice(n)}`;
  else if (-6 < n && n <= 0) s = `0.${"0".repeat(-n)}${digits}`;
  else s = `${digits[0]}${end > 1 ? `.${digits.slice(1)}` : ""}e${n - 1 >= 0 ? "+" : "-"}${Math.abs(n - 1)}`;
  return value < 0 ? `-${s}` : s;
}

/** The same rounding for JSON: a number, or null where the value is NaN or infinite. */
export function jsonNumber(value: number): number | null {
  return Number.isFinite(value) ? Number(value.toPrecision(OUTPUT_DIGITS)) : null;
}

/** {@link formatNumber} for JSON text: the same digits, `null` where the value is NaN or infinite. */
export function jsonNumberText(value: number): string {
  return Number.isFinite(value) ? formatNumber(value) : "null";
}


const scratch = new Uint8Array(12);
/** ASCII of 0000 .. 9999, four bytes each: three lookups give the 12 digits of a rounded value. */
const QUAD = new Uint8Array(40000);
for (let i = 0; i < 10000; ++i) {
  QUAD[4 * i] = 48 + Math.floor(i / 1000);
  QUAD[4 * i + 1] = 48 + (Math.floor(i / 100) % 10);
  QUAD[4 * i + 2] = 48 + (Math.floor(i / 10) % 10);
  QUAD[4 * i + 3] = 48 + (i % 10);
}
/** One double seen as two 32-bit words, to read its binary exponent. */
const F64 = new Float64Array(1);
const U32 = new Uint32Array(F64.buffer);
const HIGH = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0; // index of the high word (little-endian: 1)
const LOG10_2 = 0.3010299956639812;

/** Writes the ASCII of a string that is known to be ASCII. */
function writeAscii(out: Uint8Array, pos: number, s: string): number {
  for (let i = 0; i < s.length; ++i) out[pos++] = s.charCodeAt(i);
  return pos;
}

/** Writes the decimal digits of a non-negative integer below 1e12. */
function writeUint(out: Uint8Array, pos: number, v: number): number {
  if (v < 10) { out[pos] = 48 + v; return pos + 1; }
  const g0 = Math.floor(v * 1e-8), rest = v - g0 * 1e8, g1 = Math.floor(rest * 1e-4), g2 = rest - g1 * 1e4;
  put12(g0, g1, g2);
  let i = 0;
  while (scratch[i] === 48) ++i;
  for (; i < 12; ++i) out[pos++] = scratch[i];
  return pos;
}

/** The 12 digits of three 4-digit groups into `out` at `pos`. */
function put12At(out: Uint8Array, pos: number, g0: number, g1: number, g2: number): void {
  let o = 4 * g0;
  out[pos] = QUAD[o]; out[pos + 1] = QUAD[o + 1]; out[pos + 2] = QUAD[o + 2]; out[pos + 3] = QUAD[o + 3];
  o = 4 * g1;
  out[pos + 4] = QUAD[o]; out[pos + 5] = QUAD[o + 1]; out[pos + 6] = QUAD[o + 2]; out[pos + 7] = QUAD[o + 3];
  o = 4 * g2;
  out[pos + 8] = QUAD[o]; out[pos + 9] = QUAD[o + 1]; out[pos + 10] = QUAD[o + 2]; out[pos + 11] = QUAD[o + 3];
}

/** The 12 digits of three 4-digit groups into `scratch`. */
function put12(g0: number, g1: number, g2: number): void {
  let o = 4 * g0;
  scratch[0] = QUAD[o]; scratch[1] = QUAD[o + 1]; scratch[2] = QUAD[o + 2]; scratch[3] = QUAD[o + 3];
  o = 4 * g1;
  scratch[4] = QUAD[o]; scratch[5] = QUAD[o + 1]; scratch[6] = QUAD[o + 2]; scratch[7] = QUAD[o + 3];
  o = 4 * g2;
  scratch[8] = QUAD[o]; scratch[9] = QUAD[o + 1]; scratch[10] = QUAD[o + 2]; scratch[11] = QUAD[o + 3];
}

/**
 * {@link formatNumber} written as ASCII bytes into `out` at `pos` (at least MAX_NUMBER_BYTES free),
 * returning the position after it: the same text, with no string made on the way, so a table of
 * millions of numbers costs a few tens of nanoseconds per number. NaN is written as `nan` (the
 * text for NaN; "NaN" in CSV, "null" in JSON).
 * @example const b = new Uint8Array(24); new TextDecoder().decode(b.subarray(0, writeNumber(b, 0, 0.1 + 0.2, "NaN"))) // "0.3"
 */
export function writeNumber(out: Uint8Array, pos: number, value: number, nan: string): number {
  if (Number.isInteger(value) && value < 1e12 && value > -1e12) {
    if (value < 0) { out[pos++] = 45; value = -value; }
    return writeUint(out, pos, value);
  }
  if (!Number.isFinite(value)) return writeAscii(out, pos, value !== value ? nan : value > 0 ? (nan === "null" ? "null" : "Infinity") : nan === "null" ? "null" : "-Infinity");
  const a = value < 0 ? -value : value;
  F64[0] = a;
  // decimal exponent from the binary one: 10^e <= a < 10^(e+1), up to one off, corrected below
  let e = Math.floor((((U32[HIGH] >>> 20) & 0x7ff) - 1023) * LOG10_2);
  if (e > 33 || e < -33) return writeAscii(out, pos, slow(value));
  let x = scale(a, 11 - e);
  if (x >= 1e12) { e += 1; x = scale(a, 11 - e); } else if (x < 1e11) { e -= 1; x = scale(a, 11 - e); }
  let r = Math.floor(x);
  const frac = x - r;
  if (frac > 0.5 - TIE_BAND && frac < 0.5 + TIE_BAND) return writeAscii(out, pos, slow(value));
  if (frac > 0.5) r += 1;
  if (r >= 1e12) { r = 1e11; e += 1; }
  // the 12 digits of r go straight to their place; trailing zeros are then taken back
  // (1e-8 and 1e-4 are slightly above their true values, so these floors are exact for r < 1e12)
  const g0 = Math.floor(r * 1e-8), rest = r - g0 * 1e8, g1 = Math.floor(rest * 1e-4), g2 = rest - g1 * 1e4;
  if (value < 0) out[pos++] = 45;
  const n = e + 1; // value = 0.d1d2...d12 x 10^n, as in ECMAScript Number::toString
  if (n > 0 && n <= 21) {
    put12At(out, pos, g0, g1, g2);
    if (n >= 12) { // an integer of n digits: all 12, then zeros
      pos += 12;
      for (let i = 12; i < n; ++i) out[pos++] = 48;
      return pos;
    }
    for (let i = pos + 11; i >= pos + n; --i) out[i + 1] = out[i]; // open a place for the point
    out[pos + n] = 46;
    let end = pos + 13;
    while (out[end - 1] === 48) --end;
    return out[end - 1] === 46 ? end - 1 : end;
  }
  if (n <= 0 && n > -6) {
    out[pos++] = 48;
    out[pos++] = 46;
    for (let i = n; i < 0; ++i) out[pos++] = 48;
    put12At(out, pos, g0, g1, g2);
    let end = pos + 12;
    while (out[end - 1] === 48) --end;
    return end;
  }
  // exponent form: d.ddd...e+x
  put12At(out, pos + 1, g0, g1, g2);
  out[pos] = out[pos + 1];
  out[pos + 1] = 46;
  let end = pos + 13;
  while (out[end - 1] === 48) --end;
  pos = out[end - 1] === 46 ? end - 1 : end;
  out[pos++] = 101;
  out[pos++] = n - 1 >= 0 ? 43 : 45;
  return writeUint(out, pos, Math.abs(n - 1));
}
