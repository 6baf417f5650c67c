/**
 * `analyze --branches split` through main(argv, io): one analysis folder per branch, network.json
 * (valid against the shipped schema), network.html linking every branch report, summary.csv, and
 * the junction-zone flag in each branch's profile. Invented tripod mesh (test/support/networks.ts).
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Ajv2020 } from "ajv/dist/2020.js";
import { afterAll, describe, expect, it } from "vitest";
import schema from "../../src/export/schemas/network.schema.json" with { type: "json" };
import { FLAG_JUNCTION_ZONE } from "../../src/types.js";
import { stlBinary, tripodSkeleton, tubeUnionMesh } from "../support/networks.js";
import { run } from "./harness.js";

const validate = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true }).compile(schema);
const root = mkdtempSync(join(tmpdir(), "twistline-analyze-network-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));
const tripod = stlBinary(tubeUnionMesh(tripodSkeleton(100, 60), 5, 2));

describe("analyze --branches split", () => {
  it("a tripod: branch-1..3 folders with their reports, network.json, network.html and summary.csv", async () => {
    const dir = join(root, "a");
    mkdirSync(dir);
    const input = join(dir, "tripod.stl");
    writeFileSync(input, tripod);
    const out = join(dir, "out");
    const r = await run(["analyze", input, "--branches", "split", "--out", out, "--bootstrap", "0", "--jobs", "1", "--material", "fixtures/demo/material-invented-soft-ferro.json"]);
    expect(r.stderr).toMatch(/a network of 3 branches, 1 junctions, 3 free ends, 0 independent cycles; analysed 3 of 3 branches; wrote .*network\.html\n$/);
    expect(r.code).toBe(0);
    const names = readdirSync(out).sort();
    expect(names).toEqual([".twistline-owned.json", "branch-1", "branch-2", "branch-3", "network.html", "network.json", "summary.csv"]);
    for (const b of ["branch-1", "branch-2", "branch-3"]) {
      for (const f of ["report.html", "model.json", "profile.csv"]) expect(existsSync(join(out, b, f))).toBe(true);
    }
    const doc = JSON.parse(readFileSync(join(out, "network.json"), "utf8"));
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.branches.map((b: { file: string; analysed: boolean }) => [b.file, b.analysed])).toEqual([["branch-1", true], ["branch-2", true], ["branch-3", true]]);
    expect(doc.branches.every((b: { stretches: number }) => b.stretches >= 1)).toBe(true);
    const page = readFileSync(join(out, "network.html"), "utf8");
    for (const b of ["branch-1", "branch-2", "branch-3"]) expect(page).toContain(`href="${b}/report.html"`);
    expect(page).toMatch(/<td>J1<\/td>/);
    expect(page).not.toMatch(/<script/);
    // summary.csv: one row per branch
    const rows = readFileSync(join(out, "summary.csv"), "utf8").split("\n").filter((l) => l !== "" && !l.startsWith("#"));
    expect(rows).toHaveLength(4);
    // each profile flags the samples near the junction, and only near its start or end
    for (const b of ["branch-1", "branch-2", "branch-3"]) {
      const lines = readFileSync(join(out, b, "profile.csv"), "utf8").split("\n").filter((l) => l !== "" && !l.startsWith("#"));
      const head = lines[0].split(",");
      const fi = head.indexOf("flags");
      const flagged = lines.slice(1).map((l) => (Number(l.split(",")[fi]) & FLAG_JUNCTION_ZONE) !== 0);
      expect(flagged.some((f) => f)).toBe(true);
      const firstOff = flagged.indexOf(false), lastOff = flagged.lastIndexOf(false);
      // flagged samples form a run at one end only
      expect(flagged.slice(firstOff, lastOff + 1).every((f) => !f)).toBe(true);
      expect(flagged[0] || flagged[flagged.length - 1]).toBe(true);
    }
  });
  it("refuses --wire and standard input with --branches split, and --jobs without it", async () => {
    const a = await run(["analyze", "x.stl", "--branches", "split", "--wire", "1", "--out", join(root, "nope")]);
    expect(a.code).toBe(1);
    expect(a.stderr).toMatch(/analyze: --wire: does not go with --branches split/);
    const b = await run(["analyze", "x.csv", "--jobs", "2", "--out", join(root, "nope")]);
    expect(b.code).toBe(1);
    expect(b.stderr).toMatch(/analyze: --jobs: only goes with --branches split/);
    expect(existsSync(join(root, "nope"))).toBe(false);
  });
});

describe("batch --branches split", () => {
  it("each mesh becomes a network folder; a file that is not a network gets an error row and exit 1", async () => {
    const dir = join(root, "b");
    mkdirSync(dir);
    writeFileSync(join(dir, "tripod.stl"), tripod);
    writeFileSync(join(dir, "plain.csv"), "x,y,z\n0,0,0\n1,0,0\n2,1,0\n3,1,1\n4,2,1\n5,2,2\n");
    const out = join(dir, "out");
    const r = await run(["batch", dir, "--branches", "split", "--out", out, "--bootstrap", "0", "--jobs", "1"]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/batch: plain: .*a network is split from a tube mesh/);
    expect(readdirSync(join(out, "tripod")).sort()).toEqual(["branch-1", "branch-2", "branch-3", "network.html", "network.json"]);
    const summary = readFileSync(join(out, "summary.csv"), "utf8");
    for (const w of ["tripod/branch-1", "tripod/branch-2", "tripod/branch-3", "plain"]) expect(summary).toContain(`${w},`);
    expect(validate(JSON.parse(readFileSync(join(out, "tripod", "network.json"), "utf8")))).toBe(true);
  });
});
