import { readFileSync } from "node:fs";
import { Ajv2020 } from "ajv/dist/2020.js";
import { beforeAll, describe, expect, it } from "vitest";
import type { Analysis } from "../../src/export/analyzeTrace.js";
import { buildModelDocument, MODEL_SCHEMA_ID, modelToJson, type ModelDocument, type OutputsInfo } from "../../src/export/modelDocument.js";
import { analysisFixture } from "./analysisFixture.js";

const schema = JSON.parse(readFileSync(new URL("../../src/export/schemas/model.schema.json", import.meta.url), "utf8")) as Record<string, unknown>;
// strict mode rejects unknown keywords and sloppy schemas when compiling (ajv docs, "Strict mode")
const ajv = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true });
const validate = ajv.compile(schema);

const outputs: OutputsInfo = {
  profile: "profile.csv", report: "report.html",
  chain: { file: "chain.csv", sites: 10, spacing: 2, spacingNote: "test", columns: ["i", "s"] },
  mesh: { file: "wire.ply", format: "ply", offset: [1, 2, 3], radius: 2, radiusSource: "test", vertices: 10, triangles: 16 },
};

let withModel: Analysis, geometryOnly: Analysis;
beforeAll(() => {
  withModel = analysisFixture();
  geometryOnly = analysisFixture({ material: false });
});

function roundTrip(doc: ModelDocument): unknown {
  return JSON.parse(modelToJson(doc));
}

describe("model.json and its schema", () => {
  it("the schema is draft 2020-12 with an $id, and compiles in ajv's strict mode", () => {
    expect(schema.$schema).toBe("https://json-schema.org/draft/2020-12/schema");
    expect(schema.$id).toBe(MODEL_SCHEMA_ID);
  });

  it("every property of the schema that holds a length, curvature or energy states its unit", () => {
    // walk the schema: a numeric property named like a quantity must say its unit in its description
    const missing: string[] = [];
    const unitWords = /\(unit|1\/unit|unit\^2|J\/m|J\/m\^2|J\/m\^3|\(J\)|k_B T|deg|m\/s|rad\/s|\(K\)|units of|dimensionless|1\/l|c\/l|K l area|0 to 1|in unit|reduced/;
    const quantities = /^(s|s0|s1|length|resolution|sigma|kappa.*|tau.*|tiltDeg|dmi.*|depth.*|energy.*|period|spacing|radius|magneticLength|thickness|latticeSpacing|crossSection|exchange|anisotropy|temperature|magnonSpeed|omega0|kMin|pixelSize)$/;
    const walk = (node: unknown, path: string): void => {
      if (node === null || typeof node !== "object" || path === "model.units") return; // "units" holds the unit names themselves
      const o = node as Record<string, unknown>;
      if (o.properties !== undefined) {
        for (const [k, v] of Object.entries(o.properties as Record<string, Record<string, unknown>>)) {
          if (quantities.test(k) && k !== "kind" && !unitWords.test(String(v.description ?? ""))) missing.push(`${path}.${k}`);
          walk(v, `${path}.${k}`);
        }
      }
      for (const key of ["$defs", "items", "oneOf"]) {
        const child = o[key];
        if (Array.isArray(child)) child.forEach((c, i) => walk(c, `${path}.${key}[${i}]`));
        else if (child !== undefined && key === "$defs") for (const [k, v] of Object.entries(child as object)) walk(v, `${path}.$defs.${k}`);
        else if (child !== undefined) walk(child, `${path}.${key}`);
      }
    };
    walk(schema, "model");
    expect(missing).toEqual([]);
  });

  it("a document with the model validates, has the DESIGN.md keys, and converts lengths to its unit", () => {
    const doc = buildModelDocument(withModel, { unit: "nm", outputs, materialFile: "m.json" });
    const json = roundTrip(doc) as ModelDocument;
    expect(validate(json), JSON.stringify(validate.errors)).toBe(true);
    expect(json.unit).toBe("nm");
    expect(json.units.curvature).toBe("1/nm");
    const g = json.segments[0];
    for (const key of ["s0", "s1", "kind", "kappa", "tau", "kappaReduced", "tauReduced", "state", "homogeneousStability", "tiltDeg", "probabilities"]) {
      expect(g).toHaveProperty(key);
    }
    // lengths: metres times the exact integer 1e9; curvature divided by it
    const m = withModel.model!.segments[0];
    expect(g.s1).toBeCloseTo(m.s1 * 1e9, 6);
    expect(g.kappa! / (m.kappa / 1e9) - 1).toBeCloseTo(0, 10);
    expect(json.material!.magneticLength).toBeCloseTo(withModel.material!.magneticLength * 1e9, 9);
    expect(json.material!.crossSection).toBeCloseTo(withModel.material!.crossSection! * 1e18, 9);
    // pinning ranked deepest first
    const depths = json.pinning.map((p) => p.depthReduced ?? 0);
    expect([...depths].sort((x, y) => y - x)).toEqual(depths);
    expect(json.pinning.map((p) => p.rank)).toEqual(json.pinning.map((_, i) => i + 1));
    expect(json.warnings.some((w) => w.startsWith("model estimates, not measurements"))).toBe(true);
  });

  it("a geometry-only document validates, has null physics fields, no pinning, and says what a material adds", () => {
    const json = roundTrip(buildModelDocument(geometryOnly, { unit: "um", outputs })) as ModelDocument;
    expect(validate(json), JSON.stringify(validate.errors)).toBe(true);
    expect(json.material).toBeNull();
    expect(json.pinning).toEqual([]);
    expect(json.segments.every((g) => g.state === null && g.kappaReduced === null)).toBe(true);
    expect(json.warnings[0]).toMatch(/^geometry only: no material given; with --material/);
  });

  it("the schema rejects a document without its unit, or with a state it does not know", () => {
    const json = roundTrip(buildModelDocument(withModel, { unit: "nm", outputs })) as Record<string, unknown>;
    const noUnit = { ...json };
    delete noUnit.unit;
    expect(validate(noUnit)).toBe(false);
    const badState = structuredClone(json) as { segments: { state: string }[] };
    badState.segments[0].state = "spiral";
    expect(validate(badState)).toBe(false);
  });

  it("writes NaN as null and keeps number arrays on one line", () => {
    const doc = buildModelDocument(geometryOnly, { unit: "nm", outputs });
    doc.segments[0].tau = Number.NaN as unknown as null; // a NaN that slipped through must not become invalid JSON
    const text = modelToJson(doc);
    expect(() => JSON.parse(text)).not.toThrow();
    expect(text).toContain('"offset": [1, 2, 3]');
  });
});

describe("model.json: how it was made", () => {
  it("records the command line shell-quoted, every option value, the material note, and validates", () => {
    const doc = buildModelDocument(withModel, {
      unit: "nm", outputs, materialFile: "mat.json", materialNote: "invented material",
      run: { argv: ["analyze", "my wire.csv", "--material", "mat.json", "--out", "it's"], options: { input: "my wire.csv", bootstrap: 200, step: null } },
    });
    expect(doc.$schema).toBe("urn:twistline:schema:model:1"); // a URN (RFC 8141): no network address that could be fetched
    // POSIX shell quoting: single quotes, an embedded ' written as '\'' (common practice)
    expect(doc.run.command).toBe("twistline analyze 'my wire.csv' --material mat.json --out 'it'\\''s'");
    expect(doc.run.argv).toEqual(["analyze", "my wire.csv", "--material", "mat.json", "--out", "it's"]);
    expect(doc.run.options).toEqual({ input: "my wire.csv", bootstrap: 200, step: null });
    expect(doc.material!.note).toBe("invented material");
    expect(validate(roundTrip(doc)), JSON.stringify(validate.errors)).toBe(true);
  });

  it("without a command line (library, demo) has command and argv null", () => {
    const doc = buildModelDocument(geometryOnly, { unit: "nm", outputs });
    expect(doc.run).toEqual({ command: null, argv: null, options: {} });
    expect(validate(roundTrip(doc)), JSON.stringify(validate.errors)).toBe(true);
  });
});
