/**
 * Issue 12: hostile inputs and file-system faults that used to crash with a stack trace (exit 2).
 * Each now ends with exit 1 and one line naming the file, option or field and the cause.
 */
import { closeSync, mkdirSync, mkdtempSync, openSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync, ftruncateSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { readMaterialFile } from "../../cli/wireJob.js";
import { InputError } from "../../src/errors.js";
import { readInputBytes, readStreamBytes } from "../../src/import/readInputBytes.js";
import { readTraceFile } from "../../src/import/readTrace.js";
import { circleCurve, threeTube, toStlBinary } from "../support/tubes.js";
import { run, stdinOf } from "./harness.js";
import { arcCsv, helixCsv, write } from "./wireFiles.js";

const root = mkdtempSync(join(tmpdir(), "twistline-hostile-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));
const wire = write(join(root, "arc.csv"), arcCsv(31, 60));

describe("inputs the file system refuses: exit 1 with one line", () => {
  it("a symbolic link loop", async () => {
    symlinkSync(join(root, "loop-b.csv"), join(root, "loop-a.csv"));
    symlinkSync(join(root, "loop-a.csv"), join(root, "loop-b.csv"));
    const r = await run(["profile", join(root, "loop-a.csv"), "--out", join(root, "o.csv")]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: ${join(root, "loop-a.csv")}: file: too many levels of symbolic links (a link loop?)\n` });
  });

  it("a symbolic link loop given to batch", async () => {
    const r = await run(["batch", join(root, "loop-a.csv"), "--out", join(root, "b-out")]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: batch: <inputs>: ${JSON.stringify(join(root, "loop-a.csv"))}: too many levels of symbolic links (a link loop?)\n` });
  });

  it("a name longer than the file system allows", async () => {
    const long = join(root, `${"n".repeat(300)}.csv`);
    const r = await run(["profile", long, "--out", join(root, "o.csv")]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: ${long}: file: name too long for the file system\n` });
  });

  it("a directory with a trace's extension", async () => {
    const dir = join(root, "folder.csv");
    mkdirSync(dir);
    const r = await run(["profile", dir, "--out", join(root, "o.csv")]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: ${dir}: file: is a directory, not a file\n` });
  });

  it("a file over 2 GiB (sparse) is refused before a byte is read", async () => {
    const big = join(root, "big.csv");
    const fd = openSync(big, "w");
    ftruncateSync(fd, 3 * 1024 ** 3);
    closeSync(fd);
    const r = await run(["profile", big, "--out", join(root, "o.csv")]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: ${big}: file: 3072 MiB is more than the 500 MiB an input may hold\n` });
  });

  it("a device that never ends (/dev/zero) is cut at the cap", async () => {
    await expect(readInputBytes("/dev/zero", 1 << 20)).rejects.toThrow(
      new InputError("/dev/zero", null, "file", "more than 1 MiB arrived (an endless device or pipe?); stopped reading"),
    );
  });

  it("standard input that never ends is cut at the cap", async () => {
    async function* endless(): AsyncGenerator<Uint8Array> {
      for (;;) yield new Uint8Array(65536);
    }
    await expect(readStreamBytes(endless(), "<stdin>", 1 << 20)).rejects.toThrow(/^<stdin>: file: more than 1 MiB arrived/);
  });
});

describe("hostile contents: exit 1 with one line", () => {
  it("an SVG character reference beyond U+10FFFF", async () => {
    const svg = write(join(root, "ref.svg"), '<svg xmlns="http://www.w3.org/2000/svg" width="100nm" viewBox="0 0 100 100">\n<path id="&#x110000;" d="M0 0 L 10 10 L 20 5 L 30 20 L 40 30 L 50 20"/></svg>');
    const r = await run(["profile", svg, "--out", join(root, "o.csv")]);
    expect(r).toEqual({
      code: 1, stdout: "",
      stderr: `twistline: ${svg}:2: xml: character reference &#x110000; is not a legal XML character (allowed up to U+10FFFF, no control characters or surrogates)\n`,
    });
  });

  it("a material whose note nests 20000 levels deep", async () => {
    const deep = `${"[".repeat(20000)}1${"]".repeat(20000)}`;
    const m = write(join(root, "deep.json"), `{"order":"ferro","magneticLength":1e-8,"note":${deep}}`);
    const r = await run(["analyze", wire, "--material", m, "--out", join(root, "deep-out"), "--bootstrap", "0"]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: ${m}: note: nested more than 32 levels deep\n` });
    expect(readdirSync(root).filter((f) => f.startsWith(".") || f === "deep-out")).toEqual([]);
  });

  it("a material with a byte-order mark is read like one without", async () => {
    const m = write(join(root, "bom.json"), '\uFEFF{"order":"ferro","magneticLength":1e-8}');
    expect((await readMaterialFile(m)).magneticLength).toBe(1e-8);
  });

  it("a material number beyond the double range is shown as written, with its line", async () => {
    const m = write(join(root, "huge.json"), '{\n "order": "ferro",\n "magneticLength": 1e400\n}');
    await expect(readMaterialFile(m)).rejects.toThrow(new InputError(m, 3, "magneticLength", "1e400 is beyond the range of a double (largest about 1.8e308)"));
  });

  it("a binary STL whose header starts with \"solid\" is read as binary, not printed as text", async () => {
    const stl = toStlBinary(threeTube(circleCurve(40), 4, 120, 12, true));
    const bytes = new Uint8Array(stl.byteLength + 5); // a few stray bytes at the end: the size no longer tells binary
    bytes.set(stl);
    bytes.set(new TextEncoder().encode("solid exported by a CAD program"), 0);
    const file = join(root, "solid-binary.stl");
    writeFileSync(file, bytes);
    const trace = await readTraceFile(file, { unit: "nm" });
    expect(trace.closed).toBe(true);
    expect(trace.diagnostics.join(" ")).toContain("ignored 5 bytes after the last triangle");
  });
});

describe("error lines stay one printable line", () => {
  it("control bytes quoted from a file are escaped, and a huge quoted line is cut", async () => {
    const stl = join(root, "ctl.stl");
    writeFileSync(stl, `solid x\n${" ".repeat(1100)}\n\u0001\u0002\u001b[31m${"z".repeat(5000)} 1 2\n`);
    const r = await run(["profile", stl, "--out", join(root, "o.csv")]);
    expect(r.code).toBe(1);
    expect(r.stderr.endsWith("\n")).toBe(true);
    expect(r.stderr.slice(0, -1)).not.toMatch(/[\u0000-\u001f\u007f]/);
    expect(r.stderr).toContain("\\u0001\\u0002\\u001b[31m");
    expect(r.stderr.length).toBeLessThanOrEqual("twistline: ".length + 600 + 1);
  });
});

describe("long output names (the temporary sibling used to add 18 bytes)", () => {
  it("profile writes a 255-byte file name", async () => {
    const name = `${"p".repeat(251)}.csv`;
    const r = await run(["profile", wire, "--out", join(root, name), "--bootstrap", "0", "--quiet"]);
    expect(r).toEqual({ code: 0, stdout: "", stderr: "" });
    expect(readFileSync(join(root, name), "utf8")).toContain("s,x,y,z,kappa");
  });

  it("analyze writes into a 255-byte folder name", async () => {
    const name = "f".repeat(255);
    const r = await run(["analyze", wire, "--out", join(root, name), "--bootstrap", "0", "--quiet"]);
    expect(r.code).toBe(0);
    expect(readdirSync(join(root, name))).toContain("model.json");
  });
});

describe("standard input", () => {
  it("the tool's helix read from stdin still works under the cap", async () => {
    const r = await run(["profile", "-", "--out", "-", "--bootstrap", "0", "--quiet"], { readStdin: stdinOf(helixCsv(3, 80)) });
    expect(r.code).toBe(0);
  });
});
