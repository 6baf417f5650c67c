import { describe, expect, it } from "vitest";
import { analyze, InputError, profile, toTrace } from "../../src/index.js";
import { normalStream } from "../support/rng.js";

// invented noisy helix, radius 30 nm, c = 8 nm per radian: kappa = 30 / (30^2 + 8^2) = 0.03112 1/nm,
// tau = 8 / 964 = 0.008299 1/nm (https://en.wikipedia.org/wiki/Helix)
const g = normalStream(4);
const rows: number[][] = [];
for (let i = 0; i < 200; ++i) {
  const t = (4 * Math.PI * i) / 199;
  rows.push([30 * Math.cos(t) + 0.1 * g(), 30 * Math.sin(t) + 0.1 * g(), 8 * t + 0.1 * g()]);
}

describe('the library API (import { profile, analyze } from "twistline")', () => {
  it("profile(xyz rows + unit) gives kappa and tau in 1/m near the helix closed form", () => {
    const p = profile({ xyz: rows, unit: "nm" }, { bootstrap: 20 });
    const mid = p.n >> 1;
    expect(Math.abs(p.kappa[mid] / (30 / 964 * 1e9) - 1)).toBeLessThan(0.03);
    expect(Math.abs(p.tau[mid] / (8 / 964 * 1e9) - 1)).toBeLessThan(0.1);
    expect(p.source.unit).toBe("nm");
  });

  it("toTrace takes interleaved arrays and 2-column rows (planar), and refuses ragged or non-finite input", () => {
    expect(toTrace({ xyz: [0, 0, 0, 1, 0, 0, 2, 1, 0, 3, 3, 0], unit: "um" }).xyz[3]).toBe(1 / 1e6);
    expect(toTrace({ xyz: [[0, 0], [1, 0], [2, 1], [3, 3]] }).dims).toBe(2);
    expect(() => toTrace({ xyz: [[0, 0, 0], [1, 0]] })).toThrow(/row 1 has 2 numbers, expected 3/);
    expect(() => toTrace({ xyz: [0, 0, Number.NaN, 1, 1, 1, 2, 2, 2, 3, 3, 3] })).toThrow(/value 2 is not a finite number/);
    expect(() => toTrace({ xyz: [[0, 0, 0], [1, 1, 1]] })).toThrow(InputError);
  });

  it("analyze(input, { material: json }) runs the model; without a material it is geometry only", () => {
    const a = analyze({ xyz: rows, unit: "nm" }, { bootstrap: 20, material: { order: "ferro", exchange: 1.3e-11, anisotropy: 2e5 } });
    expect(a.model).not.toBeNull();
    expect(a.model!.segments.length).toBe(a.segments.length);
    expect(a.material!.magneticLength).toBeCloseTo(Math.sqrt(1.3e-11 / 2e5), 15);
    const geo = analyze({ xyz: rows, unit: "nm" }, { bootstrap: 0 });
    expect(geo.model).toBeNull();
    expect(geo.segments.length).toBeGreaterThan(0);
  });
});
