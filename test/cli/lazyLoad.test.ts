/**
 * Issue 12: start-up. `--help` and `profile` on a CSV file must not load three.js, ajv or the report
 * bundle (they cost about half a second before anything happens). A resolve hook lists every module
 * a real run of the program loads.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { helixCsv, write } from "./wireFiles.js";

const repo = fileURLToPath(new URL("../../", import.meta.url));
const root = mkdtempSync(join(tmpdir(), "twistline-lazy-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));
const hook = join(root, "hook.mjs");
writeFileSync(
  hook,
  `import { register } from "node:module";
register("data:text/javascript," + encodeURIComponent(\`export async function resolve(s, c, n) { const r = await n(s, c); process.stderr.write("LOADED " + r.url + "\\\\n"); return r; }\`));
`,
);

function loaded(args: string[]): string[] {
  const r = spawnSync(process.execPath, ["--import", "tsx", "--import", hook, "cli/bin.ts", ...args], { cwd: repo, encoding: "utf8" });
  expect(r.status).toBe(0);
  return r.stderr.split("\n").filter((l) => l.startsWith("LOADED ")).map((l) => l.slice(7));
}

const heavy = (urls: string[]): string[] => urls.filter((u) => /node_modules\/(three|ajv)\/|viewerBundle|src\/report\/|src\/physics\//.test(u));

describe("lazy loading", () => {
  it("--help loads no three.js, ajv, physics or report code", () => {
    const urls = loaded(["--help"]);
    expect(urls.some((u) => u.includes("cli/main.ts"))).toBe(true); // the hook sees the program's own modules
    expect(heavy(urls)).toEqual([]);
  });

  it("profile on a CSV file loads no three.js, ajv, physics or report code", () => {
    const wire = write(join(root, "w.csv"), helixCsv(61, 80));
    const urls = loaded(["profile", wire, "--out", join(root, "p.csv"), "--bootstrap", "0", "--quiet"]);
    expect(urls.some((u) => u.includes("src/frame/"))).toBe(true);
    expect(heavy(urls)).toEqual([]);
  });
});
