import { describe, expect, it } from "vitest";
import { buildWireOutputs } from "../../src/export/wireOutputs.js";
import { escapeHtml, inlineScript, scriptJson } from "../../src/report/escapeHtml.js";
import { analysisFixture } from "./analysisFixture.js";

const EVIL = `wire<script>alert("x")</script>&'.csv`;
const VIEWER = "/* viewer stub */ window.__viewer = '</script><!--';";

async function report(material: boolean): Promise<string> {
  const a = analysisFixture({ material, pinning: false, file: EVIL });
  const out = await buildWireOutputs(a, { unit: "nm", viewerScript: VIEWER });
  return out.files.find((f) => f.name === "report.html")!.data as string;
}

describe("escapeHtml, scriptJson, inlineScript", () => {
  it("escape the five HTML-special characters, and keep script blocks closed", () => {
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe("&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;");
    expect(scriptJson({ f: "</script><!--" })).toBe('{"f":"\\u003c/script>\\u003c!--"}');
    expect(JSON.parse(scriptJson({ f: "</script>\u2028" }))).toEqual({ f: "</script>\u2028" });
    expect(inlineScript("a='</script>';b='<!--'")).toBe("a='<\\/script>';b='<\\!--'");
  });
});

describe("buildReport(input)", () => {
  it("escapes a file name holding <script>: the page has exactly its own two script blocks", async () => {
    const html = await report(true);
    expect(html).not.toContain("<script>alert");
    expect(html).toContain("wire&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;&amp;&#39;.csv");
    expect(html.match(/<script/g)?.length).toBe(2);
    expect(html.match(/<\/script>/g)?.length).toBe(2);
    const data = /<script type="application\/json" id="report-data">(.*?)<\/script>/s.exec(html);
    expect(data).not.toBeNull();
    const parsed = JSON.parse(data![1]) as { unit: string; points: string };
    expect(parsed.unit).toBe("nm");
    expect(Buffer.from(parsed.points, "base64").length % 12).toBe(0); // float32 x, y, z
  });

  it("says these are model estimates and where the model stops being valid, and shows every section", async () => {
    const html = await report(true);
    expect(html).toContain("These are model estimates, not measurements.");
    expect(html).toMatch(/valid only for a thin wire whose curvature and torsion radii are much larger than the lattice spacing and the wire thickness/);
    for (const id of ["summary", "warnings", "profiles", "view3d", "phase", "pinning", "stretches"]) expect(html).toContain(`<section id="${id}">`);
    for (const id of ["kappa-plot", "tau-plot", "phase-map"]) expect(html).toContain(`id="${id}"`);
    expect(html).toContain('http-equiv="Content-Security-Policy"'); // no network, even by accident
    expect(html).not.toMatch(/(src|href)="https?:/);
  });

  it("without a material keeps the geometry and says what a material would add", async () => {
    const html = await report(false);
    expect(html).toContain('id="kappa-plot"');
    expect(html).not.toContain('id="phase-map"');
    expect(html).toMatch(/Give a material \(<code>--material material\.json<\/code>/);
    expect(html).toContain("geometry only: no material given");
  });
});
