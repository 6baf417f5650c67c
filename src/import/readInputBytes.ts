import { open } from "node:fs/promises";
import { InputError } from "../errors.js";
import { fsProblem } from "./fsProblem.js";

/**
 * Most bytes read from one input: 500 MiB. Text longer than this could not become one string
 * (V8's limit is 2^29 - 24 characters), and a wire file this size (some 1e7 points) is far past
 * what the fit is meant for; a device or pipe that never ends (/dev/zero) stops here.
 */
export const MAX_INPUT_BYTES = 500 * 1024 * 1024;

/** The name used in messages for standard input. */
export const STDIN_NAME = "<stdin>";

const CHUNK = 1 << 20;

function mib(bytes: number): string {
  return `${Math.round(bytes / (1024 * 1024))} MiB`;
}

/** The message of an input that goes past `limit` bytes. */
export function tooLargeProblem(limit: number, size?: number): string {
  return size !== undefined
    ? `${mib(size)} is more than the ${mib(limit)} an input may hold`
    : `more than ${mib(limit)} arrived (an endless device or pipe?); stopped reading`;
}

/**
 * Reads a whole input file, never more than `limit` bytes: a regular file larger than the limit is
 * refused before a byte is read; anything else (a device, a FIFO, /proc) is read in 1 MiB chunks
 * and stopped as soon as it passes the limit. File-system faults (missing file, link loop, name too
 * long, a directory, no permission) become one InputError naming the file.
 *
 * Cost: one pass over the bytes, one copy at the end for non-regular files.
 * @throws {InputError} "file: file: <problem>" for every refusal above.
 * @example (await readInputBytes("wire.csv")).byteLength // the file's size
 */
export async function readInputBytes(path: string, limit = MAX_INPUT_BYTES): Promise<Uint8Array> {
  const fail = (e: unknown): never => {
    const problem = fsProblem(e);
    if (problem === null) throw e;
    throw new InputError(path, null, "file", problem);
  };
  const handle = await open(path, "r").catch(fail);
  try {
    const info = await handle.stat().catch(fail);
    if (info.isDirectory()) throw new InputError(path, null, "file", "is a directory, not a file");
    if (info.isFile()) {
      if (info.size > limit) throw new InputError(path, null, "file", tooLargeProblem(limit, info.size));
      // the size may change while we read: read to the end, but never past the limit
      const buffer = Buffer.allocUnsafe(Math.max(info.size, 1));
      let filled = 0;
      for (;;) {
        if (filled === buffer.length) break;
        const { bytesRead } = await handle.read(buffer, filled, buffer.length - filled, null).catch(fail);
        if (bytesRead === 0) return buffer.subarray(0, filled);
        filled += bytesRead;
      }
      const rest = await readChunks(handle, limit - filled, limit, path, fail);
      return rest.byteLength === 0 ? buffer.subarray(0, filled) : Buffer.concat([buffer.subarray(0, filled), rest]);
    }
    return await readChunks(handle, limit, limit, path, fail);
  } finally {
    await handle.close().catch(() => undefined);
  }
}

async function readChunks(
  handle: { read(b: Buffer, o: number, l: number, p: null): Promise<{ bytesRead: number }> },
  remaining: number,
  limit: number,
  path: string,
  fail: (e: unknown) => never,
): Promise<Buffer> {
  const chunks: Buffer[] = [];
  let total = 0;
  for (;;) {
    const chunk = Buffer.allocUnsafe(CHUNK);
    const { bytesRead } = await handle.read(chunk, 0, CHUNK, null).catch(fail);
    if (bytesRead === 0) break;
    total += bytesRead;
    if (total > remaining) throw new InputError(path, null, "file", tooLargeProblem(limit));
    chunks.push(bytesRead === CHUNK ? chunk : chunk.subarray(0, bytesRead));
  }
  return Buffer.concat(chunks, total);
}

/**
 * Collects a readable stream (standard input) into bytes, stopping with an InputError naming
 * `name` as soon as more than `limit` bytes arrived.
 */
export async function readStreamBytes(stream: AsyncIterable<unknown>, name: string, limit = MAX_INPUT_BYTES): Promise<Uint8Array> {
  const chunks: Buffer[] = [];
  let total = 0;
  for await (const chunk of stream) {
    const b = typeof chunk === "string" ? Buffer.from(chunk) : Buffer.from(chunk as Uint8Array);
    total += b.byteLength;
    if (total > limit) throw new InputError(name, null, "file", tooLargeProblem(limit));
    chunks.push(b);
  }
  return Buffer.concat(chunks, total);
}
