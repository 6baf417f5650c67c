#!/usr/bin/env node
/** Executable entry point: the only file that touches `process`. */
import { readStreamBytes, STDIN_NAME } from "../src/import/readInputBytes.js";
import { removeLiveSiblingsSync } from "../src/export/tempSibling.js";
import { main } from "./main.js";

/** All of standard input, stopped with a one-line error past the input byte cap. */
async function readStdin(): Promise<Uint8Array> {
  return readStreamBytes(process.stdin, STDIN_NAME);
}

// Ctrl-C or a kill: remove every temporary file and folder of this run, then exit as the signal asks
for (const [signal, code] of [["SIGINT", 130], ["SIGTERM", 143], ["SIGHUP", 129]] as const) {
  process.on(signal, () => {
    removeLiveSiblingsSync();
    process.stderr.write(`twistline: stopped by ${signal}; its temporary files were removed\n`);
    process.exit(code);
  });
}

// A closed pipe (`twistline profile w.csv --out - | head`) is not an error.
process.stdout.on("error", (e: NodeJS.ErrnoException) => {
  if (e.code === "EPIPE") process.exit(process.exitCode ?? 0);
  throw e;
});

process.exitCode = await main(process.argv.slice(2), {
  stdout: (s) => void process.stdout.write(s),
  stderr: (s) => void process.stderr.write(s),
  readStdin,
  stderrIsTTY: process.stderr.isTTY === true,
  ...(process.env.CI !== undefined ? { ci: process.env.CI } : {}),
});
