import { randomBytes } from "node:crypto";
import { open, rename, unlink } from "node:fs/promises";
import { basename, dirname, join, resolve } from "node:path";
import { ParameterError } from "../errors.js";
import { sameFile } from "./sameFile.js";

/** Options of {@link writeFileAtomic}. */
export interface WriteFileAtomicOptions {
  /** Paths that must never be overwritten (the inputs): writing to one of them throws. */
  readonly protect?: readonly string[];
}

/**
 * Writes `data` to `path` all at once or not at all: into a new temporary file in the same folder
 * (`.name.<random>.tmp`, created exclusively), flushed to disk, then renamed over `path`, so a reader
 * never sees a half-written file and a failure leaves any old file untouched. The temporary file is
 * removed when anything fails.
 *
 * Cost: one write and one fsync of `data`.
 * @throws {ParameterError} when `path` is one of `options.protect` (same resolved path or same file).
 *   File-system errors (missing folder, permissions, `path` is a directory) are rethrown as they are,
 *   with their `code`.
 */
export async function writeFileAtomic(path: string, data: string | Uint8Array, options: WriteFileAtomicOptions = {}): Promise<void> {
  for (const input of options.protect ?? []) {
    if (await sameFile(path, input)) {
      throw new ParameterError("writeFileAtomic", "path", `${JSON.stringify(path)} is an input file; refusing to overwrite it`);
    }
  }
  const target = resolve(path);
  const temp = join(dirname(target), `.${basename(target)}.${randomBytes(6).toString("hex")}.tmp`);
  const handle = await open(temp, "wx", 0o666);
  try {
    try {
      await handle.writeFile(data);
      await handle.sync();
    } finally {
      await handle.close();
    }
    await rename(temp, target);
  } catch (e) {
    await unlink(temp).catch(() => undefined);
    throw e;
  }
}
