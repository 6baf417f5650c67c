/**
 * Issue 12: no lost data. Batch folder names never collide, --force never replaces a folder
 * twistline did not mark, a killed run leaves nothing behind, and stale temporary siblings of an
 * output are removed by the next run.
 */
import { spawn, spawnSync } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { folderNames } from "../../cli/batch.js";
import { run } from "./harness.js";
import { arcCsv, helixCsv, write } from "./wireFiles.js";

const repo = fileURLToPath(new URL("../../", import.meta.url));
const root = mkdtempSync(join(tmpdir(), "twistline-loss-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** An SVG of `paths` open polylines of 40 points each, calibrated at 1 nm per user unit (invented test data). */
function svgWires(paths: number): string {
  const d = (k: number): string => {
    const pts: string[] = [];
    for (let i = 0; i < 40; ++i) {
      const t = (Math.PI * i) / 39;
      pts.push(`${(60 + 50 * k + 40 * Math.cos(t)).toFixed(3)} ${(60 + 40 * Math.sin(t)).toFixed(3)}`);
    }
    return `M ${pts.join(" L ")}`;
  };
  const body = Array.from({ length: paths }, (_, k) => `<path id="w${k + 1}" d="${d(k)}"/>`).join("\n");
  return `<svg xmlns="http://www.w3.org/2000/svg" width="400nm" height="200nm" viewBox="0 0 400 200">\n${body}\n</svg>\n`;
}

describe("batch folder names are reserved before any folder is made", () => {
  it("a.csv, a.tsv, a-2.csv, a two-wire b.svg and b-w1.csv get distinct folders", () => {
    expect(folderNames(["a.csv", "a.tsv", "a-2.csv", "b.svg", "b-w1.csv"])).toEqual(["a", "a-2", "a-2-2", "b", "b-w1-2"]);
  });

  it("the batch's own summary.csv and marker are never a wire's folder; names differ without case", () => {
    expect(folderNames(["summary.csv.csv", ".twistline-owned.json.csv", "W.csv", "w.csv"])).toEqual(["summary.csv-2", "_twistline-owned.json", "W", "w-2"]);
  });

  it("a real batch of the collision set writes every wire (no wire lost to a clash)", async () => {
    const dir = join(root, "clash");
    mkdirSync(dir);
    write(join(dir, "a.csv"), arcCsv(41, 50));
    write(join(dir, "a.tsv"), arcCsv(42, 50).replace(/,/g, "\t"));
    write(join(dir, "a-2.csv"), arcCsv(43, 50));
    write(join(dir, "b.svg"), svgWires(2));
    write(join(dir, "b-w1.csv"), helixCsv(44, 60));
    const out = join(root, "clash-out");
    const r = await run(["batch", dir, "--out", out, "--jobs", "1", "--bootstrap", "0", "--quiet"]);
    expect(r).toEqual({ code: 0, stdout: "", stderr: "" });
    // inputs in name order: a-2.csv -> a-2, a.csv -> a, a.tsv -> a-3, b-w1.csv -> b-w1, b.svg -> b-2 (b-w1 is b's wire 1) -> b-2-w1, b-2-w2
    expect(readdirSync(out).sort()).toEqual([".twistline-owned.json", "a", "a-2", "a-3", "b-2-w1", "b-2-w2", "b-w1", "summary.csv"]);
    const rows = readFileSync(join(out, "summary.csv"), "utf8").split("\n").filter((l) => l !== "" && !l.startsWith("#"));
    expect(rows).toHaveLength(1 + 6);
  });
});

describe("--force replaces only folders twistline marked", () => {
  it("a folder holding the user's own model.json is refused, and the file is untouched", async () => {
    const out = join(root, "users");
    mkdirSync(out);
    writeFileSync(join(out, "model.json"), '{"mine": true}');
    const r = await run(["analyze", join(root, "w.csv"), "--out", out, "--force", "--quiet"]);
    expect(r).toEqual({
      code: 1, stdout: "",
      stderr: `twistline: analyze: --out: folder ${JSON.stringify(out)} has no .twistline-owned.json (twistline's mark on the folders it writes); refusing to replace it\n`,
    });
    expect(readFileSync(join(out, "model.json"), "utf8")).toBe('{"mine": true}');
  });
});

describe("temporary files", () => {
  write(join(root, "w.csv"), helixCsv(45, 120));

  it("a stale temporary sibling of the output, left by a dead process, is removed by the next run", async () => {
    const dead = spawnSync(process.execPath, ["-e", ""]).pid as number;
    const stale = join(root, `.p.csv.${dead}-00112233aabb.tmp`);
    writeFileSync(stale, "half a table");
    const r = await run(["profile", join(root, "w.csv"), "--out", join(root, "p.csv"), "--bootstrap", "0", "--quiet"]);
    expect(r.code).toBe(0);
    expect(existsSync(stale)).toBe(false);
    expect(existsSync(join(root, "p.csv"))).toBe(true);
  });

  it("SIGTERM in the middle of analyze removes the temporary folder and writes nothing", async () => {
    const dir = join(root, "killed");
    mkdirSync(dir);
    const big = write(join(dir, "big.csv"), helixCsv(46, 4000));
    const child = spawn(process.execPath, ["--import", "tsx", "cli/bin.ts", "analyze", big, "--out", join(dir, "out"), "--bootstrap", "400"], { cwd: repo, stdio: ["ignore", "ignore", "pipe"] });
    let stderr = "";
    child.stderr.on("data", (b: Buffer) => (stderr += b.toString()));
    const exited = new Promise<number | null>((resolve) => child.on("exit", (code) => resolve(code)));
    // wait until the run has made its temporary folder (it lives until the commit at the end)
    for (let i = 0; i < 3000 && !readdirSync(dir).some((f) => f.startsWith(".out.")); ++i) await new Promise((r) => setTimeout(r, 10));
    expect(readdirSync(dir).some((f) => f.startsWith(".out."))).toBe(true);
    child.kill("SIGTERM");
    expect(await exited).toBe(143);
    expect(stderr).toBe("twistline: stopped by SIGTERM; its temporary files were removed\n");
    expect(readdirSync(dir)).toEqual(["big.csv"]);
  }, 60_000);

  it("SIGTERM while profile is writing its CSV removes the half-written temporary file", async () => {
    const dir = join(root, "killed-write");
    mkdirSync(dir);
    const big = write(join(dir, "big.csv"), helixCsv(47, 150_000));
    const child = spawn(process.execPath, ["--import", "tsx", "cli/bin.ts", "profile", big, "--out", join(dir, "p.csv"), "--bootstrap", "0"], { cwd: repo, stdio: ["ignore", "ignore", "pipe"] });
    const exited = new Promise<number | null>((resolve) => child.on("exit", (code) => resolve(code)));
    let seen = false;
    // the temporary file exists only while the table is written, after the fit
    for (let i = 0; i < 12_000 && !seen && child.exitCode === null; ++i) {
      seen = readdirSync(dir).some((f) => f.startsWith(".p.csv.") && f.endsWith(".tmp"));
      if (!seen) await new Promise((r) => setTimeout(r, 5));
    }
    expect(seen).toBe(true);
    child.kill("SIGTERM");
    expect(await exited).toBe(143);
    expect(readdirSync(dir)).toEqual(["big.csv"]);
  }, 120_000);
});
