import { Ajv2020 } from "ajv/dist/2020.js";
import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import { parsePolylineJson, POLYLINE_SCHEMA, pointerToField } from "../../src/import/parsePolylineJson.js";

function errorOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return (e as InputError).message;
  }
  throw new Error("expected an InputError, got none");
}

const pts3 = [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 1]];
const doc = (extra: object): string => JSON.stringify({ points: pts3, ...extra });

describe("parsePolylineJson(text, file, options)", () => {
  it("ships a schema that compiles in ajv strict mode and carries an $id", () => {
    expect(POLYLINE_SCHEMA.$id).toBe("urn:twistline:schema:polyline:1");
    expect(POLYLINE_SCHEMA.$schema).toBe("https://json-schema.org/draft/2020-12/schema");
    expect(() => new Ajv2020({ strict: true, allErrors: true }).compile(POLYLINE_SCHEMA)).not.toThrow();
  });

  it("reads a 3D polyline with its unit and closure", () => {
    const t = parsePolylineJson(doc({ unit: "um", closed: true, name: "loop" }), "w.json");
    expect(Array.from(t.xyz)).toEqual([0, 0, 0, 1e-6, 0, 0, 1e-6, 1e-6, 0, 0, 1e-6, 1e-6]);
    expect(t.dims).toBe(3);
    expect(t.closed).toBe(true);
    expect(t.source).toEqual({ file: "w.json", unit: "um" });
  });

  it("reads [x, y] points as dims 2 and angstrom exactly (3 A = 3 / 1e10 m)", () => {
    // 1 A = 1e-10 m (BIPM SI Brochure, 8th ed., Table 8; from memory).
    const t = parsePolylineJson('{"unit":"A","points":[[3,0],[0,3],[-3,0],[0,-3]]}', "sq.json");
    expect(t.dims).toBe(2);
    expect(t.xyz[0]).toBe(3e-10);
    expect(t.xyz[0]).toBe(3 / 1e10);
    expect(t.xyz[2]).toBe(0);
  });

  it("reads pixels with the document's pixel size (metres) and the planar-projection mark", () => {
    const t = parsePolylineJson(doc({ unit: "px", pixelSize: 2e-9, planarProjection: true }), "img.json");
    expect(t.xyz[3]).toBe(2e-9);
    expect(t.source).toEqual({ file: "img.json", unit: "px", pixelSize: 2e-9 });
    expect(t.planarProjection).toBe(true);
  });

  it("defaults to the caller's unit, then nm, and refuses a contradiction", () => {
    expect(parsePolylineJson(doc({}), "w.json").source.unit).toBe("nm");
    expect(parsePolylineJson(doc({}), "w.json", { unit: "A" }).source.unit).toBe("A");
    expect(errorOf(() => parsePolylineJson(doc({ unit: "um" }), "w.json", { unit: "nm" }))).toBe(
      'w.json: unit: the file declares "um" but "nm" was asked for',
    );
    expect(errorOf(() => parsePolylineJson(doc({ unit: "px", pixelSize: 2e-9 }), "w.json", { pixelSize: 3e-9 }))).toBe(
      "w.json: pixelSize: the file declares 2e-9 m but 3e-9 m was asked for",
    );
  });

  it("maps schema errors to the field that is wrong", () => {
    const bad = '{"points":[[0,0,0],[1,0,0],[1,1,0],[0,"a",1]]}';
    expect(errorOf(() => parsePolylineJson(bad, "w.json"))).toBe('w.json: points[3][1]: must be a number (got "a")');
    expect(errorOf(() => parsePolylineJson(doc({ units: "nm" }), "w.json"))).toBe(
      "w.json: units: unknown property (expected name, description, unit, pixelSize, closed, planarProjection, points)",
    );
    expect(errorOf(() => parsePolylineJson(doc({ unit: "mm" }), "w.json"))).toBe(
      'w.json: unit: must be one of "m", "um", "nm", "A", "px" (got "mm")',
    );
    expect(errorOf(() => parsePolylineJson('{"unit":"nm"}', "w.json"))).toBe("w.json: points: missing (required)");
    expect(errorOf(() => parsePolylineJson('{"points":[[0,0],[1],[2,2],[3,3]]}', "w.json"))).toBe(
      "w.json: points[1]: must have 2 or 3 coordinates ([x, y] or [x, y, z])",
    );
    expect(errorOf(() => parsePolylineJson('{"points":[[0,0,0,0]]}', "w.json"))).toBe(
      "w.json: points[0]: must have 2 or 3 coordinates ([x, y] or [x, y, z])",
    );
    expect(errorOf(() => parsePolylineJson(doc({ unit: "px", pixelSize: -1 }), "w.json"))).toBe("w.json: pixelSize: must be > 0 (got -1)");
    expect(errorOf(() => parsePolylineJson(doc({ closed: "yes" }), "w.json"))).toBe('w.json: closed: must be a boolean (got "yes")');
    expect(errorOf(() => parsePolylineJson("[]", "w.json"))).toBe("w.json: (top level): must be an object (got [])");
    expect(errorOf(() => parsePolylineJson('{"points":[[0,0],[1,1e400],[2,2],[3,3]]}', "w.json"))).toBe(
      "w.json: points[1][1]: must be a finite number (got Infinity)",
    );
  });

  it("refuses points of mixed dimension", () => {
    expect(errorOf(() => parsePolylineJson('{"points":[[0,0,0],[1,0],[1,1,0],[0,1,0]]}', "w.json"))).toBe(
      "w.json: points[1]: has 2 coordinates but points[0] has 3",
    );
  });

  it("names the line of a JSON syntax error, and calls an early end truncation", () => {
    expect(errorOf(() => parsePolylineJson('{"unit":"nm",\n"points":[[0,0],\n[0,3] [1,1]]}', "s.json"))).toBe(
      "s.json:3: json: not valid JSON: expected ',' or ']' after array element",
    );
    expect(errorOf(() => parsePolylineJson('{"unit":"nm",\n"points":[[0,0],\n[0,3],[-3', "t.json"))).toBe(
      "t.json:3: json: unexpected end of input (is the file truncated?)",
    );
    expect(errorOf(() => parsePolylineJson("", "e.json"))).toBe("e.json:1: json: unexpected end of input (is the file truncated?)");
  });

  it("reports duplicates by index into points", () => {
    const t = parsePolylineJson('{"points":[[0,0],[1,0],[1,0],[1,1],[0,1]]}', "d.json");
    expect(t.diagnostics).toEqual(["dropped 1 consecutive duplicate point (points[2])"]);
    expect(errorOf(() => parsePolylineJson('{"points":[[0,0],[1,0],[1,0],[1,1]]}', "d.json"))).toBe(
      "d.json: points: need at least 4 distinct points, got 3 after dropping 1 duplicate",
    );
  });

  it("turns JSON Pointers into readable fields", () => {
    expect(pointerToField("")).toBe("(top level)");
    expect(pointerToField("/points/3/1")).toBe("points[3][1]");
    expect(pointerToField("/a~1b/c~0d")).toBe("a/b.c~d");
  });
});
