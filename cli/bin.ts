#!/usr/bin/env node
/** Executable entry point: the only file that touches `process`. */
import { main } from "./main.js";

async function readStdin(): Promise<Uint8Array> {
  const chunks: Buffer[] = [];
  for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
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
