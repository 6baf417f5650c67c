import { describe, expect, it } from "vitest";
import { homogeneousModes, magnonGaps, plainSystem } from "../../src/physics/index.js";

const fm = plainSystem("ferro"), af = plainSystem("antiferro");

/** Root of f on [a, b] by bisection (f changes sign). */
function root(f: (x: number) => number, a: number, b: number): number {
  const fa = Math.sign(f(a));
  for (let i = 0; i < 80; ++i) {
    const m = 0.5 * (a + b);
    if (Math.sign(f(m)) === fa) a = m;
    else b = m;
  }
  return 0.5 * (a + b);
}

describe("linear stability of the homogeneous state (PHYSICS.md section 4, own derivation)", () => {
  // PHYSICS.md table, "AFM homogeneous unstable where" (3 significant figures)
  it.each([[1.0, 0.944], [1.5, 1.85], [2.0, 2.63]])("AFM at tau %s is unstable below kappa %s (within 0.5%)", (tau, kc) => {
    const k = root((x) => homogeneousModes(af, x, tau).margin, 0.3, 5);
    expect(Math.abs(k / kc - 1)).toBeLessThan(0.005); // measured 0.007%, 0.08%, 0.14%
    expect(homogeneousModes(af, 0.9 * kc, tau).unstable).toBe(true);
    expect(homogeneousModes(af, 1.1 * kc, tau).unstable).toBe(false);
  });
  it("AFM at tau 0.9 is unstable only for 0.068 < kappa < 0.692", () => {
    expect(root((x) => homogeneousModes(af, x, 0.9).margin, 0.01, 0.3)).toBeCloseTo(0.068, 3);
    expect(root((x) => homogeneousModes(af, x, 0.9).margin, 0.3, 2)).toBeCloseTo(0.692, 3);
    expect(homogeneousModes(af, 0.03, 0.9).unstable).toBe(false);
  });
  it.each([0.05, 0.1, 0.25, 0.5, 0.75])("AFM at tau %s is never unstable (kappa grid 0..5)", (tau) => {
    for (let k = 0; k <= 5; k += 0.01) expect(homogeneousModes(af, k, tau).unstable).toBe(false);
  });
  // FM "homogeneous unstable above" column; tau = 0: exactly 1
  it.each([[0, 1], [0.05, 0.992], [0.1, 0.997], [0.25, 1.05], [0.5, 1.23], [0.75, 1.47], [1, 1.74], [1.5, 2.35], [2, 3.01]])(
    "FM at tau %s is unstable above kappa %s (within 0.5%)",
    (tau, kc) => {
      const k = root((x) => homogeneousModes(fm, x, tau).margin, 0.5, 5);
      expect(Math.abs(k / kc - 1)).toBeLessThan(0.005); // measured max 0.3% (tau 0.25: 1.0522 vs 1.05)
    },
  );
  // tau_c(kappa) along kappa (independent check in PHYSICS.md)
  it.each([[0.1, 0.87903], [0.3, 0.82963], [0.5, 0.84806], [1, 1.02566], [2, 1.59211], [3, 2.24299]])(
    "AFM at kappa %s turns unstable above tau %s (1e-4 relative)",
    (k, tc) => {
      const t = root((x) => homogeneousModes(af, k, x).margin, 0.5, 5);
      expect(Math.abs(t / tc - 1)).toBeLessThan(1e-4);
      // the same line from the magnons: omega_min^2 < 0 beyond it
      expect(magnonGaps(af, k, tc * 1.01).unstable).toBe(true);
      expect(magnonGaps(af, k, tc * 0.99).unstable).toBe(false);
    },
  );
  it("mirror image (tau -> -tau) leaves the stability margin unchanged", () => {
    for (const [k, t] of [[0.5, 1], [1, 0.5], [2, 2]]) {
      expect(homogeneousModes(af, k, -t).margin).toBeCloseTo(homogeneousModes(af, k, t).margin, 12);
      expect(homogeneousModes(fm, k, -t).margin).toBeCloseTo(homogeneousModes(fm, k, t).margin, 12);
    }
  });
});
