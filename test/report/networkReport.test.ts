/** The network page (src/report/networkReport.ts): structure, links, escaping. Invented three-branch star. */
import { describe, expect, it } from "vitest";
import { assembleNetwork } from "../../src/import/network/assembleNetwork.js";
import { buildNetworkPage } from "../../src/report/networkReport.js";

function line(a: number[], b: number[], n = 30): Float64Array {
  return Float64Array.from(Array.from({ length: n }, (_, i) => [0, 1, 2].map((k) => a[k] + ((b[k] - a[k]) * i) / (n - 1))).flat());
}

describe("buildNetworkPage", () => {
  const file = 'star<script>alert("x")</script>.stl';
  const raw = [[1, 0, 0], [-0.5, Math.sqrt(3) / 2, 0], [-0.5, -Math.sqrt(3) / 2, 0]].map((d, i) => ({
    xyz: line([2 * d[0], 2 * d[1], 0], [30 * d[0], 30 * d[1], 0]),
    from: { kind: "junction" as const, index: 0 },
    to: { kind: "end" as const, node: i + 1 },
    closed: false,
    component: 0,
    diagnostics: [],
  }));
  const net = assembleNetwork(raw, [{ x: 0.3, y: 0.2, z: 0, scale: 1 }], {
    source: { file, unit: "nm" },
    fmtP: (x, y, z) => `(${x}, ${y}, ${z})`,
    fmtL: (v) => `${v}`,
    diagnostics: ["note with <b>markup</b>"],
  });
  it("the three branches meet at the origin (least squares over straight axes) at 120 degrees apart (construction, to 1 degree)", () => {
    // the weak prior (weight 1e-3 per line) pulls by about 1e-3 of the prior's offset (0.36): measured 7.3e-4
    expect(Math.hypot(...net.junctions[0].position)).toBeLessThan(1.5e-3);
    for (const a of net.junctions[0].angles) expect(Math.abs(a.degrees - 120)).toBeLessThan(1);
    expect(net.cycles).toBe(0);
  });
  it("links every branch report, escapes file strings, and marks a failed branch", () => {
    const html = buildNetworkPage(net, [
      { folder: "branch-1", view: null, error: "bad <thing>" },
      { folder: "branch-2", view: { x: [0, 1, 2], y: [0, 0, 0], z: [0, 0, 0], kappa: [0, 0.1, 0.2], zone: [1, 0, 0], length: 2, kappaMedian: 0.1, stretches: 1, pinning: [], hasModel: false }, error: null },
      { folder: "branch-3", view: null, error: null },
    ], { unit: "nm", title: `Wire network: ${file}`, tool: "twistline test" });
    expect(html).not.toContain("<script>");
    expect(html).toContain("star&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;.stl");
    expect(html).toContain("note with &lt;b&gt;markup&lt;/b&gt;");
    expect(html).toContain("not analysed: bad &lt;thing&gt;");
    expect(html).toContain('href="branch-2/report.html"');
    expect(html).toMatch(/<td>J1<\/td>/);
    expect(html).toMatch(/<svg [^>]*role="img"/);
  });
});
