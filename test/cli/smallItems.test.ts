/** Issue 12, the small items: --step past the wire, reading back the tool's own tables, progress, messages. */
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { statusLine } from "../../cli/analyze.js";
import { run } from "./harness.js";
import { arcCsv, helixCsv, TEST_MATERIAL, write } from "./wireFiles.js";

const root = mkdtempSync(join(tmpdir(), "twistline-small-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));
const arc = write(join(root, "arc.csv"), arcCsv(71, 80)); // radius 60 nm over 180 degrees: length about 188 nm
const material = write(join(root, "m.json"), TEST_MATERIAL);

describe("--step longer than the wire", () => {
  it("profile refuses it, naming --step, the samples it gives (the start, every step, the end) and the longest step that works", async () => {
    const r = await run(["profile", arc, "--step", "1um", "--out", join(root, "s.csv"), "--bootstrap", "0"]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^twistline: profile: --step: 1000 nm gives 2 samples along a wire 18\d(\.\d+)? nm long; use at most 3\d(\.\d+)? nm \(6 samples or more\)\n$/);
  });

  it("analyze refuses it too, and writes nothing", async () => {
    const r = await run(["analyze", arc, "--step", "100nm", "--out", join(root, "step-out"), "--bootstrap", "0"]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^twistline: analyze: --step: 100 nm gives 3 samples along a wire/);
  });
});

describe("checks inside the fit name the option the user typed", () => {
  it("a --step far too fine: profile: --step, not the fit's own parameter name", async () => {
    const r = await run(["profile", arc, "--step", "1e-30nm", "--out", join(root, "fine.csv"), "--bootstrap", "0"]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^twistline: profile: --step: gives [\d.e+]+ samples; use a larger step\n$/);
  });

  it("a --spacing far too fine: analyze: --spacing, not resampleWire", async () => {
    const r = await run(["analyze", arc, "--spacing", "1e-30nm", "--out", join(root, "fine-out"), "--bootstrap", "0"]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^twistline: analyze: --spacing: gives [\d.e+]+ sites \(more than 2000000\); use a larger spacing\n$/);
  });
});

describe("reading back the tool's own outputs", () => {
  it("profile reads the profile.csv and chain.csv that analyze wrote (their # header lines are no error)", async () => {
    const out = join(root, "own");
    expect((await run(["analyze", write(join(root, "helix.csv"), helixCsv(72, 120)), "--material", material, "--out", out, "--bootstrap", "0", "--quiet"])).code).toBe(0);
    for (const name of ["profile.csv", "chain.csv"]) {
      const rows = readFileSync(join(out, name), "utf8").split("\n").filter((l) => l !== "" && !l.startsWith("#")).length - 1;
      const r = await run(["profile", join(out, name), "--out", join(root, `again-${name}`), "--bootstrap", "0"]);
      expect(r.code, r.stderr).toBe(0);
      expect(r.stderr).toContain(`: ${rows} points, length `);
      expect(readFileSync(join(root, `again-${name}`), "utf8")).toContain("# source: ");
    }
  });
});

describe("progress of analyze on a terminal", () => {
  it("redraws one status line per stage on a terminal, erases it, then prints the summary", async () => {
    const r = await run(["analyze", arc, "--out", join(root, "tty"), "--bootstrap", "0"], { stderrIsTTY: true });
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/^\rtwistline: analyze: reading .*arc\.csv \(\d+\.\d s\)\x1b\[K\rtwistline: analyze: fitting 80 points, then stretches \(\d+\.\d s\)\x1b\[K/);
    expect(r.stderr).toContain("\rtwistline: analyze: writing the files (");
    expect(r.stderr).toMatch(/\r\x1b\[Ktwistline: .*arc\.csv: length /);
  });

  it("prints nothing when stderr is not a terminal", () => {
    let text = "";
    const s = statusLine(false, { stdout: () => undefined, stderr: (t) => void (text += t) });
    s.stage("fitting");
    s.end();
    expect(text).toBe("");
  });
});

describe("messages", () => {
  it("an uncalibrated SVG names --pixel-size", async () => {
    const svg = write(join(root, "plain.svg"), '<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 100 100"><path d="M0 0 L 10 10 L 20 5 L 30 20 L 40 30 L 50 20"/></svg>');
    const r = await run(["profile", svg, "--out", join(root, "svg.csv")]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain("no pixel calibration: give --pixel-size, the size of one user unit (e.g. --pixel-size 2.5nm;");
  });

  it("a fit that fails on the data is exit 1 with its one line, in analyze as in profile", async () => {
    const few = write(join(root, "few.csv"), "# unit: nm\nx,y,z\n0,0,0\n1,1,0\n2,1,1\n3,2,1\n");
    for (const cmd of [["profile", few, "--out", join(root, "few-p.csv")], ["analyze", few, "--out", join(root, "few-out")]]) {
      const r = await run(cmd);
      expect(r).toEqual({ code: 1, stdout: "", stderr: `twistline: ${few}: points: need at least 6 points for a quintic fit, got 4\n` });
    }
  });
});
