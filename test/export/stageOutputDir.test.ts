import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { ParameterError } from "../../src/errors.js";
import { stageOutputDir } from "../../src/export/stageOutputDir.js";

const fresh = () => mkdtempSync(join(tmpdir(), "twistline-stage-"));

describe("stageOutputDir(target, options)", () => {
  it("creates the folder (and missing parents) only on commit, and leaves no temporary folder", async () => {
    const root = fresh();
    const target = join(root, "a", "out");
    const st = await stageOutputDir(target, { force: false, where: "analyze" });
    writeFileSync(join(st.path, "model.json"), "{}");
    expect(existsSync(target)).toBe(false);
    await st.commit();
    expect(readdirSync(target)).toEqual(["model.json"]);
    expect(readdirSync(join(root, "a"))).toEqual(["out"]);
  });

  it("abort removes everything written so far", async () => {
    const root = fresh();
    const st = await stageOutputDir(join(root, "out"), { force: false, where: "analyze" });
    writeFileSync(join(st.path, "chain.csv"), "x");
    await st.abort();
    expect(readdirSync(root)).toEqual([]);
  });

  it("refuses a non-empty folder without --force, and a file", async () => {
    const root = fresh();
    mkdirSync(join(root, "out"));
    writeFileSync(join(root, "out", "model.json"), "{}");
    writeFileSync(join(root, "f"), "");
    await expect(stageOutputDir(join(root, "out"), { force: false, where: "analyze" })).rejects.toThrow(
      new ParameterError("analyze", "--out", `folder ${JSON.stringify(join(root, "out"))} exists and is not empty (add --force to replace it)`),
    );
    await expect(stageOutputDir(join(root, "f"), { force: true, where: "analyze" })).rejects.toThrow(/exists and is not a folder/);
  });

  it("with --force replaces a folder of twistline outputs, but never one with other files or an input", async () => {
    const root = fresh();
    const out = join(root, "out");
    mkdirSync(join(out, "coil"), { recursive: true });
    writeFileSync(join(out, "summary.csv"), "old");
    writeFileSync(join(out, "coil", "report.html"), "old");
    const st = await stageOutputDir(out, { force: true, where: "batch" });
    writeFileSync(join(st.path, "summary.csv"), "new");
    await st.commit();
    expect(readFileSync(join(out, "summary.csv"), "utf8")).toBe("new");
    expect(existsSync(join(out, "coil"))).toBe(false);
    expect(readdirSync(root)).toEqual(["out"]);

    writeFileSync(join(out, "notes.txt"), "mine");
    await expect(stageOutputDir(out, { force: true, where: "batch" })).rejects.toThrow(/holds "notes.txt", which twistline did not write; refusing to replace it/);
    const input = join(out, "wire.ply");
    writeFileSync(input, "ply");
    await expect(stageOutputDir(out, { force: true, protect: [input], where: "analyze" })).rejects.toThrow(/contains the input/);
    expect(readFileSync(join(out, "notes.txt"), "utf8")).toBe("mine");
  });
});
