/** model.json written by `analyze` says how it was made (in-process CLI run on the invented demo coil). */
import { mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import type { ModelDocument } from "../../src/export/modelDocument.js";
import { run } from "../cli/harness.js";

describe("analyze: model.json run record", () => {
  it("keeps the paths as given, the full command line, every option value with its default, and the material note", async () => {
    const root = mkdtempSync(join(tmpdir(), "twistline-run-"));
    try {
      const input = join("fixtures", "demo", "coil.csv");
      const mat = join("fixtures", "demo", "material-invented-soft-ferro.json");
      const argv = ["analyze", input, "--material", mat, "--out", join(root, "o"), "--bootstrap", "20", "--export", "vtp", "--grid", "4nm", "--quiet"];
      const r = await run(argv);
      expect(r.code, r.stderr).toBe(0);
      const doc = JSON.parse(readFileSync(join(root, "o", "model.json"), "utf8")) as ModelDocument;
      expect(doc.source.file).toBe(input); // relative, as typed: no machine path
      expect(doc.material!.file).toBe(mat);
      expect(doc.material!.note).toMatch(/^invented demo material/);
      expect(doc.run.argv).toEqual(argv);
      expect(doc.run.command).toBe(`twistline ${argv.join(" ")}`);
      expect(doc.run.options).toMatchObject({ input, material: mat, bootstrap: 20, seed: 1, mesh: "ply", outUnit: "nm", closed: false, step: null, vtp: true, grid: 4 });
      expect(readdirSync(join(root, "o")).sort()).toEqual(
        [".twistline-owned.json", "centerline.vtp", "chain.csv", "mask.ovf", "model.json", "profile.csv", "report.html", "texture-binary8.ovf", "texture.ovf", "tube.vtp", "wire.ply"]);
      expect(doc.outputs.exports?.map((e) => e.format)).toEqual(["vtp", "vtp", "ovf-text", "ovf-binary8", "ovf-text"]);
      // the folder holds only twistline outputs, so --force may replace it
      const again = await run([...argv.slice(0, 2), "--out", join(root, "o"), "--bootstrap", "0", "--export", "vtp", "--force", "--quiet"]);
      expect(again.code, again.stderr).toBe(0);
      expect(doc.tool.version).toBe((JSON.parse(readFileSync("package.json", "utf8")) as { version: string }).version);
    } finally {
      rmSync(root, { recursive: true, force: true });
    }
  }, 60_000);

  it("refuses --grid without a material and an unknown --export kind, in one line", async () => {
    const input = join("fixtures", "demo", "coil.csv");
    const a = await run(["analyze", input, "--out", join(tmpdir(), "never-written"), "--grid", "2nm"]);
    expect(a.code).toBe(1);
    expect(a.stderr).toBe("twistline: analyze: --grid: the OVF texture needs --material (the relaxed texture comes from the model)\n");
    const b = await run(["analyze", input, "--out", join(tmpdir(), "never-written"), "--export", "vtk"]);
    expect(b.code).toBe(1);
    expect(b.stderr).toMatch(/^twistline: analyze: --export: must be a comma list of vtp, ovf \(got "vtk"\)\n$/);
  });
});
