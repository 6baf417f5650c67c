import { describe, expect, it } from "vitest";
import { profilePlot, PROFILE_BOX } from "../../src/report/svg/profilePlot.js";

const s = Float64Array.from({ length: 101 }, (_, i) => 5 + i);
const v = Float64Array.from(s, (x) => 0.02 + 0.01 * Math.sin(x / 10));
const base = { id: "p", title: "t", s, value: v, lo: v.map((x) => x - 0.001), hi: v.map((x) => x + 0.001), xLabel: "s", yLabel: "k", stretches: [], fromZero: true };

describe("profilePlot(input)", () => {
  it("starts the s axis at 0 and leaves headroom above the band", () => {
    const svg = profilePlot(base);
    // the first x tick is 0 at the left edge of the plot box
    expect(svg).toContain(`<text x="${PROFILE_BOX.left}" y="${PROFILE_BOX.height - PROFILE_BOX.bottom + 15}" text-anchor="middle">0</text>`);
    // the top of the band (0.031) sits below the top of the frame: a tick above it exists
    const yTicks = [...svg.matchAll(/text-anchor="end">([\d.]+)<\/text>/g)].map((m) => Number(m[1]));
    expect(Math.max(...yTicks)).toBeGreaterThan(0.031);
  });

  it("shades end zones, bias-flagged zones and network junction zones with their own classes, only where given", () => {
    const svg = profilePlot({ ...base, zones: [{ s0: 5, s1: 15, kind: "end" }, { s0: 50, s1: 52, kind: "bias" }, { s0: 90, s1: 105, kind: "junction" }] });
    expect((svg.match(/class="end-zone"/g) ?? []).length).toBe(1);
    expect((svg.match(/class="junction-zone"/g) ?? []).length).toBe(1);
    expect((svg.match(/class="bias-zone"/g) ?? []).length).toBe(1);
    expect(profilePlot(base)).not.toContain("-zone");
  });
});
