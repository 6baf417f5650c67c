import { describe, expect, it } from "vitest";
import { mulberry32 } from "../../src/frame/mulberry32.js";
import { decisiveCorners, plainSystem, stretchLabels, stretchProbabilities, type StretchContext } from "../../src/physics/index.js";
import type { ReducedSystem } from "../../src/physics/types.js";

const fm = plainSystem("ferro"), af = plainSystem("antiferro");
// the settings buildWireModel uses (PHYSICS.md section 4 asks for h <= 0.2 l)
const MODEL = { hMax: 0.2, scan: 10, refine: 6 } as const;

/** Seeded replicate means spread over a box around (k, t) (half-widths dk, dt). */
function draws(k: number, t: number, dk: number, dt: number, seed: number): { kS: Float64Array; tS: Float64Array } {
  const r = mulberry32(seed);
  const n = 60;
  const kS = Float64Array.from({ length: n }, () => k + dk * (2 * r() - 1)), tS = Float64Array.from({ length: n }, () => t + dt * (2 * r() - 1));
  return { kS, tS };
}

function corners(kS: Float64Array, tS: Float64Array, context: StretchContext): [number, number][] {
  const tt = (x: number) => (context === "helix" ? x : 0);
  const kMin = Math.min(...kS), kMax = Math.max(...kS), tMin = Math.min(...Array.from(tS, tt)), tMax = Math.max(...Array.from(tS, tt));
  return [[kMin, tMin], [kMin, tMax], [kMax, tMin], [kMax, tMax]];
}

describe("label probabilities: the corner searches skipped when the centre decides (decisiveCorners)", () => {
  // Far from the phase boundary the shortcut must give exactly what the four corner searches give;
  // the exact path is the reference (own algorithm, PHYSICS.md section 4). Boxes include the demo's
  // stretches (FM helix, AFM helices on both sides of the boundary) and the PHYSICS.md point (0.3, 0.8).
  const cases: [string, ReducedSystem, StretchContext, number, number, number, number, boolean][] = [
    ["FM helix (0.19, 0.05), homogeneous", fm, "helix", 0.19, 0.05, 0.002, 0.002, false],
    ["FM helix (0.3, 0.2), homogeneous", fm, "helix", 0.3, 0.2, 0.03, 0.03, false],
    ["FM arc kappa 1, periodic (above 2/pi)", fm, "arc", 1, 0, 0.05, 0, true],
    ["AFM helix (0.59, 0.21), homogeneous by a small margin", af, "helix", 0.59, 0.21, 0.002, 0.002, false],
    ["AFM helix (0.3, 0.48), periodic", af, "helix", 0.3, 0.48, 0.01, 0.01, true],
    ["AFM helix (0.3, 0.8), periodic (PHYSICS.md section 4 point)", af, "helix", 0.3, 0.8, 0.03, 0.03, true],
  ];
  it.each(cases)("%s: decided from the centre, the same probabilities as the corner searches", (_name, sys, context, k, t, dk, dt, periodic) => {
    const centre = stretchLabels(sys, context, k, t, MODEL);
    expect(centre.periodic).not.toBeNull();
    expect(centre.state).toBe(periodic ? "periodic" : "homogeneous");
    const { kS, tS } = draws(k, t, dk, dt, 7);
    // the shortcut is taken (else this test would compare the exact path with itself)
    expect(decisiveCorners(sys, k, context === "helix" ? t : 0, centre.periodic!, corners(kS, tS, context))).toBe(periodic);
    const fast = stretchProbabilities(sys, context, kS, tS, MODEL, { kappa: k, tau: t, result: centre.periodic! });
    const exact = stretchProbabilities(sys, context, kS, tS, MODEL);
    expect(fast).toEqual(exact);
  });
  // Straddling the phase boundary (PHYSICS.md section 4 table: AFM tau 1 kappa_c 1.36; FM tau 0.5
  // kappa_c 0.902) the centre must not decide: the corners are searched and the bisection runs.
  it.each([["AFM", af, 1, 1.36, 0.05], ["FM", fm, 0.5, 0.902, 0.04]] as const)("%s box across the boundary at tau %s (kappa_c %s): the centre does not decide", (_n, sys, t, kc, dk) => {
    const centre = stretchLabels(sys, "helix", kc, t, MODEL);
    const box: [number, number][] = [[kc - dk, t - 0.01], [kc - dk, t + 0.01], [kc + dk, t - 0.01], [kc + dk, t + 0.01]];
    expect(decisiveCorners(sys, kc, t, centre.periodic!, box)).toBeNull();
  });
  it("edge cases: an empty texture or a non-finite margin never decides", () => {
    const centre = stretchLabels(af, "helix", 0.3, 0.8, MODEL).periodic!;
    expect(decisiveCorners(af, 0.3, 0.8, { ...centre, texture: new Float64Array(0) }, [[0.3, 0.8]])).toBeNull();
    expect(decisiveCorners(af, 0.3, 0.8, { ...centre, margin: NaN }, [[0.3, 0.8]])).toBeNull();
  });
});
