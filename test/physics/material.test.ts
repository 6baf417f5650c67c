import { Ajv2020 } from "ajv/dist/2020.js";
import { describe, expect, it } from "vitest";
import { materialSchema, parseMaterial, reducedSystem } from "../../src/physics/index.js";

const msg = (json: unknown): string => {
  try {
    parseMaterial(json, "mat.json");
  } catch (e) {
    return (e as Error).message;
  }
  return "no error";
};

describe("parseMaterial", () => {
  it("the shipped schema is valid 2020-12 and compiles under strict ajv", () => {
    const ajv = new Ajv2020({ strict: true, strictRequired: false });
    expect(() => ajv.compile(materialSchema)).not.toThrow();
    expect(materialSchema.$id).toMatch(/material\.schema\.json$/);
  });
  it("derives l = sqrt(A/K) and fills the defaults (temperature 300 K, round cross-section)", () => {
    const m = parseMaterial({ order: "ferro", exchange: 1.3e-11, anisotropy: 5e5, thickness: 20e-9 }, "mat.json");
    expect(m.magneticLength).toBeCloseTo(Math.sqrt(1.3e-11 / 5e5), 20);
    expect(m.temperature).toBe(300);
    expect(m.crossSection).toBeCloseTo((Math.PI * 400e-18) / 4, 25);
    expect(m.intrinsic).toBeNull();
  });
  it("accepts the magnetic length alone (A and K unknown) or with one of them", () => {
    const a = parseMaterial({ order: "antiferro", magneticLength: 5e-9 }, "m.json");
    expect(a.exchange).toBeNull();
    expect(a.anisotropy).toBeNull();
    const b = parseMaterial({ order: "antiferro", magneticLength: 5e-9, anisotropy: 1e5 }, "m.json");
    expect(b.exchange).toBeCloseTo(1e5 * 25e-18, 25);
  });
  it("names the field, the unit and the range for a bad number", () => {
    expect(msg({ order: "ferro", exchange: -1, anisotropy: 5e5 })).toBe("mat.json: material.exchange: must be a positive number in J/m, range (0, 1e-8] (got -1)");
    expect(msg({ order: "ferro", exchange: "x", anisotropy: 5e5 })).toBe('mat.json: material.exchange: must be a positive number in J/m, range (0, 1e-8] (got "x")');
    expect(msg({ order: "antiferro", magneticLength: 5e-9, temperature: -3 })).toBe("mat.json: material.temperature: must be a positive number in K, range (0, 10000] (got -3)");
    expect(msg({ order: "ferro", magneticLength: 2 })).toBe("mat.json: material.magneticLength: must be a number in m, range [1e-11, 0.0001] (got 2)");
  });
  it("rejects a bad order, unknown properties, missing lengths and an over-determined material", () => {
    expect(msg({ order: "fm", magneticLength: 5e-9 })).toBe('mat.json: material.order: must be one of "ferro", "antiferro" (got "fm")');
    expect(msg({ order: "ferro", magneticLength: 5e-9, extra: 1 })).toBe("mat.json: material: unknown property 'extra'");
    expect(msg({ order: "ferro" })).toBe("mat.json: material: give exchange (J/m) and anisotropy (J/m^3), or magneticLength (m), or (FM) exchange and saturationMagnetisation (A/m)");
    expect(msg({ magneticLength: 5e-9 })).toBe("mat.json: material.order: missing required property");
    expect(msg({ order: "ferro", magneticLength: 5e-9, exchange: 1e-11, anisotropy: 1e5 })).toMatch(/give at most two of exchange, anisotropy and magneticLength/);
    expect(msg([1])).toBe("mat.json: material: must be a JSON object (got an array)");
    expect(msg(null)).toBe("mat.json: material: must be a JSON object (got null)");
  });
  it("checks the intrinsic term and needs K to scale it", () => {
    expect(msg({ order: "ferro", magneticLength: 5e-9, intrinsic: { constant: 1e4, axis: "up" } })).toBe('mat.json: material.intrinsic.axis: must be one of "tangent", "normal", "binormal", "lab" (got "up")');
    expect(msg({ order: "ferro", magneticLength: 5e-9, intrinsic: { constant: 1e4, axis: "normal" } })).toMatch(/material\.intrinsic: needs the anisotropy K/);
    const m = parseMaterial({ order: "antiferro", exchange: 1e-12, anisotropy: 1e5, intrinsic: { constant: 2e4, axis: "binormal" } }, "m.json");
    // reduced tensor: +T T^T - (K_i/K) B B^T
    expect(Array.from(reducedSystem(m).q)).toEqual([1, 0, 0, 0, 0, 0, 0, 0, -0.2]);
  });
});
