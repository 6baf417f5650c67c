import { describe, expect, it } from "vitest";
import { fitProfile } from "../../../src/frame/profile.js";
import { orderCloud } from "../../../src/import/cloud/orderCloud.js";
import type { Trace } from "../../../src/types.js";
import { mulberry32, normalStream } from "../../support/rng.js";

// Skips itself while the geometry core's fitProfile is a placeholder (detected once, here).
const notImplemented = (() => {
  try {
    fitProfile({ xyz: new Float64Array(30), dims: 3, source: { file: "probe", unit: "nm" }, diagnostics: [] }, { bootstrap: 0 });
    return false;
  } catch (e) {
    return /not implemented/.test(String(e));
  }
})();

// Invented cloud: 2 turns of a helix of radius 60 nm and pitch 40 nm, 1000 points, noise sd 1 nm,
// shuffled. Reference: the helix (r cos t, r sin t, c t) has curvature r / (r^2 + c^2) and torsion
// c / (r^2 + c^2) (https://en.wikipedia.org/wiki/Helix, "Mathematical description").
const r = 60e-9, c = 40e-9 / (2 * Math.PI);
const kappa = r / (r * r + c * c), tau = c / (r * r + c * c);

const median = (a: number[]) => a.sort((x, y) => x - y)[Math.floor(a.length / 2)];

/** Median relative errors of kappa and tau over the middle 80% of the profile (the ends are biased). */
function errors(t: Trace): { k: number; t: number } {
  const p = fitProfile(t, { bootstrap: 0 });
  const ek: number[] = [], et: number[] = [];
  for (let i = Math.floor(0.1 * p.n); i < Math.floor(0.9 * p.n); i++) {
    ek.push(Math.abs(p.kappa[i] - kappa) / kappa);
    et.push(Math.abs(p.tau[i] - tau) / tau);
  }
  return { k: median(ek), t: median(et) };
}

describe.skipIf(notImplemented)("orderCloud result profiles as well as the same points in order", () => {
  it("gives mean kappa and tau errors within 1.2x of those from the truly ordered points (6 seeded clouds)", () => {
    // One realisation is not enough: swapping neighbours within the noise changes the fit's smoothing
    // level a little, either way (measured tau error ratios 0.74 to 1.33 per seed), so compare means.
    const source = { file: "helix.xyz", unit: "nm" } as const;
    let kTrue = 0, tTrue = 0, kRec = 0, tRec = 0;
    for (let seed = 1; seed <= 6; seed++) {
      const n = 1000, g = normalStream(7 * seed), rnd = mulberry32(seed);
      const ordered = new Float64Array(3 * n);
      for (let i = 0; i < n; i++) {
        const t = (4 * Math.PI * i) / (n - 1);
        ordered.set([r * Math.cos(t) + 1e-9 * g(), r * Math.sin(t) + 1e-9 * g(), c * t + 1e-9 * g()], 3 * i);
      }
      const perm = Array.from({ length: n }, (_, i) => i).sort(() => rnd() - 0.5);
      const shuffled = new Float64Array(3 * n);
      perm.forEach((p, i) => shuffled.set(ordered.subarray(3 * p, 3 * p + 3), 3 * i));
      const a = errors({ xyz: ordered, closed: false, dims: 3, source, diagnostics: [] });
      const b = errors(orderCloud(shuffled, "helix.xyz", { unit: "nm" }).trace);
      kTrue += a.k / 6;
      tTrue += a.t / 6;
      kRec += b.k / 6;
      tRec += b.t / 6;
    }
    // measured (geometry core of commit f892c0f): kappa 4.5e-3 vs 4.5e-3; tau 4.0e-2 (recovered) vs 4.0e-2 (true order)
    expect(kRec).toBeLessThanOrEqual(1.2 * kTrue);
    expect(tRec).toBeLessThanOrEqual(1.2 * tTrue);
    expect(kTrue).toBeLessThan(0.02); // the reference fit itself is sound (closed-form helix curvature)
  });
});
