import { describe, expect, it } from "vitest";
import { brief, parseCountOption, parseLengthOption, parseSeedOption } from "../../cli/options.js";
import { ParameterError } from "../../src/errors.js";

describe("parseLengthOption(where, option, text)", () => {
  it("reads a number with its unit into metres by dividing by the exact power of ten", () => {
    // SI prefixes (BIPM SI Brochure, 9th ed., Table 7); 1 A = 1e-10 m (8th ed., Table 8; from memory).
    expect(parseLengthOption("c", "--step", "2.5nm")).toBe(2.5 / 1e9);
    expect(parseLengthOption("c", "--step", "5nm")).toBe(5e-9);
    expect(parseLengthOption("c", "--step", "3 A")).toBe(3e-10);
    expect(parseLengthOption("c", "--step", "3Å")).toBe(3e-10);
    expect(parseLengthOption("c", "--step", "0.1um")).toBe(0.1 / 1e6);
    expect(parseLengthOption("c", "--step", "2µm")).toBe(2e-6);
    expect(parseLengthOption("c", "--step", "1e-9m")).toBe(1e-9);
    expect(parseLengthOption("c", "--step", ".5nm")).toBe(5e-10);
  });

  it("refuses bare numbers, pixels, zero, negatives and unknown units", () => {
    for (const text of ["2.5", "5px", "0nm", "-1nm", "3mm", "nm", "", "1e400nm", "2.5 n m"]) {
      expect(() => parseLengthOption("profile", "--step", text)).toThrow(ParameterError);
    }
    expect(() => parseLengthOption("profile", "--step", "3mm")).toThrow(
      'profile: --step: must be a positive length with a unit (m, um, nm, A), e.g. 2.5nm (got "3mm")',
    );
  });
});

describe("parseCountOption and parseSeedOption", () => {
  it("take decimal integers only, seeds up to 2^32 - 1", () => {
    expect(parseCountOption("p", "--bootstrap", "0")).toBe(0);
    expect(parseCountOption("p", "--bootstrap", "200")).toBe(200);
    for (const text of ["", "1e3", "0x10", "-1", "1.0", "a", "99999999999999999999"]) {
      expect(() => parseCountOption("p", "--bootstrap", text)).toThrow(ParameterError);
    }
    expect(parseSeedOption("p", "--seed", "4294967295")).toBe(4294967295);
    expect(() => parseSeedOption("p", "--seed", "4294967296")).toThrow(ParameterError);
  });
});

describe("brief(value)", () => {
  it("keeps 4 significant digits", () => {
    expect(brief(1523.456)).toBe("1523");
    expect(brief(0.000123456)).toBe("0.0001235");
    expect(brief(NaN)).toBe("NaN");
  });
});
