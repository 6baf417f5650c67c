import { readFileSync } from "node:fs";
import { basename } from "node:path";
import { describe, expect, it } from "vitest";
import { demoDataDir, demoWires } from "../../cli/demo.js";
import { makeDemoFiles } from "../../fixtures/demo/make.js";
import { readTraceFile } from "../../src/import/readTrace.js";

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
