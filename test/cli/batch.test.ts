import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { expandInputs, folderNames, progressMode, progressReporter } from "../../cli/batch.js";
import { SUMMARY_COLUMNS } from "../../src/export/summaryToCsv.js";
import { run } from "./harness.js";
import { arcCsv, helixCsv, TEST_MATERIAL, write } from "./wireFiles.js";

const root = mkdtempSync(join(tmpdir(), "twistline-batch-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));
const inputs = join(root, "in");
mkdirSync(inputs);
write(join(inputs, "a-helix.csv"), helixCsv(21, 120));
write(join(inputs, "b-arc.csv"), arcCsv(22, 90));
write(join(inputs, "c-bad.csv"), "# unit: nm\nx,y,z\n0,0,0\n1,2,1.2e\n2,3,4\n5,5,5\n6,6,6\n");
write(join(inputs, "notes.md"), "not a wire");
const material = write(join(root, "m.json"), TEST_MATERIAL);

function summary(dir: string): string[][] {
  return readFileSync(join(dir, "summary.csv"), "utf8").trimEnd().split("\n").filter((l) => !l.startsWith("#")).map((l) => l.split(","));
}

describe("twistline batch", () => {
  it("runs every wire of a folder on two worker threads; a bad file is a row with its error and the others are written", async () => {
    const out = join(root, "out");
    const r = await run(["batch", inputs, "--material", material, "--out", out, "--jobs", "2", "--bootstrap", "20"], { stderrIsTTY: false });
    expect(r.code).toBe(1); // some wires failed: exit 1, after everything was written
    expect(r.stdout).toBe("");
    expect(readdirSync(out).sort()).toEqual([".twistline-owned.json", "a-helix", "b-arc", "summary.csv"]);
    expect(readdirSync(join(out, "a-helix")).sort()).toEqual(["chain.csv", "model.json", "profile.csv", "report.html", "wire.ply"]);
    const rows = summary(out);
    expect(rows[0]).toEqual([...SUMMARY_COLUMNS]);
    expect(rows.slice(1).map((x) => [x[0], x[2]])).toEqual([["a-helix", "ok"], ["b-arc", "ok"], ["c-bad", "error"]]);
    const bad = readFileSync(join(out, "summary.csv"), "utf8").split("\n").find((l) => l.startsWith("c-bad"))!;
    expect(bad).toContain('c-bad.csv:4: z: not a finite number: ""1.2e""');
    // the helix row: model columns filled (material given)
    const helix = rows[1];
    expect(Number(helix[SUMMARY_COLUMNS.indexOf("pinning_sites")])).toBeGreaterThanOrEqual(0);
    expect(helix[SUMMARY_COLUMNS.indexOf("unit")]).toBe("nm");
    expect(r.stderr).toContain("twistline: batch: c-bad: ");
    expect(r.stderr).toContain("twistline: batch: 2 of 3 wires analysed; wrote");
    expect(r.stderr.trimEnd().split("\n").at(-1)).toMatch(/summary\.csv: wires: 1 of 3 failed \(see the error column\); the others were written$/);
    expect(readdirSync(root).filter((f) => f.startsWith("."))).toEqual([]);
  });

  it("draws a progress bar on stderr only when stderr is a terminal, and nothing on stdout", async () => {
    const out = join(root, "tty");
    const r = await run(["batch", join(inputs, "b-arc.csv"), "--out", out, "--jobs", "1", "--bootstrap", "10"], { stderrIsTTY: true });
    expect(r.code).toBe(0);
    expect(r.stdout).toBe("");
    expect(r.stderr).toContain("\r[########################] 1/1 ");
    const quiet = await run(["batch", join(inputs, "b-arc.csv"), "--out", join(root, "quiet"), "--jobs", "1", "--bootstrap", "10", "--quiet"], { stderrIsTTY: true });
    expect(quiet).toEqual({ code: 0, stdout: "", stderr: "" });
  });

  it("progress: a bar on a terminal, plain periodic lines under CI, else nothing", () => {
    expect(progressMode(true, undefined)).toBe("bar");
    expect(progressMode(false, "true")).toBe("lines");
    expect(progressMode(false, "1")).toBe("lines");
    expect(progressMode(false, "false")).toBe("none");
    expect(progressMode(false, undefined)).toBe("none");
    let t = 0, err = "";
    const io = { stdout: () => { throw new Error("nothing on stdout"); }, stderr: (s: string) => { err += s; } };
    const p = progressReporter("lines", 4, io, () => t);
    p.tick(1, "a"); t = 6000; p.tick(2, "b"); t = 7000; p.tick(3, "c"); t = 8000; p.tick(4, "d"); p.end();
    expect(err).toBe("twistline: batch: 2/4 files done (6 s)\ntwistline: batch: 4/4 files done (8 s)\n");
  });

  it("expands folders (known extensions only) and patterns, and names folders uniquely", async () => {
    expect((await expandInputs([inputs])).map((f) => f.slice(inputs.length + 1))).toEqual(["a-helix.csv", "b-arc.csv", "c-bad.csv"]);
    expect((await expandInputs([join(inputs, "?-*c.csv")])).map((f) => f.slice(inputs.length + 1))).toEqual(["b-arc.csv"]);
    await expect(expandInputs([join(root, "missing")])).rejects.toThrow(/does not exist/);
    await expect(expandInputs([join(inputs, "*.xyz")])).rejects.toThrow(/no input files found/);
    expect(folderNames(["a/w.csv", "b/w.csv", "c/<w>.json"])).toEqual(["w", "w-2", "_w_"]);
  });

  it("refuses an existing output folder without --force, before reading anything", async () => {
    const out = join(root, "busy");
    mkdirSync(out);
    writeFileSync(join(out, "summary.csv"), "");
    const r = await run(["batch", inputs, "--out", out]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: batch: --out: folder ${JSON.stringify(out)} exists and is not empty (add --force to replace it)\n` });
    expect(existsSync(join(out, "a-helix"))).toBe(false);
  });
});
