import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { fastDecimal } from "../../src/import/decimal.js";

describe("fastDecimal(text, start, end)", () => {
  it("returns exactly what Number() returns, or NaN to ask for Number()", () => {
    // Reference: the JS engine's StringToNumber (ECMA-262, sec. 7.1.4.1.1), correctly rounded.
    const decimal = fc
      .tuple(
        fc.constantFrom("", "-", "+"),
        fc.stringMatching(/^\d{0,20}$/),
        fc.option(fc.stringMatching(/^\d{0,20}$/)),
        fc.option(fc.tuple(fc.constantFrom("e", "E"), fc.constantFrom("", "-", "+"), fc.integer({ min: 0, max: 40 }))),
      )
      .map(([sign, int, frac, exp]) => `${sign}${int}${frac === null ? "" : `.${frac}`}${exp === null ? "" : `${exp[0]}${exp[1]}${exp[2]}`}`);
    let fast = 0;
    fc.assert(
      fc.property(decimal, (s) => {
        const v = fastDecimal(s, 0, s.length);
        if (!Number.isNaN(v)) {
          ++fast;
          expect(Object.is(v, Number(s))).toBe(true);
        }
      }),
      { seed: 7, numRuns: 20_000 },
    );
    expect(fast).toBeGreaterThan(5_000); // the fast path was taken (measured 11 773 of 20 000)
  });

  it("takes the fast path for typical trace numbers", () => {
    for (const s of ["12.5", "-0.0031", "1e-7", ".5", "3.", "+42", "123456789012345", "-0"]) {
      expect(Object.is(fastDecimal(s, 0, s.length), Number(s))).toBe(true);
    }
  });

  it("declines what is not a plain decimal, or too long for the exact path", () => {
    for (const s of ["", "-", ".", "1e", "1e+", "0x10", "Infinity", "1 2", "1,5", "1234567890123456", "1e23", "1e-23", "1.2.3"]) {
      expect(fastDecimal(s, 0, s.length)).toBeNaN();
    }
  });

  it("reads only its slice", () => {
    expect(fastDecimal("x=-1.25e2;", 2, 9)).toBe(-125);
  });
});
