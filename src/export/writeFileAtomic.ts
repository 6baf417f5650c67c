import { open, rename, unlink } from "node:fs/promises";
import { resolve } from "node:path";
import { ParameterError } from "../errors.js";
import { sameFile } from "./sameFile.js";
import { releaseSibling, removeStaleSiblings, tempSibling } from "./tempSibling.js";

/** Options of {@link writeFileAtomic}. */
export interface WriteFileAtomicOptions {
  /** Paths that must never be overwritten (the inputs): writing to one of them throws. */
  readonly protect?: readonly string[];
}

/** What can be written: all at once, or as a sequence of chunks (a streaming writer's output). */
export type FileData = string | Uint8Array | Iterable<string | Uint8Array> | AsyncIterable<string | Uint8Array>;

/**
 * Writes `data` to `path` all at once or not at all: into a new temporary file in the same folder
 * (see tempSibling.ts for its name, created exclusively), flushed to disk, then renamed over `path`,
 * so a reader never sees a half-written file and a failure leaves any old file untouched. The
 * temporary file is removed when anything fails, and temporary siblings of `path` left behind by
 * killed runs are removed first. `data` may be a sequence of chunks, written one at a time, so a
 * large table never has to be one string.
 *
 * Cost: one write and one fsync of `data`.
 * @throws {ParameterError} when `path` is one of `options.protect` (same resolved path or same file).
 *   File-system errors (missing folder, permissions, `path` is a directory, a full disk) are rethrown
 *   as they are, with their `code` (see src/import/fsProblem.ts for their words).
 */
export async function writeFileAtomic(path: string, data: FileData, options: WriteFileAtomicOptions = {}): Promise<void> {
  for (const input of options.protect ?? []) {
    if (await sameFile(path, input)) {
      throw new ParameterError("writeFileAtomic", "path", `${JSON.stringify(path)} is an input file; refusing to overwrite it`);
    }
  }
  const target = resolve(path);
  await removeStaleSiblings(target);
  const temp = tempSibling(target, "tmp");
  try {
    const handle = await open(temp, "wx", 0o666);
    try {
      if (typeof data === "string" || data instanceof Uint8Array) {
        await handle.writeFile(data);
      } else {
        for await (const chunk of data) {
          if (typeof chunk === "string") await handle.write(chunk);
          else await handle.write(chunk);
        }
      }
      await handle.sync();
    } finally {
      await handle.close();
    }
    await rename(temp, target);
  } catch (e) {
    await unlink(temp).catch(() => undefined);
    throw e;
  } finally {
    releaseSibling(temp);
  }
}
