/**
 * `centerline --branches split` through main(argv, io): per-branch CSVs and <stem>-network.json,
 * validated against the shipped JSON Schema (ajv, draft 2020-12, strict). Invented meshes and
 * clouds (test/support/networks.ts); references: the skeletons they were built around.
 */
import { readFileSync, readdirSync } from "node:fs";
import { join } from "node:path";
import { Ajv2020 } from "ajv/dist/2020.js";
import { describe, expect, it } from "vitest";
import schema from "../../src/export/schemas/network.schema.json" with { type: "json" };
import { ladderSkeleton, skeletonCloud, stlBinary, tripodSkeleton, tubeUnionMesh } from "../support/networks.js";
import { run, scratchFolders } from "./harness.js";

const ajv = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true });
const validate = ajv.compile(schema);
/** A fresh folder holding `name` with `data`. */
const fresh = scratchFolders("network");

const ladderStl = stlBinary(tubeUnionMesh(ladderSkeleton(150, 40, 60), 5, 1.5));

describe("centerline --branches split", () => {
  it("a ladder mesh: net-1.csv ... net-8.csv and net-network.json, valid against the schema", async () => {
    const { dir, input } = fresh("ladder.stl", ladderStl);
    const r = await run(["centerline", input, "--branches", "split", "--out", join(dir, "net.csv"), "--unit", "nm"]);
    expect(r.stderr).toMatch(/a network of 8 branches, 4 junctions, 4 free ends, 1 independent cycles/);
    expect(r.code).toBe(0);
    const doc = JSON.parse(readFileSync(join(dir, "net-network.json"), "utf8"));
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.unit).toBe("nm");
    expect(doc.cycles).toBe(1);
    expect(doc.junctions).toHaveLength(4);
    expect(doc.branches.map((b: { file: string }) => b.file)).toEqual(Array.from({ length: 8 }, (_, i) => `net-${i + 1}.csv`));
    // longest first
    const lengths = doc.branches.map((b: { length: number }) => b.length);
    expect([...lengths].sort((a, b) => b - a)).toEqual(lengths);
    // each junction's branches name it as their from or to
    for (const j of doc.junctions) {
      for (const id of j.branches) {
        const b = doc.branches[id - 1];
        expect([b.from, b.to].some((t: { kind: string; id: number } | null) => t?.kind === "junction" && t.id === j.id)).toBe(true);
      }
    }
    for (let i = 1; i <= 8; i++) {
      const csv = readFileSync(join(dir, `net-${i}.csv`), "utf8");
      expect(csv).toMatch(new RegExp(`# wire: ${i} of 8`));
      expect(csv).toMatch(/# diagnostic: branch \d of 8: from (junction|end) \d to (junction|end) \d/);
    }
    // a branch CSV reads back into `profile`
    const p = await run(["profile", join(dir, "net-1.csv"), "--out", join(dir, "p1.csv"), "--bootstrap", "0", "--quiet"]);
    expect(p.code).toBe(0);
  });
  it("a tripod cloud with --format cloud: 3 branch files and a valid network.json", async () => {
    const xyz = skeletonCloud(tripodSkeleton(60, 50), 0.5, 0.3, 8);
    const rows = ["x,y,z"];
    for (let i = 0; i < xyz.length; i += 3) rows.push(`${xyz[i]},${xyz[i + 1]},${xyz[i + 2]}`);
    const { dir, input } = fresh("tripod.csv", rows.join("\n"));
    const r = await run(["centerline", input, "--format", "cloud", "--branches", "split", "--out", join(dir, "t.csv"), "--quiet"]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const doc = JSON.parse(readFileSync(join(dir, "t-network.json"), "utf8"));
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect([doc.junctions.length, doc.ends.length, doc.branches.length, doc.cycles]).toEqual([1, 3, 3, 0]);
    expect(doc.branches.every((b: { radius: unknown }) => b.radius === null)).toBe(true);
    expect(readdirSync(dir).sort()).toEqual(["t-1.csv", "t-2.csv", "t-3.csv", "t-network.json", "tripod.csv"]);
  });
  it("refuses standard output, --wire, and an ordered trace, with one line and nothing written", async () => {
    const { dir, input } = fresh("ladder.stl", ladderStl);
    const a = await run(["centerline", input, "--branches", "split", "--out", "-"]);
    expect(a.code).toBe(1);
    expect(a.stderr).toMatch(/^twistline: centerline: --out: --branches split writes several files: give a file name/);
    const b = await run(["centerline", input, "--branches", "split", "--wire", "2", "--out", join(dir, "n.csv")]);
    expect(b.code).toBe(1);
    expect(b.stderr).toMatch(/--wire: does not go with --branches split/);
    const csv = fresh("trace.csv", "x,y,z\n0,0,0\n1,0,0\n2,1,0\n3,1,1\n");
    const c = await run(["centerline", csv.input, "--branches", "split", "--out", join(csv.dir, "n.csv")]);
    expect(c.code).toBe(1);
    expect(c.stderr.trim().split("\n")).toHaveLength(1);
    expect(c.stderr).toContain("format: a network is split from a tube mesh (.stl, .obj, .ply) or an unordered cloud (--format cloud)");
    expect(readdirSync(csv.dir)).toEqual(["trace.csv"]);
    expect(readdirSync(dir)).toEqual(["ladder.stl"]);
  });
  it("never overwrites the input: a branch file that would land on the input is refused before anything is written", async () => {
    const xyz = skeletonCloud(tripodSkeleton(60, 50), 0.5, 0.3, 8);
    const rows = ["x,y,z"];
    for (let i = 0; i < xyz.length; i += 3) rows.push(`${xyz[i]},${xyz[i + 1]},${xyz[i + 2]}`);
    const { dir, input } = fresh("n-2.csv", rows.join("\n"));
    const r = await run(["centerline", input, "--format", "cloud", "--branches", "split", "--out", join(dir, "n.csv")]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/is the input file; refusing to overwrite it/);
    expect(readdirSync(dir)).toEqual(["n-2.csv"]);
  });
});
