import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { ParameterError } from "../../src/errors.js";
import { sameFile } from "../../src/export/sameFile.js";
import { writeFileAtomic } from "../../src/export/writeFileAtomic.js";

const root = mkdtempSync(join(tmpdir(), "twistline-write-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));
let k = 0;
const fresh = (): string => {
  const d = join(root, `case${k++}`);
  mkdirSync(d);
  return d;
};

async function rejection(p: Promise<unknown>): Promise<Error & { code?: string }> {
  try {
    await p;
  } catch (e) {
    return e as Error;
  }
  throw new Error("expected a rejection");
}

describe("writeFileAtomic(path, data, options)", () => {
  it("writes a new file and leaves no temporary file behind", async () => {
    const d = fresh();
    await writeFileAtomic(join(d, "out.csv"), "a,b\n1,2\n");
    expect(readFileSync(join(d, "out.csv"), "utf8")).toBe("a,b\n1,2\n");
    expect(readdirSync(d)).toEqual(["out.csv"]);
  });

  it("replaces an existing file whole, and writes bytes too", async () => {
    const d = fresh();
    const p = join(d, "out.json");
    writeFileSync(p, "old content that is longer than the new one");
    await writeFileAtomic(p, new Uint8Array([123, 125]));
    expect(readFileSync(p, "utf8")).toBe("{}");
    expect(readdirSync(d)).toEqual(["out.json"]);
  });

  it("refuses to overwrite a protected input: same path, relative path, symbolic link", async () => {
    const d = fresh();
    const input = join(d, "wire.csv");
    writeFileSync(input, "0 0\n");
    const e = await rejection(writeFileAtomic(input, "x", { protect: [input] }));
    expect(e).toBeInstanceOf(ParameterError);
    expect(e.message).toBe(`writeFileAtomic: path: ${JSON.stringify(input)} is an input file; refusing to overwrite it`);
    await expect(writeFileAtomic(relative(".", input), "x", { protect: [input] })).rejects.toThrow(ParameterError);
    const link = join(d, "link.csv");
    symlinkSync(input, link);
    await expect(writeFileAtomic(link, "x", { protect: [input] })).rejects.toThrow(ParameterError);
    expect(readFileSync(input, "utf8")).toBe("0 0\n");
    expect(readdirSync(d).sort()).toEqual(["link.csv", "wire.csv"]);
  });

  it("fails with the file-system code and cleans up when the target is a directory", async () => {
    const d = fresh();
    mkdirSync(join(d, "taken.csv"));
    const e = await rejection(writeFileAtomic(join(d, "taken.csv"), "data"));
    expect(["EISDIR", "ENOTDIR", "EEXIST", "ENOTEMPTY"]).toContain(e.code);
    expect(readdirSync(d)).toEqual(["taken.csv"]);
  });

  it("fails with ENOENT when the folder does not exist", async () => {
    const d = fresh();
    const e = await rejection(writeFileAtomic(join(d, "missing", "out.csv"), "data"));
    expect(e.code).toBe("ENOENT");
    expect(existsSync(join(d, "missing"))).toBe(false);
  });
});

describe("sameFile(a, b)", () => {
  it("compares resolved paths and inodes, and is false for missing files", async () => {
    const d = fresh();
    const f = join(d, "f.txt");
    writeFileSync(f, "");
    expect(await sameFile(f, join(d, ".", "f.txt"))).toBe(true);
    expect(await sameFile(f, join(d, "g.txt"))).toBe(false);
    writeFileSync(join(d, "g.txt"), "");
    expect(await sameFile(f, join(d, "g.txt"))).toBe(false);
  });
});
