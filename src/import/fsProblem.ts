/**
 * The one table that turns a file-system error into the few words a user reads: every command and
 * stage that reads or writes a file asks here, so the same fault always reads the same way.
 */

/** Error codes of Node's `fs` (POSIX errno names, plus Node's own ERR_FS_*), in plain words. */
const PROBLEMS: Readonly<Record<string, string>> = {
  ENOENT: "no such file",
  ENOTDIR: "a folder on the path is not a directory",
  EISDIR: "is a directory, not a file",
  EACCES: "permission denied",
  EPERM: "permission denied",
  EROFS: "read-only file system",
  ENOSPC: "no space left on the device",
  EDQUOT: "disk quota exceeded",
  EFBIG: "file too large for the file system",
  ELOOP: "too many levels of symbolic links (a link loop?)",
  ENAMETOOLONG: "name too long for the file system",
  EMFILE: "too many open files",
  ENFILE: "too many open files in the system",
  EIO: "input/output error of the device",
  EBUSY: "resource busy",
  ETXTBSY: "file busy",
  EEXIST: "already exists",
  ENOTEMPTY: "folder not empty",
  EXDEV: "cannot move across file systems",
  ENXIO: "no such device",
  ENODEV: "no such device",
  EAGAIN: "resource temporarily unavailable",
  ERR_FS_FILE_TOO_LARGE: "larger than 2 GiB, more than can be read at once",
};

/** The error code of a Node error (`e.code`), or null. */
export function errorCode(e: unknown): string | null {
  const code = typeof e === "object" && e !== null ? (e as { code?: unknown }).code : undefined;
  return typeof code === "string" ? code : null;
}

/**
 * The plain-words problem of a file-system error ("no space left on the device"), or null when
 * `e` is not one this table knows (then it is not the user's doing, and the caller lets it pass).
 * @example fsProblem(Object.assign(new Error("x"), { code: "ELOOP" })) // "too many levels of symbolic links (a link loop?)"
 */
export function fsProblem(e: unknown): string | null {
  const code = errorCode(e);
  return code !== null && Object.hasOwn(PROBLEMS, code) ? PROBLEMS[code] : null;
}
