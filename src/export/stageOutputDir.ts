import { randomBytes } from "node:crypto";
import { mkdir, readdir, rename, rm, stat } from "node:fs/promises";
import { basename, dirname, join, relative, resolve, sep } from "node:path";
import { ParameterError } from "../errors.js";

/** A folder being written: files go into `path` (a temporary sibling of the target) until `commit`. */
export interface StagedDir {
  /** The temporary folder to write into. */
  readonly path: string;
  /** The final folder. */
  readonly target: string;
  /** Moves the finished folder into place (replacing the old one when allowed). */
  commit(): Promise<void>;
  /** Removes the temporary folder and everything in it. Safe to call twice. */
  abort(): Promise<void>;
}

/** Options of {@link stageOutputDir}. */
export interface StageOptions {
  /** Replace an existing non-empty folder (only one holding nothing but twistline's own outputs). */
  readonly force: boolean;
  /** Input files: a target folder that contains one of them is never replaced. */
  readonly protect?: readonly string[];
  /** Command name for messages, e.g. "analyze". */
  readonly where: string;
  /** Option name for messages (default "--out"). */
  readonly option?: string;
}

/** File names twistline writes into an output folder (and its per-wire subfolders). */
const OWN_FILE = /^(profile\.csv|model\.json|chain\.csv|report\.html|summary\.csv|wire\.(ply|stl|obj|glb)|centerline\.vtp|tube\.vtp|texture\.ovf|texture-binary8\.ovf|mask\.ovf)$/;

/** The first entry under `dir` that twistline did not write (depth 2: per-wire folders), or null. */
async function foreignEntry(dir: string, depth = 0): Promise<string | null> {
  for (const e of await readdir(dir, { withFileTypes: true })) {
    if (e.isFile() && OWN_FILE.test(e.name)) continue;
    if (e.isDirectory() && depth === 0) {
      const inner = await foreignEntry(join(dir, e.name), 1);
      if (inner === null) continue;
      return join(e.name, inner);
    }
    return e.name;
  }
  return null;
}

function inside(child: string, parent: string): boolean {
  const r = relative(parent, child);
  return r !== "" && !r.startsWith("..") && !r.startsWith(sep) && r !== ".." ;
}

/**
 * Prepares an output folder that appears all at once or not at all: checks the target, creates a
 * temporary sibling (`.<name>.<random>.tmp`) for the caller to fill, and on `commit` renames it
 * into place. An existing non-empty target is refused unless `force`; with `force` it is replaced
 * only when it holds nothing but twistline's own outputs and no input file, so nothing else is ever
 * deleted. Missing parent folders are created.
 * @throws {ParameterError} target is a file; non-empty without force; holds foreign files or an input.
 */
export async function stageOutputDir(target: string, options: StageOptions): Promise<StagedDir> {
  const where = options.where, option = options.option ?? "--out";
  if (target === "") throw new ParameterError(where, option, "must not be empty");
  const abs = resolve(target);
  const info = await stat(abs).catch(() => null);
  if (info !== null) {
    if (!info.isDirectory()) throw new ParameterError(where, option, `${JSON.stringify(target)} exists and is not a folder`);
    const entries = await readdir(abs);
    if (entries.length > 0) {
      if (!options.force) throw new ParameterError(where, option, `folder ${JSON.stringify(target)} exists and is not empty (add --force to replace it)`);
      for (const input of options.protect ?? []) {
        if (input !== "-" && inside(resolve(input), abs)) {
          throw new ParameterError(where, option, `folder ${JSON.stringify(target)} contains the input ${JSON.stringify(input)}; refusing to replace it`);
        }
      }
      const foreign = await foreignEntry(abs);
      if (foreign !== null) {
        throw new ParameterError(where, option, `folder ${JSON.stringify(target)} holds ${JSON.stringify(foreign)}, which twistline did not write; refusing to replace it`);
      }
    }
  }
  const parent = dirname(abs);
  try {
    await mkdir(parent, { recursive: true });
  } catch (e) {
    throw new ParameterError(where, option, `cannot create the folder ${JSON.stringify(dirname(target))}: ${(e as Error).message}`);
  }
  // not mkdtemp: its 0700 mode would stay on the finished folder; mkdir honours the umask
  const path = join(parent, `.${basename(abs)}.${randomBytes(6).toString("hex")}.tmp`);
  await mkdir(path).catch((e: unknown) => {
    throw new ParameterError(where, option, `cannot write in ${JSON.stringify(dirname(target))}: ${(e as Error).message}`);
  });
  let done = false;
  return {
    path,
    target: abs,
    async commit() {
      if (done) throw new Error("stageOutputDir: commit after commit or abort");
      done = true;
      const old = (await stat(abs).catch(() => null)) !== null ? join(parent, `.${basename(abs)}.${randomBytes(6).toString("hex")}.old`) : null;
      if (old !== null) await rename(abs, old);
      try {
        await rename(path, abs);
      } catch (e) {
        if (old !== null) await rename(old, abs).catch(() => undefined);
        await rm(path, { recursive: true, force: true });
        throw e;
      }
      if (old !== null) await rm(old, { recursive: true, force: true });
    },
    async abort() {
      done = true;
      await rm(path, { recursive: true, force: true });
    },
  };
}
