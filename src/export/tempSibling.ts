/**
 * Temporary siblings of an output (a file or folder written next to its target, then renamed over
 * it): their names, a register of the ones alive in this process (so a signal handler can remove
 * them), and the removal of ones left behind by a process that was killed.
 *
 * Name: `.<target name>.<pid>-<12 hex>.<kind>`, with the target name cut (at a character boundary)
 * so the whole name stays within the 255 bytes most file systems allow for one name: a legal target
 * name always has a legal temporary sibling. The pid tells a sibling whose writer is gone.
 */
import { randomBytes } from "node:crypto";
import { rmSync } from "node:fs";
import { readdir, rm, stat } from "node:fs/promises";
import { basename, dirname, join } from "node:path";

/** Bytes one file name may take on common file systems (ext4, xfs, btrfs, APFS, NTFS in UTF-16 units). */
export const NAME_MAX_BYTES = 255;

/** What a sibling is for: a file or folder being written, or an old folder being replaced. */
export type SiblingKind = "tmp" | "old";

const live = new Set<string>();

/** Age after which a sibling named without a pid (older versions) counts as left behind. */
const LEGACY_AGE_MS = 3600_000;

/** The target's name cut to at most `maxBytes` UTF-8 bytes, never inside a character. */
function cutName(name: string, maxBytes: number): string {
  if (Buffer.byteLength(name) <= maxBytes) return name;
  let out = "";
  let bytes = 0;
  for (const ch of name) {
    const b = Buffer.byteLength(ch);
    if (bytes + b > maxBytes) break;
    out += ch;
    bytes += b;
  }
  return out;
}

/** The fixed part of the sibling names of `target` (the dot and the cut name). */
function stem(target: string): string {
  // room for ".<pid up to 10 digits>-<12 hex>.tmp" and the leading dot: 1 + 1 + 10 + 1 + 12 + 4
  return `.${cutName(basename(target), NAME_MAX_BYTES - 29)}`;
}

/**
 * A fresh sibling path for `target` (absolute or relative; the sibling is in the same folder),
 * registered as alive until {@link releaseSibling}.
 * @example tempSibling("/data/out/profile.csv", "tmp") // "/data/out/.profile.csv.4242-1f2e3d4c5b6a.tmp"
 */
export function tempSibling(target: string, kind: SiblingKind, pid: number = process.pid): string {
  const path = join(dirname(target), `${stem(target)}.${pid}-${randomBytes(6).toString("hex")}.${kind}`);
  live.add(path);
  return path;
}

/** Marks a sibling as gone (renamed into place or removed). */
export function releaseSibling(path: string): void {
  live.delete(path);
}

/** The siblings this process still has on disk, for tests. */
export function liveSiblings(): string[] {
  return [...live];
}

/**
 * Removes, synchronously, every sibling this process still has (files and folders). For a signal
 * handler that is about to exit: nothing half-written is left behind. Never throws.
 */
export function removeLiveSiblingsSync(): void {
  for (const path of live) {
    try {
      rmSync(path, { recursive: true, force: true, maxRetries: 3 });
    } catch {
      // best effort: the process is exiting
    }
  }
  live.clear();
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    // EPERM: the process exists but belongs to someone else
    return (e as { code?: unknown }).code === "EPERM";
  }
}

/**
 * Removes the siblings of `target` that a process no longer running left behind (a run killed
 * with SIGKILL, or a power cut). Siblings of living processes (a concurrent run) are kept; the
 * pid-less names of older versions (`.<name>.<12 hex>.tmp`) are removed when an hour old.
 * Returns the names removed. Never throws: a sibling that cannot be removed stays.
 */
export async function removeStaleSiblings(target: string): Promise<string[]> {
  const folder = dirname(target);
  const prefix = `${stem(target)}.`;
  const names = await readdir(folder).catch(() => [] as string[]);
  const removed: string[] = [];
  for (const name of names) {
    if (!name.startsWith(prefix)) continue;
    const rest = name.slice(prefix.length);
    const m = /^(\d{1,10})-[0-9a-f]{12}\.(?:tmp|old)$/.exec(rest);
    if (m !== null) {
      const pid = Number(m[1]);
      if (pid === process.pid || alive(pid)) continue;
    } else {
      // the names of twistline 0.1.0 carried no pid: removed once they are an hour old
      if (!/^[0-9a-f]{12}\.(?:tmp|old)$/.test(rest)) continue;
      const info = await stat(join(folder, name)).catch(() => null);
      if (info === null || Date.now() - info.mtimeMs < LEGACY_AGE_MS) continue;
    }
    try {
      await rm(join(folder, name), { recursive: true, force: true });
      removed.push(name);
    } catch {
      // left for a later run
    }
  }
  return removed;
}
