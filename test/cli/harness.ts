/** In-process CLI runs: `run(argv)` calls main with a captured Io. */
import { main, type Io } from "../../cli/main.js";

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
