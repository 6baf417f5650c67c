/** In-process CLI runs: `run(argv)` calls main with a captured Io; scratch folders for their files. */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll } from "vitest";
import { main, type Io } from "../../cli/main.js";

/**
 * A maker of fresh folders under one temporary root (removed after the suite): each call makes a
 * new folder holding `name` with `data` and returns both paths.
 */
export function scratchFolders(prefix: string): (name: string, data: string | Uint8Array) => { dir: string; input: string } {
  const root = mkdtempSync(join(tmpdir(), `twistline-${prefix}-`));
  afterAll(() => rmSync(root, { recursive: true, force: true }));
  let k = 0;
  return (name, data) => {
    const dir = join(root, `case${k++}`);
    mkdirSync(dir);
    const input = join(dir, name);
    writeFileSync(input, data);
    return { dir, input };
  };
}

export interface Run {
  code: number;
  stdout: string;
  stderr: string;
}

export async function run(argv: readonly string[], extra: Partial<Io> = {}): Promise<Run> {
  let stdout = "", stderr = "";
  const io: Io = {
    stdout: (s) => {
      stdout += s;
    },
    stderr: (s) => {
      stderr += s;
    },
    ...extra,
  };
  const code = await main(argv, io);
  return { code, stdout, stderr };
}

/** Standard input holding `text`. */
export const stdinOf = (text: string) => async (): Promise<Uint8Array> => new TextEncoder().encode(text);
