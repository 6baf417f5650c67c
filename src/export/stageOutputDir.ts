import { lstat, mkdir, readdir, readFile, rename, rm, stat, writeFile } from "node:fs/promises";
import { dirname, join, relative, resolve, sep } from "node:path";
import { ParameterError } from "../errors.js";
import { fsProblem } from "../import/fsProblem.js";
import { releaseSibling, removeStaleSiblings, tempSibling } from "./tempSibling.js";
import { TOOL_NAME } from "./version.js";

/** A folder being written: files go into `path` (a temporary sibling of the target) until `commit`. */
export interface StagedDir {
  /** The temporary folder to write into. */
  readonly path: string;
  /** The final folder. */
  readonly target: string;
  /** Writes the ownership marker and moves the finished folder into place (replacing the old one when allowed). */
  commit(): Promise<void>;
  /** Removes the temporary folder and everything in it. Safe to call twice. */
  abort(): Promise<void>;
}

/** Options of {@link stageOutputDir}. */
export interface StageOptions {
  /** Replace an existing non-empty folder (only one twistline wrote, as its marker file shows, and unchanged since). */
  readonly force: boolean;
  /** Input files: a target folder that contains one of them is never replaced. */
  readonly protect?: readonly string[];
  /** Command name for messages, e.g. "analyze". */
  readonly where: string;
  /** Option name for messages (default "--out"). */
  readonly option?: string;
}

/** The marker file twistline leaves in every output folder it writes: the list of files it wrote there. */
export const OWNER_MARKER = ".twistline-owned.json";

/** Every file under `dir` (relative paths with "/"), folders walked; symbolic links count as files. */
async function listFiles(dir: string): Promise<string[]> {
  const out: string[] = [];
  const walk = async (sub: string): Promise<void> => {
    for (const e of await readdir(join(dir, sub), { withFileTypes: true })) {
      const rel = sub === "" ? e.name : `${sub}/${e.name}`;
      if (e.isDirectory()) await walk(rel);
      else out.push(rel);
    }
  };
  await walk("");
  return out.sort();
}

/**
 * Why `dir` may not be replaced, or null when it may: it must carry twistline's marker, and hold
 * nothing but the files the marker lists (a file added since, or a folder the user made look alike
 * by name, is never deleted).
 */
async function notOwned(dir: string): Promise<string | null> {
  const text = await readFile(join(dir, OWNER_MARKER), "utf8").catch(() => null);
  if (text === null) return `has no ${OWNER_MARKER} (twistline's mark on the folders it writes)`;
  let listed: Set<string>;
  try {
    const doc = JSON.parse(text) as { tool?: unknown; files?: unknown };
    if (doc.tool !== TOOL_NAME || !Array.isArray(doc.files) || !doc.files.every((f) => typeof f === "string")) throw new Error("marker");
    listed = new Set(doc.files as string[]);
  } catch {
    return `has a ${OWNER_MARKER} that twistline did not write`;
  }
  // A subfolder twistline wrote on its own (it carries its own marker, e.g. the demo's afm-coil) is
  // owned when its own marker says so.
  const ownedSub = new Map<string, boolean>();
  for (const f of await listFiles(dir)) {
    if (f === OWNER_MARKER || listed.has(f)) continue;
    const top = f.split("/")[0];
    if (top !== f) {
      if (!ownedSub.has(top)) ownedSub.set(top, (await notOwned(join(dir, top))) === null);
      if (ownedSub.get(top)) continue;
    }
    return `holds ${JSON.stringify(f)}, which twistline did not write`;
  }
  return null;
}

function inside(child: string, parent: string): boolean {
  const r = relative(parent, child);
  return r !== "" && !r.startsWith("..") && !r.startsWith(sep) && r !== "..";
}

/**
 * Prepares an output folder that appears all at once or not at all: checks the target, removes
 * temporary siblings that killed runs left behind, creates a temporary sibling for the caller to
 * fill (named as in tempSibling.ts, and registered so a signal handler can remove it), and on
 * `commit` writes the marker file {@link OWNER_MARKER} (the list of files written) and renames the
 * folder into place. An existing non-empty target is refused unless `force`; with `force` it is
 * replaced only when it carries the marker and holds nothing the marker does not list, and no input
 * file, so nothing a user made is ever deleted. Missing parent folders are created.
 * @throws {ParameterError} target is a file; non-empty without force; not twistline's own or holds
 *   an input; a parent folder that cannot be made or written (with the file-system cause).
 */
export async function stageOutputDir(target: string, options: StageOptions): Promise<StagedDir> {
  const where = options.where, option = options.option ?? "--out";
  if (target === "") throw new ParameterError(where, option, "must not be empty");
  const abs = resolve(target);
  const fsFail = (what: string) => (e: unknown): never => {
    const problem = fsProblem(e);
    if (problem === null) throw e;
    throw new ParameterError(where, option, `${what}: ${problem}`);
  };
  const info = await lstat(abs).catch((e: unknown) => ((e as { code?: unknown }).code === "ENOENT" ? null : fsFail(`cannot use ${JSON.stringify(target)}`)(e)));
  if (info !== null) {
    if (info.isSymbolicLink()) throw new ParameterError(where, option, `${JSON.stringify(target)} is a symbolic link; give the folder itself`);
    if (!info.isDirectory()) throw new ParameterError(where, option, `${JSON.stringify(target)} exists and is not a folder`);
    const entries = await readdir(abs).catch(fsFail(`cannot read the folder ${JSON.stringify(target)}`));
    if (entries.length > 0) {
      if (!options.force) throw new ParameterError(where, option, `folder ${JSON.stringify(target)} exists and is not empty (add --force to replace it)`);
      for (const input of options.protect ?? []) {
        if (input !== "-" && inside(resolve(input), abs)) {
          throw new ParameterError(where, option, `folder ${JSON.stringify(target)} contains the input ${JSON.stringify(input)}; refusing to replace it`);
        }
      }
      const why = await notOwned(abs);
      if (why !== null) throw new ParameterError(where, option, `folder ${JSON.stringify(target)} ${why}; refusing to replace it`);
    }
  }
  const parent = dirname(abs);
  await mkdir(parent, { recursive: true }).catch(fsFail(`cannot create the folder ${JSON.stringify(dirname(target))}`));
  await removeStaleSiblings(abs);
  // not mkdtemp: its 0700 mode would stay on the finished folder; mkdir honours the umask
  const path = tempSibling(abs, "tmp");
  await mkdir(path).catch((e: unknown) => {
    releaseSibling(path);
    return fsFail(`cannot write in ${JSON.stringify(dirname(target))}`)(e);
  });
  let done = false;
  return {
    path,
    target: abs,
    async commit() {
      if (done) throw new Error("stageOutputDir: commit after commit or abort");
      done = true;
      try {
        const files = await listFiles(path);
        await writeFile(join(path, OWNER_MARKER), `${JSON.stringify({ tool: TOOL_NAME, note: "written by twistline: --force may replace this folder while it holds only these files", files }, null, 1)}\n`);
        const old = (await stat(abs).catch(() => null)) !== null ? tempSibling(abs, "old") : null;
        if (old !== null) await rename(abs, old);
        try {
          await rename(path, abs);
        } catch (e) {
          if (old !== null) await rename(old, abs).catch(() => undefined);
          throw e;
        } finally {
          releaseSibling(path);
        }
        if (old !== null) {
          await rm(old, { recursive: true, force: true }).catch(() => undefined);
          releaseSibling(old);
        }
      } catch (e) {
        await rm(path, { recursive: true, force: true }).catch(() => undefined);
        releaseSibling(path);
        fsFail(`cannot finish ${JSON.stringify(target)} (nothing was written)`)(e);
      }
    },
    async abort() {
      done = true;
      await rm(path, { recursive: true, force: true }).catch(() => undefined);
      releaseSibling(path);
    },
  };
}
