/**
 * Round trip through the tool's own files: analyze a noisy helix, read its tube mesh (wire.ply) back
 * with `profile`, and compare the curvature. The reference is the first profile itself (and the
 * helix closed form kappa = r/(r^2+c^2), https://en.wikipedia.org/wiki/Helix); a mesh centre line
 * must not be interpolated facet by facet (NUMERICS.md sec. 7 item 7).
 */
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { run } from "./harness.js";
import { helixCsv, write } from "./wireFiles.js";

const root = mkdtempSync(join(tmpdir(), "twistline-roundtrip-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** Interior (flag 4 clear) kappa and tau columns of a profile CSV. */
function columns(text: string): { kappa: number[]; tau: number[] } {
  const lines = text.split("\n").filter((l) => l !== "" && !l.startsWith("#"));
  const head = lines[0].split(",");
  const k = head.indexOf("kappa"), t = head.indexOf("tau"), f = head.indexOf("flags");
  const rows = lines.slice(1).map((l) => l.split(",").map(Number)).filter((r) => (r[f] & 4) === 0);
  return { kappa: rows.map((r) => r[k]), tau: rows.map((r) => r[t]).filter(Number.isFinite) };
}
const median = (a: number[]) => [...a].sort((x, y) => x - y)[a.length >> 1];

describe("analyze -> wire.ply -> profile", () => {
  it("reproduces the median curvature within 2% and the torsion within 5%", async () => {
    const input = write(join(root, "helix.csv"), helixCsv(5, 240));
    const a = await run(["analyze", input, "--out", join(root, "a"), "--radius", "4nm", "--bootstrap", "30", "--quiet"]);
    expect(a.code, a.stderr).toBe(0);
    const b = await run(["profile", join(root, "a", "wire.ply"), "--unit", "nm", "--out", join(root, "back.csv"), "--bootstrap", "30", "--quiet"]);
    expect(b.code, b.stderr).toBe(0);
    const first = columns(readFileSync(join(root, "a", "profile.csv"), "utf8"));
    const back = columns(readFileSync(join(root, "back.csv"), "utf8"));
    const k0 = 30 / (30 * 30 + 8 * 8); // closed form of the helix traced, 1/nm
    expect(Math.abs(median(first.kappa) / k0 - 1)).toBeLessThan(0.02);
    expect(Math.abs(median(back.kappa) / median(first.kappa) - 1)).toBeLessThan(0.02);
    expect(Math.abs(median(back.tau) / median(first.tau) - 1)).toBeLessThan(0.05);
  });
});
