/** model.json written by `analyze` says how it was made (in-process CLI run on the invented demo coil). */
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
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
      const argv = ["analyze", input, "--material", mat, "--out", join(root, "o"), "--bootstrap", "20", "--quiet"];
      const r = await run(argv);
      expect(r.code, r.stderr).toBe(0);
      const doc = JSON.parse(readFileSync(join(root, "o", "model.json"), "utf8")) as ModelDocument;
      expect(doc.source.file).toBe(input); // relative, as typed: no machine path
      expect(doc.material!.file).toBe(mat);
      expect(doc.material!.note).toMatch(/^invented demo material/);
      expect(doc.run.argv).toEqual(argv);
      expect(doc.run.command).toBe(`twistline ${argv.join(" ")}`);
      expect(doc.run.options).toMatchObject({ input, material: mat, bootstrap: 20, seed: 1, mesh: "ply", outUnit: "nm", closed: false, step: null });
      expect(doc.tool.version).toBe((JSON.parse(readFileSync("package.json", "utf8")) as { version: string }).version);
    } finally {
      rmSync(root, { recursive: true, force: true });
    }
  }, 60_000);
});
