/** The CLI: `main(argv, io)` parses, runs one command, and returns the exit code. No globals. */
import { Command, CommanderError } from "@commander-js/extra-typings";
import { InputError, ParameterError } from "../src/errors.js";
import { fsProblem } from "../src/import/fsProblem.js";
import { TOOL_NAME, TOOL_VERSION } from "../src/export/version.js";
import { addAnalyzeCommand } from "./analyze.js";
import { addBatchCommand } from "./batch.js";
import { addCenterlineCommand } from "./centerline.js";
import { addDemoCommand } from "./demo.js";
import type { Io } from "./io.js";
import { messageLine } from "./options.js";
import { addProfileCommand } from "./profile.js";

export type { Io } from "./io.js";

/** Exit code: success. */
export const EXIT_OK = 0;
/** Exit code: bad input data or a bad option value (InputError, ParameterError). */
export const EXIT_BAD_INPUT = 1;
/** Exit code: bad usage (unknown command or option, missing argument) or an internal error. */
export const EXIT_USAGE_OR_BUG = 2;

const HELP_WIDTH = 80;

/** The commands, one per file; a new command is one more entry. */
const COMMANDS: readonly ((program: Command, io: Io) => void)[] = [
  addProfileCommand,
  addCenterlineCommand,
  addAnalyzeCommand,
  addBatchCommand,
  addDemoCommand,
];

function buildProgram(io: Io): Command {
  const program = new Command(TOOL_NAME)
    .description("curvature and torsion of traced magnetic nanowires, with 95% bootstrap bands (model estimates, not measurements)")
    .version(TOOL_VERSION, "-V, --version", "print the version")
    .helpOption("-h, --help", "show help")
    .exitOverride()
    .configureOutput({
      writeOut: (s) => io.stdout(s),
      writeErr: (s) => io.stderr(s),
      outputError: (s, write) => write(`${TOOL_NAME}: ${s.replace(/^error: /, "")}`),
      getOutHelpWidth: () => HELP_WIDTH,
      getErrHelpWidth: () => HELP_WIDTH,
    })
    .addHelpText(
      "after",
      "\nExit codes: 0 success, 1 bad input data or option value, 2 bad usage or internal error.\n" +
        "Results are model estimates from a fit of the traced centre line, not measurements.",
    )
    .showHelpAfterError("(add --help for usage)");
  for (const add of COMMANDS) add(program, io);
  return program;
}

/**
 * Runs the CLI on `argv` (the arguments after the program name).
 * Exit codes: 0 success; 1 bad input or option value (one line "twistline: <message>" on stderr);
 * 2 bad usage (unknown command or option, missing argument) and unexpected errors (with a stack).
 */
export async function main(argv: readonly string[], io: Io): Promise<number> {
  try {
    await buildProgram(io).parseAsync([...argv], { from: "user" });
    return EXIT_OK;
  } catch (e) {
    if (e instanceof CommanderError) return e.exitCode === 0 ? EXIT_OK : EXIT_USAGE_OR_BUG;
    if (e instanceof InputError || e instanceof ParameterError) {
      io.stderr(`${TOOL_NAME}: ${messageLine(e.message)}\n`);
      return EXIT_BAD_INPUT;
    }
    // a file-system fault that no stage caught on its way: still the user's disk, not a bug
    const problem = fsProblem(e);
    const path = (e as { path?: unknown } | null)?.path;
    if (problem !== null && typeof path === "string") {
      io.stderr(`${TOOL_NAME}: ${messageLine(`${JSON.stringify(path)}: ${problem}`)}\n`);
      return EXIT_BAD_INPUT;
    }
    const detail = e instanceof Error ? (e.stack ?? `${e.name}: ${e.message}`) : String(e);
    io.stderr(`${TOOL_NAME}: internal error (a bug; please report it with the command line):\n${detail}\n`);
    return EXIT_USAGE_OR_BUG;
  }
}
