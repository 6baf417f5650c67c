import { describe, expect, it } from "vitest";
import { makeChain } from "../../src/physics/chain.js";
import { parseMaterial, pinningLandscape, plainSystem, reducedSystem, relaxWire } from "../../src/physics/index.js";

const fm = plainSystem("ferro");

/** An open uniform chain (reduced units) with an optional constant local field and node tensor. */
function chainWith(n: number, h: number, kappa: number, tau: number, field: number[] | null, tensor: number[] | null = null, q = fm.q) {
  const k = new Float64Array(n).fill(kappa), t = new Float64Array(n).fill(tau);
  const base = makeChain(k, t, new Float64Array(n - 1).fill(h), q, "open");
  const rep = (v: number[] | null, m: number) => (v === null ? null : Float64Array.from({ length: m * n }, (_, i) => v[i % m]));
  return { chain: { ...base, field: rep(field, 3), nodeTensor: rep(tensor, 9) }, k, t };
}

describe("applied field (Zeeman term -h . m, h = mu0 Ms H / K)", () => {
  // Uniform states of a straight wire are exact solutions of the 1D model: e = -(m.T)^2 - h . m.
  // Along the axis: m = T, e = -1 - h. Across (h < 2): sin(theta) = h/2, e = -1 - h^2/4
  // (Stoner-Wohlfarth hard-axis solution, common practice).
  it.each([[0.3], [1.2]])("straight wire, field %s along the axis: energy -L (1 + h)", (hz) => {
    const { chain, k, t } = chainWith(201, 0.1, 0, 0, [hz, 0, 0]);
    const r = relaxWire(chain, fm, k, t);
    expect(r.energy / (-20 * (1 + hz)) - 1).toBeCloseTo(0, 9);
  });
  it.each([[0.5], [1.5]])("straight wire, field %s across the axis: sin(theta) = h/2, energy -L (1 + h^2/4)", (hx) => {
    const { chain, k, t } = chainWith(201, 0.1, 0, 0, [0, hx, 0]);
    const r = relaxWire(chain, fm, k, t);
    expect(r.energy / (-20 * (1 + (hx * hx) / 4)) - 1).toBeCloseTo(0, 8);
    expect(Math.abs(r.local[3 * 100 + 1])).toBeCloseTo(hx / 2, 6);
  });
  it("helix (1, 0.5) with a field along its axis (constant local components): bulk tilt = minimum of the homogeneous energy", () => {
    // local energy of a homogeneous state in the T-B plane (PHYSICS.md section 2 with |u'|^2 =
    // |D|^2 - (D . u)^2 for constant local components), plus -h D/|D| . u; minimised by a scan
    const kap = 1, tau = 0.5, hz = 0.4, dn = Math.hypot(kap, tau);
    const a = [tau / dn, 0, kap / dn];
    const e = (psi: number) => {
      const uT = Math.cos(psi), uB = Math.sin(psi);
      return kap * kap + tau * tau - (tau * uT + kap * uB) ** 2 - uT * uT - hz * (a[0] * uT + a[2] * uB);
    };
    let best = 0, eb = Infinity;
    for (let psi = -Math.PI; psi < Math.PI; psi += 1e-5) if (e(psi) < eb) { eb = e(psi); best = psi; }
    const { chain, k, t } = chainWith(801, 0.05, kap, tau, a.map((x) => hz * x));
    const r = relaxWire(chain, fm, k, t);
    const i = 400, psi = Math.atan2(r.local[3 * i + 2], r.local[3 * i]);
    expect(Math.abs(psi - best) * (180 / Math.PI)).toBeLessThan(0.05); // target 0.5 deg
    expect(Math.abs(r.local[3 * i + 1])).toBeLessThan(1e-6);
  });
  it("a wall on a straight wire in a field along +T: U(q) falls by 2 h per unit of displacement (Zeeman energy of the reversed domain)", () => {
    const hz = 0.05;
    const { chain, k, t } = chainWith(701, 0.05, 0, 0, [hz, 0, 0]);
    const s = Float64Array.from({ length: 701 }, (_, i) => i * 0.05);
    const bg = relaxWire(chain, fm, k, t);
    const u = pinningLandscape(chain, s, bg.local, k, "ferro", { nodes: [300, 400] }).energy;
    expect(((u[1] - u[0]) / 5) / (-2 * hz) - 1).toBeCloseTo(0, 4);
  });
});

describe("intrinsic axis fixed in the lab", () => {
  it("on a straight wire along x, a lab axis along x equals the local tangent axis (invariance)", () => {
    const local = reducedSystem({ order: "ferro", anisotropy: 1e5, intrinsic: { constant: 3e4, axis: "tangent" } });
    const a = chainWith(101, 0.1, 0, 0, null, null, local.q);
    const ra = relaxWire(a.chain, local, a.k, a.t);
    // lab x = local T on this straight wire: tensor -(Ki/K) T T^T at every node
    const b = chainWith(101, 0.1, 0, 0, null, [-0.3, 0, 0, 0, 0, 0, 0, 0, 0]);
    const rb = relaxWire(b.chain, fm, b.k, b.t);
    expect(rb.energy).toBeCloseTo(ra.energy, 10);
    expect(ra.energy).toBeCloseTo(-10 * 1.3, 10); // -(1 + Ki/K) L
  });
  it("parseMaterial: lab axis with a direction, field needs Ms, errors name the field", () => {
    const m = parseMaterial({ order: "ferro", exchange: 1e-11, saturationMagnetisation: 8e5, intrinsic: { constant: 1e4, axis: "lab", direction: [0, 0, 2] }, anisotropy: 4e5 }, "m.json");
    expect(m.intrinsic!.direction).toEqual([0, 0, 1]);
    expect(() => parseMaterial({ order: "ferro", magneticLength: 5e-9, appliedField: { field: 1e4, direction: [1, 0, 0] } }, "m.json")).toThrow(
      "m.json: material.appliedField: needs saturationMagnetisation (A/m) for the Zeeman energy mu0 Ms H",
    );
    expect(() => parseMaterial({ order: "ferro", magneticLength: 5e-9, anisotropy: 1e5, intrinsic: { constant: 1e4, axis: "lab", direction: [0, 0, 0] } }, "m.json")).toThrow(
      "m.json: material.intrinsic.direction: must be a non-zero lab direction [x, y, z] (got [0,0,0])",
    );
    expect(() => parseMaterial({ order: "antiferro", magneticLength: 5e-9, saturationMagnetisation: 1e5 }, "m.json")).toThrow(/applies to order "ferro" only/);
  });
  it("Ms without K: K = mu0 Ms^2 / 4, the shape anisotropy of a round wire", () => {
    // mu0 = 1.25663706212e-6 (CODATA 2018); Ms 8e5 A/m -> K = 2.0106e5 J/m^3
    const m = parseMaterial({ order: "ferro", exchange: 1.3e-11, saturationMagnetisation: 8e5 }, "m.json");
    expect(m.anisotropy! / ((1.25663706212e-6 * 8e5 * 8e5) / 4) - 1).toBeCloseTo(0, 12);
    expect(m.anisotropy!).toBeCloseTo(2.0106e5, -1);
    expect(m.anisotropyFromShape).toBe(true);
    expect(m.magneticLength).toBeCloseTo(Math.sqrt(1.3e-11 / m.anisotropy!), 20);
  });
});
