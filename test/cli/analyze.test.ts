import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Ajv2020 } from "ajv/dist/2020.js";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { ModelDocument } from "../../src/export/modelDocument.js";
import { run, stdinOf } from "./harness.js";
import { arcCsv, helixCsv, TEST_MATERIAL, write } from "./wireFiles.js";

const root = mkdtempSync(join(tmpdir(), "twistline-analyze-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));
const schema = JSON.parse(readFileSync(new URL("../../src/export/schemas/model.schema.json", import.meta.url), "utf8")) as object;
const validate = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true }).compile(schema);

const helix = write(join(root, "helix.csv"), helixCsv());
const arc = write(join(root, "arc.csv"), arcCsv());
const material = write(join(root, "material.json"), TEST_MATERIAL);
let full: { code: number; stdout: string; stderr: string };
const fullDir = join(root, "full");

beforeAll(async () => {
  full = await run(["analyze", helix, "--material", material, "--out", fullDir, "--bootstrap", "40"]);
});

describe("twistline analyze", () => {
  it("writes profile.csv, model.json, chain.csv, wire.ply and report.html, and one summary line on stderr", () => {
    expect(full.code).toBe(0);
    expect(full.stdout).toBe("");
    expect(readdirSync(fullDir).sort()).toEqual([".twistline-owned.json", "chain.csv", "model.json", "profile.csv", "report.html", "wire.ply"]);
    expect(full.stderr).toMatch(/^twistline: .*helix\.csv: length [\d.]+ nm, \d+ stretch(es)? \(.*\); \d+ pinning sites?, \d+ metastable; chain spacing [\d.]+ nm \(default: .*\); wrote .*full\n$/);
    expect(readdirSync(root).filter((f) => f.startsWith("."))).toEqual([]); // no temporary folder left
  });

  it("the summary line counts the sites listed apart as indicative only (invented demo afm-coil: next to its periodic stretches)", async () => {
    const out = join(root, "afm");
    const r = await run(["analyze", join("fixtures", "demo", "afm", "afm-coil.csv"), "--unit", "nm", "--material", join("fixtures", "demo", "afm", "material-invented-afm.json"), "--out", out, "--bootstrap", "20"]);
    expect(r.code, r.stderr).toBe(0);
    const doc = JSON.parse(readFileSync(join(out, "model.json"), "utf8")) as ModelDocument;
    const indicative = doc.pinningMinor.filter((x) => x.note?.includes("indicative only")).length;
    expect(indicative).toBeGreaterThan(0);
    expect(r.stderr).toContain(`; ${doc.pinning.length} pinning site${doc.pinning.length === 1 ? "" : "s"} (${indicative} more indicative only, next to a periodic stretch), `);
  }, 60_000);

  it("model.json validates against the shipped schema and carries the model of each stretch", () => {
    const doc = JSON.parse(readFileSync(join(fullDir, "model.json"), "utf8")) as ModelDocument;
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.unit).toBe("nm");
    expect(doc.material?.order).toBe("ferro");
    expect(doc.segments.length).toBeGreaterThan(0);
    expect(doc.segments.every((g) => g.state !== null && g.homogeneousStability !== null)).toBe(true);
    // the invented helix: kappa = 30 / (30^2 + 8^2) = 0.03112 1/nm (https://en.wikipedia.org/wiki/Helix); the longest stretch is near it
    const longest = [...doc.segments].sort((x, y) => y.length - x.length)[0];
    expect(Math.abs(longest.kappa! / (30 / 964) - 1)).toBeLessThan(0.05);
    expect(doc.outputs.mesh).toMatchObject({ file: "wire.ply", format: "ply", unit: "nm", radius: 2, radiusSource: "half the material thickness" });
  });

  it("chain.csv has the model columns and report.html the model sections", () => {
    const chain = readFileSync(join(fullDir, "chain.csv"), "utf8");
    const header = chain.split("\n").find((l) => !l.startsWith("#"))!;
    expect(header).toContain("dmi_x,dmi_y,dmi_z,k1,a1x");
    const html = readFileSync(join(fullDir, "report.html"), "utf8");
    expect(html).toContain('id="phase-map"');
    expect(html).toContain('id="pinning-plot"');
    expect(readFileSync(join(fullDir, "wire.ply")).subarray(0, 4).toString()).toBe("ply\n");
  });

  it("refuses an existing output folder without --force, and replaces it with --force", async () => {
    const again = await run(["analyze", arc, "--out", fullDir, "--quiet"]);
    expect(again).toEqual({ code: 1, stdout: "", stderr: `twistline: analyze: --out: folder ${JSON.stringify(fullDir)} exists and is not empty (add --force to replace it)\n` });
    const forced = await run(["analyze", arc, "--out", fullDir, "--quiet", "--force", "--bootstrap", "20", "--mesh", "stl"]);
    expect(forced.code).toBe(0);
    expect(readdirSync(fullDir).sort()).toEqual([".twistline-owned.json", "chain.csv", "model.json", "profile.csv", "report.html", "wire.stl"]);
  });

  it("without --material does the geometry, and says what a material would add", async () => {
    const dir = join(root, "geom");
    const r = await run(["analyze", arc, "--out", dir, "--bootstrap", "20", "--spacing", "2nm", "--radius", "3nm", "--mesh", "glb"]);
    expect(r.code).toBe(0);
    expect(r.stderr).toContain("geometry only (no material)");
    expect(r.stderr).toContain("twistline: no --material: add one for effective DMI and anisotropy, states, metastability and pinning sites\n");
    const doc = JSON.parse(readFileSync(join(dir, "model.json"), "utf8")) as ModelDocument;
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.material).toBeNull();
    expect(doc.outputs.chain.spacingNote).toBe("--spacing");
    expect(Math.abs(doc.outputs.chain.spacing! / 2 - 1)).toBeLessThan(0.01);
    expect(doc.outputs.mesh.radius).toBeCloseTo(3, 9);
    expect(doc.outputs.mesh.radiusSource).toBe("--radius");
    expect(readFileSync(join(dir, "wire.glb")).subarray(0, 4).toString()).toBe("glTF");
    expect(readFileSync(join(dir, "report.html"), "utf8")).toMatch(/Give a material/);
  });

  it("reads standard input for -", async () => {
    const dir = join(root, "stdin");
    const r = await run(["analyze", "-", "--out", dir, "--bootstrap", "10", "--quiet"], { readStdin: stdinOf(arcCsv()) });
    expect(r.code).toBe(0);
    expect((JSON.parse(readFileSync(join(dir, "model.json"), "utf8")) as ModelDocument).source.file).toBe("<stdin>");
  });

  it("a bad material file is one line naming file, line and problem, exit 1, and nothing is written", async () => {
    const bad = write(join(root, "bad.json"), '{\n  "order": "ferro",\n  "exchange": ,\n}\n');
    const dir = join(root, "nothing");
    const r = await run(["analyze", arc, "--material", bad, "--out", dir]);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe(`twistline: ${bad}:3: json: not valid JSON (unexpected ",")\n`);
    expect(existsSync(dir)).toBe(false);
    expect(readdirSync(root).filter((f) => f.startsWith("."))).toEqual([]);
    const unknown = write(join(root, "unknown.json"), JSON.stringify({ order: "ferro", exchange: -1, anisotropy: 1e5 }));
    const r2 = await run(["analyze", arc, "--material", unknown, "--out", dir]);
    expect(r2).toEqual({ code: 1, stdout: "", stderr: `twistline: ${unknown}: material.exchange: must be a positive number in J/m, range (0, 1e-8] (got -1)\n` });
  });

  it("bad option values are one line with exit 1", async () => {
    const dir = join(root, "never");
    expect(await run(["analyze", arc, "--out", dir, "--mesh", "vrml"])).toEqual({
      code: 1, stdout: "", stderr: 'twistline: analyze: --mesh: must be one of ply, stl, obj, glb (got "vrml")\n',
    });
    expect((await run(["analyze", arc, "--out", dir, "--spacing", "3"])).stderr).toBe(
      'twistline: analyze: --spacing: must be a positive length with a unit (m, um, nm, A), e.g. 2.5nm (got "3")\n',
    );
    expect((await run(["analyze", arc])).code).toBe(2); // missing --out is a usage error
    expect(existsSync(dir)).toBe(false);
  });

  it("escapes a file name with <script> in the report", async () => {
    const dir = join(root, "evil");
    mkdirSync(join(root, "x"), { recursive: true });
    const evil = join(root, "x", "<script>alert(1)<\\script>.csv");
    writeFileSync(evil, arcCsv());
    const r = await run(["analyze", evil, "--out", dir, "--bootstrap", "10", "--quiet"]);
    expect(r.code).toBe(0);
    const html = readFileSync(join(dir, "report.html"), "utf8");
    expect(html).not.toContain("<script>alert");
    expect(html).toContain("&lt;script&gt;alert(1)");
  });
});
