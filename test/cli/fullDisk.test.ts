/**
 * Issue 12: a full disk, simulated by injecting ENOSPC into every write (node:fs/promises is mocked
 * in this file only; nothing fills a real disk). Nothing is left behind, the message names the
 * cause, and no success line is printed.
 */
import { existsSync, mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeEach, describe, expect, it, vi } from "vitest";
import { runDemo } from "../../cli/demo.js";
import { run } from "./harness.js";
import { helixCsv, write } from "./wireFiles.js";

const disk = vi.hoisted(() => ({ full: false }));

vi.mock("node:fs/promises", async (importOriginal) => {
  const fs = await importOriginal<typeof import("node:fs/promises")>();
  const enospc = (path: unknown): Error =>
    Object.assign(new Error(`ENOSPC: no space left on device, write '${String(path)}'`), { code: "ENOSPC", errno: -28, syscall: "write", path: String(path) });
  const open: typeof fs.open = async (path, flags, mode) => {
    const handle = await fs.open(path, flags, mode);
    if (!disk.full || flags !== "wx") return handle;
    return new Proxy(handle, {
      get(target, key) {
        if (key === "write" || key === "writeFile") return async () => { throw enospc(path); };
        const v = Reflect.get(target, key) as unknown;
        return typeof v === "function" ? (v as (...a: unknown[]) => unknown).bind(target) : v;
      },
    });
  };
  const writeFile: typeof fs.writeFile = async (path, data, options) => {
    if (disk.full) throw enospc(path);
    return fs.writeFile(path, data, options);
  };
  return { ...fs, default: { ...fs, open, writeFile }, open, writeFile };
});

const root = mkdtempSync(join(tmpdir(), "twistline-full-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));
const wire = write(join(root, "w.csv"), helixCsv(51, 80));
beforeEach(() => {
  disk.full = true;
});

describe("a full disk", () => {
  it("profile: exit 1 naming --out and the cause; no file, no temporary file", async () => {
    const r = await run(["profile", wire, "--out", join(root, "p.csv"), "--bootstrap", "0"]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: profile: --out: cannot write ${JSON.stringify(join(root, "p.csv"))}: no space left on the device\n` });
    expect(readdirSync(root)).toEqual(["w.csv"]);
  });

  it("analyze: exit 1 naming the file it could not write; no folder left", async () => {
    const r = await run(["analyze", wire, "--out", join(root, "a"), "--bootstrap", "0"]);
    expect(r).toEqual({ code: 1, stdout: "", stderr: "twistline: analyze: --out: cannot write profile.csv: no space left on the device\n" });
    expect(readdirSync(root)).toEqual(["w.csv"]);
  });

  it("batch: the cause, not \"a bug\"; nothing written and no success line", async () => {
    const r = await run(["batch", wire, "--out", join(root, "b"), "--jobs", "1", "--bootstrap", "0"]);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe(`twistline: batch: --out: cannot write summary.csv: no space left on the device; nothing was written to ${JSON.stringify(join(root, "b"))}\n`);
    expect(readdirSync(root)).toEqual(["w.csv"]);
  });

  it("demo: never says \"open .../report.html\" or \"the others were written\" when nothing was", async () => {
    let stderr = "", stdout = "";
    const io = { stdout: (s: string) => void (stdout += s), stderr: (s: string) => void (stderr += s) };
    const out = join(root, "demo");
    await expect(runDemo(out, false, false, io, 1)).rejects.toThrow(`demo: --out: cannot write summary.csv: no space left on the device; nothing was written to ${JSON.stringify(out)}`);
    expect(stderr).toBe("");
    expect(stdout).toBe("");
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(root)).toEqual(["w.csv"]);
  }, 60_000);
});
