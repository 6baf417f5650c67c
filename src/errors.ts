/**
 * Error classes shared by every stage (no logic beyond message formatting).
 *
 * The CLI maps `InputError` and `ParameterError` to one line on stderr and exit code 1;
 * anything else is a bug and exits with code 2.
 */

/** Bad input data; the message reads like a compiler diagnostic: "file:line: field: problem". */
export class InputError extends Error {
  override name = "InputError";
  constructor(
    readonly file: string,
    readonly line: number | null,
    readonly field: string,
    readonly problem: string,
  ) {
    super(`${file}${line === null ? "" : `:${line}`}: ${field}: ${problem}`);
  }
}

/** A bad option value; the message names the function (or command) and option and shows the value. */
export class ParameterError extends Error {
  override name = "ParameterError";
  constructor(
    readonly where: string,
    readonly option: string,
    problem: string,
  ) {
    super(`${where}: ${option}: ${problem}`);
  }
}
