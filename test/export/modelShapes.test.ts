import { readFileSync } from "node:fs";
import { Ajv2020 } from "ajv/dist/2020.js";
import { describe, expect, it } from "vitest";
import { analyzeTrace } from "../../src/export/analyzeTrace.js";
import { buildModelDocument, modelToJson, type ModelDocument, type OutputsInfo } from "../../src/export/modelDocument.js";
import { readTraceFile } from "../../src/import/readTrace.js";

const schema = JSON.parse(readFileSync(new URL("../../src/export/schemas/model.schema.json", import.meta.url), "utf8")) as Record<string, unknown>;
const validate = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true }).compile(schema);
const outputs: OutputsInfo = {
  profile: "profile.csv", report: "report.html",
  chain: { file: "chain.csv", sites: 10, spacing: 2, spacingNote: "test", columns: ["i", "s"] },
  mesh: { file: "wire.ply", format: "ply", offset: [0, 0, 0], radius: 2, radiusSource: "test", vertices: 10, triangles: 16 },
};

describe("model.json: stretch shapes and named features (issue 9)", () => {
  it("the demo meander's document validates, with a circle of radius ~60 nm for the U-turn and the 90 degree bend as a feature", async () => {
    const a = analyzeTrace(await readTraceFile("fixtures/demo/meander.csv"), { bootstrap: 0 });
    const doc = JSON.parse(modelToJson(buildModelDocument(a, { unit: "nm", outputs }))) as ModelDocument;
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.segments.map((g) => g.kind)).toEqual(["straight", "arc", "straight", "arc", "straight"]);
    const u = doc.segments[1].shape!;
    expect(u.primitive).toBe("circle");
    expect(Math.abs(u.radius.value! - 60)).toBeLessThan(1); // invented truth: 60 nm (fixtures/demo/make.ts)
    const bend = doc.features.find((f) => f.kind === "bend")!;
    expect(Math.abs(bend.turningAngle! - Math.PI / 2)).toBeLessThan((5 * Math.PI) / 180);
    expect(bend.within).toBe(3);
    expect(doc.features.map((f) => f.kind)).toEqual(["end", "bend", "end"]);
  });
  it("the demo ring is one whole-ring arc in model.json", async () => {
    const a = analyzeTrace(await readTraceFile("fixtures/demo/ring.csv"), { bootstrap: 0 });
    const doc = JSON.parse(modelToJson(buildModelDocument(a, { unit: "nm", outputs }))) as ModelDocument;
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.segments.length).toBe(1);
    expect(doc.segments[0].wholeRing).toBe(true);
    expect(doc.segments[0].shape!.primitive).toBe("circle");
  });
});
