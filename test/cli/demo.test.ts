import { mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { basename, join } from "node:path";
import { Ajv2020 } from "ajv/dist/2020.js";
import { afterAll, describe, expect, it } from "vitest";
import { DEMO_MATERIAL, demoDataDir, demoWires } from "../../cli/demo.js";
import { makeDemoFiles } from "../../fixtures/demo/make.js";
import { readTraceFile } from "../../src/import/readTrace.js";
import { parseMaterial } from "../../src/physics/parseMaterial.js";
import { run } from "./harness.js";

describe("the demo wires in fixtures/demo", () => {
  it("are exactly what fixtures/demo/make.ts writes", async () => {
    const files = makeDemoFiles();
    const wires = await demoWires();
    expect(wires.map((p) => basename(p))).toEqual(Object.keys(files).sort());
    for (const p of wires) expect(readFileSync(p, "utf8")).toBe(files[basename(p)]);
  });

  it("say they are invented, give the scenario and the unit, and read as traces", async () => {
    const expected: Record<string, { points: number; dims: 2 | 3; closed: boolean }> = {
      "coil.csv": { points: 600, dims: 3, closed: false },
      "meander.csv": { points: 380, dims: 2, closed: false },
      "ring.csv": { points: 300, dims: 3, closed: true },
    };
    for (const p of await demoWires()) {
      const text = readFileSync(p, "utf8");
      expect(text.startsWith("# invented demo data (not a measurement)")).toBe(true);
      expect(text).toMatch(/^# scenario: /m);
      expect(text).toMatch(/^# unit: nm$/m);
      const t = await readTraceFile(p);
      const e = expected[basename(p)];
      expect({ points: t.xyz.length / 3, dims: t.dims, closed: t.closed }).toEqual(e);
      expect(t.source.unit).toBe("nm");
      expect(t.diagnostics).toEqual([]);
    }
  });

  it("are found next to the cli folder", () => {
    expect(demoDataDir().replace(/\\/g, "/")).toMatch(/fixtures\/demo\/$/);
  });
});

describe("the invented demo material", () => {
  it("is labelled invented by its name and is a valid soft ferromagnet with K from shape anisotropy", () => {
    expect(DEMO_MATERIAL).toMatch(/invented/);
    const json = JSON.parse(readFileSync(join(demoDataDir(), DEMO_MATERIAL), "utf8")) as { exchange: number; anisotropy: number };
    const m = parseMaterial(json, DEMO_MATERIAL);
    expect(m.order).toBe("ferro");
    expect(m.exchange).toBe(1.3e-11); // A ~ 13 pJ/m, a typical soft-ferromagnet value (common practice, from memory)
    // shape anisotropy of a thin round wire: K = mu0 Ms^2 / 4 (demagnetising factors 1/2 across, 0 along;
    // common practice, from memory), here for an invented Ms = 800 kA/m
    const mu0 = 4e-7 * Math.PI;
    expect(Math.abs(m.anisotropy! / ((mu0 * 8e5 ** 2) / 4) - 1)).toBeLessThan(1e-4);
    expect(m.magneticLength).toBeCloseTo(Math.sqrt(1.3e-11 / m.anisotropy!), 20);
  });
});

describe("twistline demo, end to end", () => {
  const root = mkdtempSync(join(tmpdir(), "twistline-demo-"));
  afterAll(() => rmSync(root, { recursive: true, force: true }));

  it("analyzes the three wires into folders with a summary, prints a table, and refuses to run twice without --force", async () => {
    const dir = join(root, "demo");
    const r = await run(["demo", "--out", dir]);
    expect(r.code).toBe(0);
    expect(readdirSync(dir).sort()).toEqual([".twistline-owned.json", "afm-coil", "coil", "meander", "ring", "summary.csv"]);
    for (const w of ["coil", "meander", "ring", "afm-coil"]) {
      expect(readdirSync(join(dir, w)).filter((f) => f !== ".twistline-owned.json").sort()).toEqual(["chain.csv", "model.json", "profile.csv", "report.html", "wire.ply"]);
    }
    const lines = r.stdout.trimEnd().split("\n");
    expect(lines[0]).toContain("invented demo wires and invented demo materials");
    expect(lines[2].split(/\s{2,}/)).toEqual(["wire", "unit", "points", "length", "mean kappa", "max kappa", "mean |tau|", "stretches", "pinning", "deepest kT", "metastable"]);
    expect(lines.slice(3).map((l) => l.split(/\s+/).slice(0, 3))).toEqual([["coil", "nm", "600"], ["meander", "nm", "380"], ["ring", "nm", "300"], ["afm-coil", "nm", "641"]]);
    // the ring is closed: its mean curvature lies between the ellipse's extremes 145/155^2 and 155/145^2 (1/nm), as make.ts states
    const ring = lines[5].split(/\s+/);
    expect(Number(ring[4])).toBeGreaterThan(0.006);
    expect(Number(ring[4])).toBeLessThan(0.0074);
    // the meander's sharp bend (radius 10 nm) is its deepest pinning site, at s ~ 200 + 60 pi + 200 + 7.9 = 596 nm (make.ts)
    const meander = JSON.parse(readFileSync(join(dir, "meander", "model.json"), "utf8")) as { pinning: { s: number }[] };
    expect(Math.abs(meander.pinning[0].s - 596)).toBeLessThan(10);
    const schema = JSON.parse(readFileSync(new URL("../../src/export/schemas/model.schema.json", import.meta.url), "utf8")) as object;
    const validate = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true }).compile(schema);
    for (const w of ["coil", "meander", "ring"]) expect(validate(JSON.parse(readFileSync(join(dir, w, "model.json"), "utf8")))).toBe(true);
    // With CI set, the batch also prints plain progress lines ("twistline: batch: ...") first.
    const finalLines = r.stderr.split("\n").filter((l) => l !== "" && !l.startsWith("twistline: batch: "));
    expect(finalLines[0]).toMatch(/^twistline: demo: 4 wires in [\d.]+ s; open .*coil.report\.html/);
    expect((await run(["demo", "--out", dir])).code).toBe(1);
    expect((await run(["demo", "--out", dir, "--force", "--quiet"])).code).toBe(0);
  }, 240_000); // four wires with the full physics stage: ~32 s alone on this machine, longer when CI shares it
});
