import { execFileSync } from "node:child_process";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";

const root = fileURLToPath(new URL("../../", import.meta.url));

describe("cli/bin.ts", () => {
  it("runs as a program: --help prints usage and exits 0", () => {
    const out = execFileSync(process.execPath, ["--import", "tsx", "cli/bin.ts", "--help"], { cwd: root, encoding: "utf8" });
    expect(out).toContain("Usage: twistline [options] [command]");
  });
});
