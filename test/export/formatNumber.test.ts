import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { formatByString, formatNumber, jsonNumber, jsonNumberText, MAX_NUMBER_BYTES, writeNumber } from "../../src/export/formatNumber.js";
import { chunksToText, RowBuffer } from "../../src/export/tableChunks.js";

// Reference: the ECMAScript built-ins themselves (Number.prototype.toPrecision, then Number::toString,
// https://tc39.es/ecma262/#sec-number.prototype.toprecision and #sec-numeric-types-number-tostring).
const reference = (v: number): string => (Number.isNaN(v) ? "NaN" : !Number.isFinite(v) ? String(v) : String(Number(v.toPrecision(12))));
const bytes = (v: number, nan = "NaN"): string => {
  const b = new Uint8Array(MAX_NUMBER_BYTES);
  return new TextDecoder().decode(b.subarray(0, writeNumber(b, 0, v, nan)));
};

describe("formatNumber(value) and writeNumber(out, pos, value)", () => {
  it("equal String(Number(value.toPrecision(12))) on any double (fast-check, 100000 runs)", () => {
    fc.assert(
      fc.property(fc.double(), (v) => {
        expect(formatNumber(v)).toBe(reference(v));
        expect(bytes(v)).toBe(reference(v));
        expect(formatByString(v)).toBe(reference(v)); // the path without Node's Buffer
      }),
      { seed: 12, numRuns: 100_000 },
    );
  });

  it("equal the reference at the edges: zeros, powers of ten, format switches, ties, extremes", () => {
    const edges = [
      0, -0, 1, -1, 0.1, 0.3, 0.1 + 0.2, 1e21, 9.99999999999e20, 1e-6, 1e-7, 9.99999999999e-7, 123456789012, 999999999999.5,
      999999999999.4, 1e12, -1e12, 9.9999999999995, 0.00001234567890125, 2.5e-13, 1.5e-300, 5e-324, 1.7976931348623157e308,
      2 ** 53, -(2 ** 31), 1234.5, 0.5, 12.5e-9, 1e22, 1e23, 1e-22, 1e-23,
    ];
    for (let e = -40; e <= 40; ++e) edges.push(10 ** e, 1.5 * 10 ** e, 9.999999999995 * 10 ** e, -(2 ** 0.5) * 10 ** e);
    for (const v of edges) {
      expect(formatNumber(v), String(v)).toBe(reference(v));
      expect(bytes(v), String(v)).toBe(reference(v));
      expect(formatByString(v), String(v)).toBe(reference(v));
    }
  });

  it("round-trip: the text reads back to the 12-digit rounding of the value", () => {
    fc.assert(fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (v) => Number(formatNumber(v)) === Number(v.toPrecision(12))), { seed: 3, numRuns: 20_000 });
  });

  it("write NaN and infinities as asked: NaN/Infinity in CSV, null in JSON", () => {
    expect([formatNumber(NaN), formatNumber(Infinity), formatNumber(-Infinity)]).toEqual(["NaN", "Infinity", "-Infinity"]);
    expect([bytes(NaN, "null"), bytes(Infinity, "null"), bytes(-Infinity, "null")]).toEqual(["null", "null", "null"]);
    expect([jsonNumberText(NaN), jsonNumberText(0.1 + 0.2)]).toEqual(["null", "0.3"]);
    expect(JSON.stringify(jsonNumber(0.1 + 0.2))).toBe(jsonNumberText(0.1 + 0.2));
  });
});

describe("RowBuffer", () => {
  it("chunks of many rows join to the text of formatNumber row by row", () => {
    const rows = 40_000; // several 256 KiB chunks
    const out = new RowBuffer(3 * 25, "NaN");
    const chunks: Uint8Array[] = [];
    let expected = "";
    for (let i = 0; i < rows; ++i) {
      const a = Math.sin(i) * 1e-9, b = i / 7, c = i % 97 === 0 ? NaN : Math.exp(-i / 1000);
      out.num(a, 44); out.num(b, 44); out.num(c, 10);
      expected += `${formatNumber(a)},${formatNumber(b)},${formatNumber(c)}\n`;
      if (out.full()) chunks.push(out.take());
    }
    chunks.push(out.take());
    expect(chunks.length).toBeGreaterThan(3);
    expect(chunksToText(chunks)).toBe(expected);
  });
});
