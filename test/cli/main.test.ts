import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { main } from "../../cli/main.js";
import { TOOL_VERSION } from "../../src/export/version.js";
import { run } from "./harness.js";

const root = mkdtempSync(join(tmpdir(), "twistline-cli-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));
let k = 0;
/** A fresh folder holding a valid 4-point trace `wire.csv`. */
function fresh(): { dir: string; input: string } {
  const dir = join(root, `case${k++}`);
  mkdirSync(dir);
  const input = join(dir, "wire.csv");
  writeFileSync(input, "x,y,z\n0,0,0\n1,0,0\n1,1,0\n0,1,1\n");
  return { dir, input };
}

describe("main(argv, io): help and usage", () => {
  it("prints help listing the commands, with exit code 0", async () => {
    const r = await run(["--help"]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain("Usage: twistline [options] [command]");
    expect(r.stdout).toMatch(/profile \[options\] <input>/);
    expect(r.stdout).toMatch(/demo \[options\]/);
    expect(r.stdout).toContain("Exit codes: 0 success, 1 bad input data or option value, 2 bad usage or internal error.");
    expect(r.stderr).toBe("");
  });

  it("prints profile help with every option and the nm default", async () => {
    const r = await run(["profile", "--help"]);
    expect(r.code).toBe(0);
    for (const flag of ["--out <file>", "--unit <unit>", "--pixel-size <length>", "--closed", "--open", "--bootstrap <n>",
      "--seed <n>", "--step <length>", "--out-unit <unit>", "--format <format>", "--quiet"]) {
      expect(r.stdout).toContain(flag);
    }
    expect(r.stdout.replace(/\s+/g, " ")).toContain("(default: the unit the file declares, else nm)");
  });

  it("prints the version", async () => {
    const r = await run(["--version"]);
    expect(r).toEqual({ code: 0, stdout: `${TOOL_VERSION}\n`, stderr: "" });
  });

  it("exits 2 without a command, with an unknown command, option or a missing argument", async () => {
    expect((await run([])).code).toBe(2);
    const unknown = await run(["profil", "w.csv"]);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toContain("twistline: unknown command 'profil'");
    const option = await run(["profile", "w.csv", "--out", "o.csv", "--bootstrp", "3"]);
    expect(option.code).toBe(2);
    expect(option.stderr).toBe("twistline: unknown option '--bootstrp'\n(Did you mean --bootstrap?)\n(add --help for usage)\n");
    const noOut = await run(["profile", "w.csv"]);
    expect(noOut.code).toBe(2);
    expect(noOut.stderr).toBe("twistline: required option '--out <file>' not specified\n(add --help for usage)\n");
    expect((await run(["profile", "--out", "o.csv"])).code).toBe(2);
    expect((await run(["profile", "a.csv", "b.csv", "--out", "o.csv"])).code).toBe(2);
  });

  it("exits 2 and prints a stack for an unexpected error", async () => {
    let stderr = "";
    const code = await main(["--help"], {
      stdout: () => {
        throw new Error("stdout broke");
      },
      stderr: (s) => {
        stderr += s;
      },
    });
    expect(code).toBe(2);
    expect(stderr).toMatch(/^twistline: internal error \(a bug; please report it with the command line\):\nError: stdout broke\n\s+at /);
  });
});

describe("main(argv, io): profile option checks", () => {
  const cases: [string[], string][] = [
    [["--bootstrap", "x"], 'profile: --bootstrap: must be an integer >= 0 (got "x")'],
    [["--bootstrap", "-1"], 'profile: --bootstrap: must be an integer >= 0 (got "-1")'],
    [["--bootstrap", "2.5"], 'profile: --bootstrap: must be an integer >= 0 (got "2.5")'],
    [["--bootstrap", ""], 'profile: --bootstrap: must be an integer >= 0 (got "")'],
    [["--seed", "4294967296"], 'profile: --seed: must be an integer from 0 to 4294967295 (got "4294967296")'],
    [["--unit", "mm"], 'profile: --unit: must be one of "m", "um", "nm", "A", "px" (got "mm")'],
    [["--unit", "px"], "profile: --pixel-size: is required with --unit px (e.g. --pixel-size 2.5nm)"],
    [["--unit", "px", "--pixel-size", "2.5"], 'profile: --pixel-size: must be a positive length with a unit (m, um, nm, A), e.g. 2.5nm (got "2.5")'],
    [["--unit", "nm", "--pixel-size", "2nm"], "profile: --pixel-size: only applies to --unit px (got --unit nm)"],
    [["--step", "-5nm"], 'profile: --step: must be a positive length with a unit (m, um, nm, A), e.g. 2.5nm (got "-5nm")'],
    [["--step", "5px"], 'profile: --step: must be a positive length with a unit (m, um, nm, A), e.g. 2.5nm (got "5px")'],
    [["--out-unit", "px"], 'profile: --out-unit: must be one of "m", "um", "nm", "A" (got "px")'],
    [["--format", "gltf"], 'profile: --format: must be one of csv, tsv, txt, xyz, json, stl, obj, ply, svg, cloud (got "gltf")'],
    [["--closed", "--open"], "profile: --closed/--open: give one of them, not both"],
  ];
  it.each(cases)("refuses %j with exit code 1 and one line, writing nothing", async (extra, message) => {
    const { dir, input } = fresh();
    const r = await run(["profile", input, "--out", join(dir, "out.csv"), ...extra]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: ${message}\n` });
    expect(readdirSync(dir)).toEqual(["wire.csv"]);
  });

  it("refuses an output that is not .csv, .json or -", async () => {
    const { dir, input } = fresh();
    const out = join(dir, "out.txt");
    const r = await run(["profile", input, "--out", out]);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe(`twistline: profile: --out: must end in .csv or .json, or be - for CSV on standard output (got ${JSON.stringify(out)})\n`);
  });
});

describe("main(argv, io): profile input and output errors", () => {
  it("reports a missing input file in one line, exit code 1", async () => {
    const { dir } = fresh();
    const missing = join(dir, "none.csv");
    const r = await run(["profile", missing, "--out", join(dir, "out.csv")]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: ${missing}: file: no such file\n` });
  });

  it("reports bad data with file and line, writes nothing, leaves no temporary file", async () => {
    const { dir } = fresh();
    const input = join(dir, "bad.csv");
    writeFileSync(input, "x,y,z\n0,0,0\n1,0,1.2e\n");
    const r = await run(["profile", input, "--out", join(dir, "out.csv")]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: ${input}:3: z: not a finite number: "1.2e"\n` });
    expect(readdirSync(dir).sort()).toEqual(["bad.csv", "wire.csv"]);
  });

  it("reports an unknown input extension with the accepted ones", async () => {
    const { dir } = fresh();
    const input = join(dir, "w.dat");
    writeFileSync(input, "0 0\n");
    const r = await run(["profile", input, "--out", join(dir, "out.csv")]);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe(`twistline: ${input}: format: unknown file extension ".dat" (accepted: .csv, .tsv, .txt, .xyz, .json, .stl, .obj, .ply, .svg; or name the format)\n`);
  });

  it("refuses to overwrite the input, also through a symbolic link, before reading it", async () => {
    const { dir, input } = fresh();
    const before = readFileSync(input, "utf8");
    const r = await run(["profile", input, "--out", input]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: profile: --out: ${JSON.stringify(input)} is the input file; refusing to overwrite it\n` });
    const link = join(dir, "link.csv");
    symlinkSync(input, link);
    expect((await run(["profile", input, "--out", link])).code).toBe(1);
    expect(readFileSync(input, "utf8")).toBe(before);
    expect(readdirSync(dir).sort()).toEqual(["link.csv", "wire.csv"]);
  });

  it("refuses an output folder that does not exist, and an output that is a folder", async () => {
    const { dir, input } = fresh();
    const out = join(dir, "nowhere", "out.csv");
    const r = await run(["profile", input, "--out", out]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: profile: --out: folder ${JSON.stringify(join(dir, "nowhere"))} does not exist\n` });
    mkdirSync(join(dir, "taken.csv"));
    const taken = await run(["profile", input, "--out", join(dir, "taken.csv")]);
    expect(taken.code).toBe(1);
    expect(taken.stderr).toBe(`twistline: profile: --out: ${JSON.stringify(join(dir, "taken.csv"))} is a directory\n`);
  });

  it("refuses - as input when there is no standard input", async () => {
    const { dir } = fresh();
    const r = await run(["profile", "-", "--out", join(dir, "o.csv")]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: "twistline: <stdin>: file: standard input is not available here\n" });
  });

  it("reports a unit contradiction between the file and --unit", async () => {
    const { dir } = fresh();
    const input = join(dir, "w.json");
    writeFileSync(input, '{"unit":"um","points":[[0,0],[1,0],[1,1],[0,1]]}');
    const r = await run(["profile", input, "--unit", "nm", "--out", join(dir, "o.csv")]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: ${input}: unit: the file declares "um" but "nm" was asked for\n` });
  });
});

describe("main(argv, io): demo checks", () => {
  it("refuses to write into a non-empty folder without --force", async () => {
    const { dir } = fresh();
    const r = await run(["demo", "--out", dir]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: demo: --out: folder ${JSON.stringify(dir)} exists and is not empty (add --force to replace it)\n` });
    expect(readdirSync(dir)).toEqual(["wire.csv"]);
  });

  it("refuses an output that is a file", async () => {
    const { input } = fresh();
    const r = await run(["demo", "--out", input]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: demo: --out: ${JSON.stringify(input)} exists and is not a folder\n` });
  });
});
