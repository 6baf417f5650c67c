import { stat } from "node:fs/promises";
import { resolve } from "node:path";

/**
 * True when two paths name the same file: equal once resolved, or (both existing) the same device
 * and inode, which also catches symbolic and hard links. Never throws for missing files.
 */
export async function sameFile(a: string, b: string): Promise<boolean> {
  if (resolve(a) === resolve(b)) return true;
  try {
    const [sa, sb] = await Promise.all([stat(a), stat(b)]);
    return sa.dev === sb.dev && sa.ino === sb.ino;
  } catch {
    return false;
  }
}
