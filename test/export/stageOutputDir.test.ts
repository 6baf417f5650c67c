import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, utimesSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { ParameterError } from "../../src/errors.js";
import { OWNER_MARKER, stageOutputDir } from "../../src/export/stageOutputDir.js";

const fresh = () => mkdtempSync(join(tmpdir(), "twistline-stage-"));

describe("stageOutputDir(target, options)", () => {
  it("creates the folder (and missing parents) only on commit, and leaves no temporary folder", async () => {
    const root = fresh();
    const target = join(root, "a", "out");
    const st = await stageOutputDir(target, { force: false, where: "analyze" });
    writeFileSync(join(st.path, "model.json"), "{}");
    expect(existsSync(target)).toBe(false);
    await st.commit();
    expect(readdirSync(target).sort()).toEqual([".twistline-owned.json", "model.json"]);
    expect(JSON.parse(readFileSync(join(target, OWNER_MARKER), "utf8"))).toMatchObject({ tool: "twistline", files: ["model.json"] });
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

  it("with --force replaces a folder twistline marked, but never one with other files or an input", async () => {
    const root = fresh();
    const out = join(root, "out");
    const first = await stageOutputDir(out, { force: false, where: "batch" });
    mkdirSync(join(first.path, "coil"));
    writeFileSync(join(first.path, "summary.csv"), "old");
    writeFileSync(join(first.path, "coil", "report.html"), "old");
    await first.commit();
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

  // issue 12: ownership was judged by file name, so --force replaced a user's own model.json
  it("with --force refuses a folder without the marker, even when its files have twistline's names", async () => {
    const root = fresh();
    const out = join(root, "mine");
    mkdirSync(out);
    writeFileSync(join(out, "model.json"), '{"my": "own model"}');
    await expect(stageOutputDir(out, { force: true, where: "analyze" })).rejects.toThrow(
      new ParameterError("analyze", "--out", `folder ${JSON.stringify(out)} has no .twistline-owned.json (twistline's mark on the folders it writes); refusing to replace it`),
    );
    writeFileSync(join(out, OWNER_MARKER), '{"tool": "other"}');
    await expect(stageOutputDir(out, { force: true, where: "analyze" })).rejects.toThrow(/has a .twistline-owned.json that twistline did not write/);
    expect(readFileSync(join(out, "model.json"), "utf8")).toBe('{"my": "own model"}');
  });

  it("a temporary folder left by a killed run (a dead pid) is removed; one of a live run is kept", async () => {
    const root = fresh();
    const out = join(root, "out");
    const dead = spawnSync(process.execPath, ["-e", ""]).pid as number; // exited: its pid is free
    const stale = `.out.${dead}-0123456789ab.tmp`;
    const living = `.out.${process.ppid}-0123456789ab.tmp`;
    mkdirSync(join(root, stale));
    writeFileSync(join(root, stale, "profile.csv"), "half");
    mkdirSync(join(root, living));
    const legacyOld = ".out.0123456789ab.tmp", legacyNew = ".out.ba9876543210.tmp"; // names without a pid (version 0.1.0)
    mkdirSync(join(root, legacyOld));
    mkdirSync(join(root, legacyNew));
    const twoHoursAgo = new Date(Date.now() - 2 * 3600_000);
    utimesSync(join(root, legacyOld), twoHoursAgo, twoHoursAgo);
    const st = await stageOutputDir(out, { force: false, where: "analyze" });
    expect(existsSync(join(root, stale))).toBe(false);
    expect(existsSync(join(root, living))).toBe(true);
    expect(existsSync(join(root, legacyOld))).toBe(false);
    expect(existsSync(join(root, legacyNew))).toBe(true); // could be a run of the old version still going
    await st.abort();
  });

  it("a target name of 255 bytes still gets a temporary sibling (the sibling's name is cut to fit)", async () => {
    const root = fresh();
    const name = "é".repeat(127) + "x"; // 255 bytes in UTF-8
    const st = await stageOutputDir(join(root, name), { force: false, where: "analyze" });
    writeFileSync(join(st.path, "model.json"), "{}");
    await st.commit();
    expect(readdirSync(root)).toEqual([name]);
  });
});
