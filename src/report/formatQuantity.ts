/**
 * Number formatting of the report: one rule for every table and sentence.
 * - A single value gets 3 significant digits, in plain notation between 1e-3 and 1e5 and as
 *   "m.mme-N" outside it ({@link sig}).
 * - An estimate with its 95% band is written with one common exponent and one common number of
 *   decimals, enough for 3 significant digits of the estimate and 2 of the band's width, so that a
 *   narrow band never prints as "[0.0234, 0.0234]" ({@link banded}).
 * - Engineering units a physicist reads: {@link ENGINEERING} converts SI values (J/m^3 to kJ/m^3, ...).
 * NaN, infinities and null print as "n/a".
 */

/** SI factors of the report's engineering units: value_in_unit = value_SI * factor. */
export const ENGINEERING = {
  /** Exchange stiffness J/m to pJ/m. */
  exchange: { unit: "pJ/m", factor: 1e12 },
  /** Anisotropy (energy density) J/m^3 to kJ/m^3. */
  anisotropy: { unit: "kJ/m\u00b3", factor: 1e-3 },
  /** DMI constant J/m^2 to mJ/m^2. */
  dmi: { unit: "mJ/m\u00b2", factor: 1e3 },
  /** Energy J to zJ (1e-21 J). */
  energy: { unit: "zJ", factor: 1e21 },
  /** Energy J to meV: 1 eV = 1.602176634e-19 J exactly (SI 2019 definition of the elementary charge). */
  energyMeV: { unit: "meV", factor: 1e3 / 1.602176634e-19 },
} as const;

const PLAIN_MIN = 1e-3, PLAIN_MAX = 1e5;

function clean(text: string): string {
  return /^-0(\.0*)?(e|$)/.test(text) ? text.slice(1) : text;
}

function exponentFor(ref: number): number {
  const a = Math.abs(ref);
  if (!(a > 0) || (a >= PLAIN_MIN && a < PLAIN_MAX)) return 0;
  return Math.floor(Math.log10(a));
}

function withExponent(mantissa: string, e: number): string {
  return e === 0 ? mantissa : `${mantissa}e${e}`;
}

/**
 * A value with `digits` significant digits (default 3): "0.0234", "697", "1310", "1.06e-5".
 * @example sig(0.0234161510279) // "0.0234"
 */
export function sig(value: number | null | undefined, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "n/a";
  if (value === 0) return "0";
  const e = exponentFor(value);
  const m = Number((value / 10 ** e).toPrecision(digits));
  const d = Math.max(0, digits - 1 - Math.floor(Math.log10(Math.abs(m))));
  return clean(withExponent(m.toFixed(d), e));
}

/**
 * An estimate and its band as three strings with a common exponent and number of decimals.
 * @example banded(0.0234161, 0.0233951, 0.0234276) // ["0.023416", "0.023395", "0.023428"]
 */
export function banded(value: number | null, lo: number | null, hi: number | null, digits = 3): [string, string, string] {
  const ok = (v: number | null): v is number => v !== null && Number.isFinite(v);
  if (!ok(value)) return ["n/a", ok(lo) ? sig(lo, digits) : "n/a", ok(hi) ? sig(hi, digits) : "n/a"];
  // an exact zero (torsion of a planar stretch) stays "0"; its band edges get their own digits
  if (value === 0) return ["0", ok(lo) ? sig(lo, digits) : "n/a", ok(hi) ? sig(hi, digits) : "n/a"];
  const ref = value;
  const e = exponentFor(ref);
  const p = 10 ** e;
  let d = Math.max(0, digits - 1 - Math.floor(Math.log10(Math.abs(ref / p))));
  if (ok(lo) && ok(hi) && hi > lo) d = Math.max(d, Math.min(d + 3, 1 - Math.floor(Math.log10((hi - lo) / p))));
  const f = (v: number | null): string => (ok(v) ? clean(withExponent((v / p).toFixed(d), e)) : "n/a");
  return [f(value), f(lo), f(hi)];
}

/**
 * Why an estimate lies outside its own 95% band, or null when it lies inside (or there is no band).
 * Curvature and |torsion| are never negative, so where they are small the noise in each bootstrap
 * replicate can only add to them and the replicates sit above the fit: a band above the estimate is
 * that bias, and the estimate is the better value. Otherwise the replicates are centred away from
 * the fit, meaning the smoothing bias is larger than the noise and the band is too narrow.
 */
export function outsideBandReason(quantity: "curvature" | "torsion" | "|torsion|", value: number | null, lo: number | null, hi: number | null): string | null {
  if (value === null || lo === null || hi === null || !Number.isFinite(value) || !(lo <= hi)) return null;
  if (value >= lo && value <= hi) return null;
  if (quantity !== "torsion" && value < lo) {
    return `${quantity} estimate below its band: ${quantity} cannot be negative, so where it is small the noise of each bootstrap replicate only adds to it; ` +
      "the estimate is the better value and the band's upper end an upper bound";
  }
  return `${quantity} estimate ${value < lo ? "below" : "above"} its band: the bootstrap replicates are centred away from the fit ` +
    "(smoothing bias larger than the noise here), so the band understates the uncertainty";
}
