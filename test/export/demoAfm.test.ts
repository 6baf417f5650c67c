/** The invented antiferromagnetic demo coil (fixtures/demo/afm): generated as stated, and it shows what the tool is for. */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { DEMO_AFM, demoDataDir } from "../../cli/demo.js";
import { afmCoil, truth } from "../../fixtures/demo/afm/make.js";
import { analyzeTrace, type Analysis } from "../../src/export/analyzeTrace.js";
import { buildWireOutputs, type WireOutputs } from "../../src/export/wireOutputs.js";
import { readTraceFile } from "../../src/import/readTrace.js";
import { parseMaterial } from "../../src/physics/parseMaterial.js";
import { boundaryAt } from "../../src/report/phaseReference.js";

const dir = demoDataDir();
const materialJson = JSON.parse(readFileSync(join(dir, DEMO_AFM.material), "utf8")) as { note: string };

describe("the invented AFM demo coil", () => {
  it("is exactly what fixtures/demo/afm/make.ts writes, labelled invented, with an invented material of magnetic length 20 nm", () => {
    const text = readFileSync(join(dir, DEMO_AFM.wire), "utf8");
    expect(text).toBe(afmCoil());
    expect(text.startsWith("# invented demo data (not a measurement)")).toBe(true);
    expect(materialJson.note).toMatch(/^invented demo material/);
    const m = parseMaterial(materialJson, DEMO_AFM.material);
    expect(m.order).toBe("antiferro");
    expect(m.magneticLength).toBeCloseTo(20e-9, 20); // l = sqrt(A/K) = sqrt(1e-11 / 2.5e4) m
  });

  let a: Analysis, out: WireOutputs;
  beforeAll(async () => {
    const material = parseMaterial(materialJson, DEMO_AFM.material);
    a = analyzeTrace(await readTraceFile(join(dir, DEMO_AFM.wire)), { material, bootstrap: 40, seed: 1 });
    out = await buildWireOutputs(a, { unit: "nm", viewerScript: "", materialFile: DEMO_AFM.material });
  }, 60_000);

  it("is cut into the three stretches of its construction, with the curvature and torsion it was built from", () => {
    const segs = out.document.segments;
    expect(segs.map((g) => g.kind)).toEqual(["helix", "helix", "helix"]);
    expect(Math.abs(segs[1].s0 - 430)).toBeLessThan(20);
    expect(Math.abs(segs[2].s0 - 830)).toBeLessThan(20);
    // truth from make.ts (the kappa, tau it integrates with Frenet-Serret); fit error measured up to 1.5% (kappa) and 2.2% (tau)
    for (const [g, s] of [[segs[0], 200], [segs[1], 630], [segs[2], 1050]] as const) {
      expect(Math.abs(g.kappa! / truth(s).kappa - 1)).toBeLessThan(0.03);
      expect(Math.abs(g.tau! / truth(s).tau - 1)).toBeLessThan(0.05);
    }
  });

  it("shows a periodic stretch with a metastable homogeneous state and a homogeneous one, on the sides of the AFM boundary", () => {
    const segs = out.document.segments;
    expect(segs.map((g) => [g.state, g.homogeneousStability])).toEqual([["periodic", "metastable"], ["homogeneous", "stable"], ["periodic", "metastable"]]);
    // AFM: periodic below kappa_c(tau) (PHYSICS.md section 4 table, via phaseReference)
    for (const g of segs) expect(g.kappaReduced! < boundaryAt("antiferro", g.tauReduced!)).toBe(g.state === "periodic");
  });

  it("has a magnon panel in its report: branches at k = 0 and the dip of the homogeneous stretch", () => {
    const html = out.files.find((f) => f.name === "report.html")!.data as string;
    expect(html).toContain('<section id="magnons">');
    expect(html).toContain('id="magnon-panel"');
    const b = out.document.segments[1].magnons!;
    expect(b.depth!).toBeGreaterThan(0);
    expect(html).toContain('class="dip"');
    expect(html).toMatch(/GHz/); // the material gives a magnon speed
  });
});
