import { describe, expect, it } from "vitest";
import { banded, ENGINEERING, outsideBandReason, sig } from "../../src/report/formatQuantity.js";

describe("sig(value, digits)", () => {
  it("keeps 3 significant digits, trailing zeros included, plain between 1e-3 and 1e5", () => {
    expect(sig(0.0234161510279)).toBe("0.0234");
    expect(sig(13)).toBe("13.0");
    expect(sig(697.465)).toBe("697");
    expect(sig(1312.7)).toBe("1310"); // 3 significant digits, no exponent below 1e5
    expect(sig(0.99951)).toBe("1.00");
    expect(sig(1.0608e-5)).toBe("1.06e-5");
    expect(sig(-4.3856e-22)).toBe("-4.39e-22");
    expect(sig(0)).toBe("0");
  });

  it("prints n/a for null, NaN and infinities", () => {
    for (const v of [null, undefined, NaN, Infinity]) expect(sig(v)).toBe("n/a");
  });
});

describe("banded(value, lo, hi)", () => {
  it("uses common decimals: enough for 3 digits of the estimate and 2 of the band width", () => {
    expect(banded(0.0234161510279, 0.0233951238839, 0.0234275679435)).toEqual(["0.023416", "0.023395", "0.023428"]);
    expect(banded(0.00126221, 0.00205142, 0.00428828)).toEqual(["0.00126", "0.00205", "0.00429"]);
  });

  it("shares one exponent for small values, and keeps an exact zero as 0", () => {
    expect(banded(-0.000259080187834, -0.000270465177349, -0.00024782254207)).toEqual(["-2.59e-4", "-2.70e-4", "-2.48e-4"]);
    expect(banded(0, -1.74195e-7, 1.76125e-7)).toEqual(["0", "-1.74e-7", "1.76e-7"]);
  });
});

describe("ENGINEERING", () => {
  it("converts SI to the report's units", () => {
    // 1 eV = 1.602176634e-19 J exactly (CODATA 2018 / SI 2019 definition of e)
    expect(4.38561890911e-22 * ENGINEERING.energyMeV.factor).toBeCloseTo(2.7373, 3);
    expect(201060 * ENGINEERING.anisotropy.factor).toBeCloseTo(201.06, 9);
    expect(1.3e-11 * ENGINEERING.exchange.factor).toBeCloseTo(13, 9);
    expect(6.298e-4 * ENGINEERING.dmi.factor).toBeCloseTo(0.6298, 9);
  });
});

describe("outsideBandReason(quantity, value, lo, hi)", () => {
  it("is null inside the band or without one, and explains a curvature near zero below its band", () => {
    expect(outsideBandReason("curvature", 1, 0.9, 1.1)).toBeNull();
    expect(outsideBandReason("torsion", 1, null, null)).toBeNull();
    expect(outsideBandReason("curvature", 0.00126, 0.00205, 0.00429)).toMatch(/^curvature estimate below its band: curvature cannot be negative/);
    expect(outsideBandReason("curvature", 0.0075, 0.0082, 0.0083)).toMatch(/^curvature estimate below its band: curvature cannot be negative/);
    expect(outsideBandReason("curvature", 0.02, 0.018, 0.019)).toMatch(/^curvature estimate above its band: the bootstrap replicates are centred away/);
    expect(outsideBandReason("|torsion|", 0, 1e-6, 3e-4)).toMatch(/^\|torsion\| estimate below its band: \|torsion\| cannot be negative/);
    expect(outsideBandReason("torsion", 2, 0.5, 1)).toMatch(/^torsion estimate above its band/);
  });
});
