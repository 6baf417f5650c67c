import { describe, expect, it } from "vitest";
import { antiferroEnergy, ellipticKE, ferroEnergy, ferroRingEnergies, ferroRingSwitch, homogeneousState, plainSystem, tiltAntiferro, tiltFerro } from "../../src/physics/index.js";
import { mulberry32 } from "../support/rng.js";

const DEG = 180 / Math.PI;
const fm = plainSystem("ferro"), af = plainSystem("antiferro");

// PHYSICS.md section 3 check values (kappa, tau) -> psi_FM, theta_AFM in degrees (own derivation,
// verified by minimisation; FM form published in Sheka, Kravchuk, Gaididei, J. Phys. A 48, 125202 (2015)).
const TILTS: [number, number, number, number][] = [
  [0.25, 0.25, 3.5625, 3.5625], [0.5, 0.25, 8.5514, 5.9443], [0.5, 0.5, 13.2825, 13.2825],
  [1, 0.5, 37.9819, 14.8724], [0.5, 1, 14.8724, 37.9819], [1, 1, 31.7175, 31.7175],
  [2, 1, 58.2825, 22.5], [0.25, 2, 5.7247, 80.6001],
];

describe("homogeneous tilt (closed forms)", () => {
  it.each(TILTS)("tiltFerro/tiltAntiferro(%s, %s) match the PHYSICS.md table within 1e-4 deg", (k, t, psi, theta) => {
    // target 0.5 deg; measured max deviation 5e-5 deg (table rounding)
    expect(Math.abs(tiltFerro(k, t) * DEG - psi)).toBeLessThan(1e-4);
    expect(Math.abs(tiltAntiferro(k, t) * DEG - theta)).toBeLessThan(1e-4);
  });
  it.each(TILTS)("homogeneousState eigen-solve equals the closed forms at (%s, %s)", (k, t, psi, theta) => {
    expect(Math.abs(homogeneousState(fm, k, t).tilt * DEG - psi)).toBeLessThan(1e-4);
    expect(Math.abs(homogeneousState(af, k, t).tilt * DEG - theta)).toBeLessThan(1e-4);
  });
  it("AFM e0 is exactly 2 - golden ratio at (1,1) and 3 - 2 sqrt 2 at (2,1) (PHYSICS.md section 3, own derivation)", () => {
    expect(antiferroEnergy(1, 1)).toBeCloseTo(2 - (1 + Math.sqrt(5)) / 2, 12);
    expect(antiferroEnergy(2, 1)).toBeCloseTo(3 - 2 * Math.SQRT2, 12);
    expect(homogeneousState(af, 1, 1).energy).toBeCloseTo(0.381966, 6);
  });
  it("mirror image (tau -> -tau) flips the sign of the tilt and keeps the energy (property, seeded)", () => {
    const r = mulberry32(11);
    for (let i = 0; i < 200; ++i) {
      const k = 3 * r(), t = 3 * r() - 1.5;
      for (const sys of [fm, af]) {
        const a = homogeneousState(sys, k, t), b = homogeneousState(sys, k, -t);
        expect(b.tilt).toBeCloseTo(-a.tilt, 9);
        expect(b.energy).toBeCloseTo(a.energy, 12);
      }
      expect(homogeneousState(fm, k, t).energy).toBeCloseTo(ferroEnergy(k, t), 12);
      expect(homogeneousState(af, k, t).energy).toBeCloseTo(antiferroEnergy(k, t), 12);
    }
  });
  it("straight wire limit: FM along T (tilt 0, e = -1), AFM in the easy plane (e = 0)", () => {
    expect(homogeneousState(fm, 0, 0).tilt).toBe(0);
    expect(homogeneousState(fm, 0, 0).energy).toBeCloseTo(-1, 14);
    expect(homogeneousState(af, 0, 0).energy).toBeCloseTo(0, 14);
    expect(homogeneousState(af, 0.7, NaN).energy).toBeCloseTo(0, 14); // ring: n = B, e = 0
  });
});

describe("complete elliptic integrals", () => {
  it("ellipticKE(0.5) matches Abramowitz & Stegun table 17.1 (K = 1.85407468, E = 1.35064388)", () => {
    const { k, e } = ellipticKE(0.5);
    expect(k).toBeCloseTo(1.8540746773, 9);
    expect(e).toBeCloseTo(1.3506438810, 9);
  });
  it("ellipticKE at m = 0 gives pi/2 twice and diverges logarithmically as m -> 1 (A&S 17.3.26)", () => {
    expect(ellipticKE(0).k).toBeCloseTo(Math.PI / 2, 14);
    expect(ellipticKE(0).e).toBeCloseTo(Math.PI / 2, 14);
    const m1 = 1e-12;
    expect(ellipticKE(1 - m1, m1).k).toBeCloseTo(Math.log(4 / Math.sqrt(m1)), 9);
    expect(ellipticKE(1.2).k).toBeNaN();
  });
});

describe("FM ring: vortex and onion (PHYSICS.md section 3, own derivation)", () => {
  // kappa -> vortex / onion energies
  const RING: [number, number, number][] = [[0.25, -0.9375, -0.744186], [0.5, -0.75, -0.608707], [0.7, -0.51, -0.561007], [1, 0, -0.530895], [2, 3, -0.507807]];
  it.each(RING)("ferroRingEnergies(%s) = %s / %s to 1e-6", (k, v, o) => {
    const r = ferroRingEnergies(k);
    expect(r.vortex).toBeCloseTo(v, 10);
    expect(Math.abs(r.onion - o)).toBeLessThan(1e-6); // measured 5e-7 (table rounding)
  });
  it("the ground state switches at kappa 0.65689717 (radius 1.522308 l, e = -0.568486)", () => {
    const k = ferroRingSwitch();
    expect(Math.abs(k - 0.65689717)).toBeLessThan(1e-7);
    expect(Math.abs(1 / k - 1.522308)).toBeLessThan(1e-6);
    expect(Math.abs(ferroRingEnergies(k).onion + 0.568486)).toBeLessThan(1e-6);
  });
  it("large rings: the onion tends to the straight-wire energy -1 plus 4 per wall pair (4 kappa/pi), an edge case", () => {
    const k = 0.02;
    // two walls of energy 4 in a length 2 pi / kappa: e ~ -1 + 8 kappa / (2 pi) - kappa^2 (common practice check)
    expect(ferroRingEnergies(k).onion).toBeCloseTo(-1 + (4 * k) / Math.PI - k * k, 6);
    expect(ferroRingEnergies(0).onion).toBeNaN();
  });
});
