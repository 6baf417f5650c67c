import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { niceLength } from "../../src/report/niceLength.js";

// The 1-2-5 sequence of scale-bar lengths is common practice in map and microscope scale bars.
describe("niceLength(v)", () => {
  it("returns the largest 1, 2 or 5 times a power of ten not above v", () => {
    expect(niceLength(0.37)).toBe(0.2);
    expect(niceLength(1)).toBe(1);
    expect(niceLength(4.999)).toBe(2);
    expect(niceLength(5)).toBe(5);
    expect(niceLength(9.99)).toBe(5);
    expect(niceLength(1234)).toBe(1000);
    expect(niceLength(3e-9)).toBeCloseTo(2e-9, 20);
  });

  it("lies in (v / 2.5, v] for every positive v", () => {
    fc.assert(fc.property(fc.double({ min: 1e-12, max: 1e12, noNaN: true }), (v) => {
      const n = niceLength(v);
      expect(n).toBeLessThanOrEqual(v * (1 + 1e-12));
      expect(n).toBeGreaterThan(v / 2.5 * (1 - 1e-12));
    }), { seed: 11, numRuns: 500 });
  });

  it("gives NaN for zero, negative or non-finite input", () => {
    for (const v of [0, -1, NaN, Infinity]) expect(niceLength(v)).toBeNaN();
  });
});
