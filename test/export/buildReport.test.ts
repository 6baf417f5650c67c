import { describe, expect, it } from "vitest";
import { buildWireOutputs } from "../../src/export/wireOutputs.js";
import { wireSummary } from "../../src/export/wireSummary.js";
import { escapeHtml, inlineScript, scriptJson } from "../../src/report/escapeHtml.js";
import { analysisFixture } from "./analysisFixture.js";
import { FLAG_JUNCTION_ZONE } from "../../src/types.js";

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

/** Half a unit in the last printed place of a number as the report writes it ("0.023416", "-2.59e-4", "13.0"). */
function halfUlp(text: string): number {
  const m = /^-?\d+(?:\.(\d+))?(?:e(-?\d+))?$/.exec(text);
  if (m === null) throw new Error(`not a report number: ${text}`);
  return 0.5 * 10 ** (Number(m[2] ?? 0) - (m[1]?.length ?? 0));
}

/** Expects the printed `text` to be `value` rounded to the printed digits. */
function printedAs(text: string, value: number | null, where: string): void {
  if (value === null) { expect(text, where).toBe("n/a"); return; }
  expect(Math.abs(Number(text) - value), `${where}: ${text} vs ${value}`).toBeLessThanOrEqual(halfUlp(text) * (1 + 1e-9) + Math.abs(value) * 1e-12);
}

describe("buildReport numbers", () => {
  it("every number of the stretch, pinning and material tables equals model.json's, to the digits printed", async () => {
    // At 1 K the pinning site at the curvature step is deep enough (over 1 k_B T) to be listed.
    const a = analysisFixture({ material: true, temperature: 1 });
    const out = await buildWireOutputs(a, { unit: "nm", viewerScript: VIEWER });
    const html = out.files.find((f) => f.name === "report.html")!.data as string;
    const doc = out.document;
    const rows = [...html.matchAll(/<tr class="stretch">(.*?)<\/tr>/gs)].map((m) => [...m[1].matchAll(/<td[^>]*>(.*?)<\/td>/gs)].map((c) => c[1]));
    expect(rows.length).toBe(doc.segments.length);
    rows.forEach((cells, i) => {
      const g = doc.segments[i];
      const [s0, s1] = cells[2].split("\u2013");
      printedAs(s0, g.s0, `stretch ${i + 1} s0`);
      printedAs(s1, g.s1, `stretch ${i + 1} s1`);
      for (const [cell, v, lo, hi, name] of [[cells[3], g.kappa, g.kappaLo, g.kappaHi, "kappa"], [cells[4], g.tau, g.tauLo, g.tauHi, "tau"]] as const) {
        const m = /^(\S+)(?:<br><span class="small">\[(\S+), (\S+)\]<\/span>)?$/.exec(cell)!;
        printedAs(m[1], v, `stretch ${i + 1} ${name}`);
        if (m[2] !== undefined) { printedAs(m[2], lo, `stretch ${i + 1} ${name} lo`); printedAs(m[3], hi, `stretch ${i + 1} ${name} hi`); }
      }
      const [kr, tr] = cells[6].split("<br>"); // cells[5]: the fitted shape
      printedAs(kr, g.kappaReduced, `stretch ${i + 1} kappa l`);
      printedAs(tr, g.tauReduced, `stretch ${i + 1} tau l`);
      const [tilt, dmi] = cells[8].split("<br>");
      printedAs(tilt, g.tiltDeg, `stretch ${i + 1} tilt`);
      printedAs(dmi.replace(" mJ/m\u00b2", ""), g.dmi === null ? null : g.dmi * 1e3, `stretch ${i + 1} DMI (mJ/m^2)`);
    });
    const pins = [...html.matchAll(/<tr><td class="num">(\d+)<\/td>(.*?)<\/tr>/gs)].map((m) => [m[1], ...[...m[2].matchAll(/<td[^>]*>(.*?)<\/td>/gs)].map((c) => c[1])]);
    expect(pins.length).toBe(Math.min(12, doc.pinning.length));
    expect(doc.pinning.length).toBeGreaterThan(0);
    pins.forEach((cells, i) => {
      const site = doc.pinning[i];
      expect(Number(cells[0])).toBe(site.rank);
      printedAs(cells[1], site.s, `site ${site.rank} s`);
      printedAs(cells[2].replace(" zJ", ""), site.depthJ === null ? null : site.depthJ * 1e21, `site ${site.rank} depth zJ`);
      // 1 eV = 1.602176634e-19 J (exact, SI 2019)
      printedAs(cells[3].replace(" meV", ""), site.depthJ === null ? null : (site.depthJ / 1.602176634e-19) * 1e3, `site ${site.rank} depth meV`);
      printedAs(cells[4], site.depthKT, `site ${site.rank} depth kT`);
    });
    const fact = (label: string): string => new RegExp(`<tr><td>${label}</td><td>(.*?)</td></tr>`).exec(html)![1];
    printedAs(fact("exchange A").replace(" pJ/m", ""), doc.material!.exchange! * 1e12, "exchange");
    printedAs(fact("anisotropy K").replace(" kJ/m\u00b3", ""), doc.material!.anisotropy! / 1e3, "anisotropy");
    printedAs(fact("magnetic length l").replace(" nm", ""), doc.material!.magneticLength, "magnetic length");
    printedAs(fact("length of the fitted centre line").replace(" nm", ""), doc.geometry.length, "length");
    // mean |tau| is the mean of |tau| (wireSummary, the same numbers as summary.csv), with its band
    const s = wireSummary(a, doc);
    const cell = html.split("<tr><td>mean |torsion| (of |\u03c4|, arc-length weighted)</td><td>")[1].split("</td>")[0];
    const m = /^(\S+) 1\/nm <span class="small">\[(\S+), (\S+)\]<\/span>$/.exec(cell)!;
    printedAs(m[1], s.tauAbsMean.value, "mean |tau|");
    printedAs(m[2], s.tauAbsMean.lo, "mean |tau| lo");
    printedAs(m[3], s.tauAbsMean.hi, "mean |tau| hi");
  });
});

describe("buildReport zones", () => {
  it("shades the samples of a network junction zone (flag 32) and says what the shade means", async () => {
    const a = analysisFixture({ material: false, pinning: false, file: "arm.csv" });
    const plain = (await buildWireOutputs(a, { unit: "nm", viewerScript: VIEWER })).files.find((f) => f.name === "report.html")!.data as string;
    expect(plain).not.toContain('class="junction-zone"');
    expect(plain).not.toContain("Blue shade");
    const n = a.profile.n;
    for (let i = n - Math.max(3, Math.floor(n / 10)); i < n; ++i) a.profile.flags[i] |= FLAG_JUNCTION_ZONE;
    const html = (await buildWireOutputs(a, { unit: "nm", viewerScript: VIEWER })).files.find((f) => f.name === "report.html")!.data as string;
    // one shaded run in each of the two profile plots (curvature, torsion)
    expect((html.match(/class="junction-zone"/g) ?? []).length).toBe(2);
    expect(html).toContain("Blue shade: near a junction of the wire network");
  });
});
