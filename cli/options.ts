/** Validators for option values: text in, checked value out, ParameterError("<command>: --option: ...") otherwise. */
import { ParameterError } from "../src/errors.js";
import { badUnitProblem, parseUnitName } from "../src/import/unitName.js";
import { INPUT_UNITS, LENGTH_UNITS, PER_METRE, type InputUnit, type LengthUnit } from "../src/types.js";

const LENGTH = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(\S+)\s*$/;

/**
 * A positive length with its unit, "2.5nm", "0.1 um", "3A", "1e-9m", in metres
 * (value / PER_METRE[unit]); pixels are refused (a length in px has no meaning before calibration).
 */
export function parseLengthOption(where: string, option: string, text: string): number {
  const m = LENGTH.exec(text);
  const problem = `must be a positive length with a unit (m, um, nm, A), e.g. 2.5nm (got ${JSON.stringify(text)})`;
  if (!m) throw new ParameterError(where, option, problem);
  const unit = parseUnitName(m[2]);
  if (unit === null || unit === "px") throw new ParameterError(where, option, problem);
  const value = Number(m[1]);
  if (!(Number.isFinite(value) && value > 0)) throw new ParameterError(where, option, problem);
  return value / PER_METRE[unit];
}

/** An integer >= 0 written in decimal digits. */
export function parseCountOption(where: string, option: string, text: string): number {
  const value = /^\s*\d+\s*$/.test(text) ? Number(text) : NaN;
  if (!Number.isSafeInteger(value)) throw new ParameterError(where, option, `must be an integer >= 0 (got ${JSON.stringify(text)})`);
  return value;
}

/** A seed: an integer from 0 to 2^32 - 1. */
export function parseSeedOption(where: string, option: string, text: string): number {
  const value = /^\s*\d+\s*$/.test(text) ? Number(text) : NaN;
  if (!(Number.isSafeInteger(value) && value <= 0xffffffff)) {
    throw new ParameterError(where, option, `must be an integer from 0 to 4294967295 (got ${JSON.stringify(text)})`);
  }
  return value;
}

/** An input unit: nm, um, m, A, px (also µm, Å, angstrom, pixel). */
export function parseInputUnitOption(where: string, option: string, text: string): InputUnit {
  const unit = parseUnitName(text);
  if (unit === null) throw new ParameterError(where, option, badUnitProblem(text, INPUT_UNITS));
  return unit;
}

/** A length unit: nm, um, m, A (also µm, Å, angstrom). */
export function parseLengthUnitOption(where: string, option: string, text: string): LengthUnit {
  const unit = parseUnitName(text);
  if (unit === null || unit === "px") throw new ParameterError(where, option, badUnitProblem(text, LENGTH_UNITS));
  return unit;
}

/** One of `choices`, exactly. */
export function parseChoiceOption<T extends string>(where: string, option: string, text: string, choices: readonly T[]): T {
  if (!(choices as readonly string[]).includes(text)) {
    throw new ParameterError(where, option, `must be one of ${choices.join(", ")} (got ${JSON.stringify(text)})`);
  }
  return text as T;
}

/** A number for the one-line summaries: 4 significant digits, shortest form. */
export function brief(value: number): string {
  return Number.isFinite(value) ? String(Number(value.toPrecision(4))) : String(value);
}

/**
 * Runs `f`, renaming a ParameterError of the fit about an option the user gave ("profile: step: ...")
 * after the command and its flag ("analyze: --step: ..."), so the message names what was typed.
 */
export function withOptionNames<T>(where: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof ParameterError && e.where === "profile" && (e.option === "step" || e.option === "bootstrap" || e.option === "seed")) {
      throw new ParameterError(where, `--${e.option}`, e.message.replace(/^profile: \w+: /, ""));
    }
    throw e;
  }
}

/** Longest error line the CLI prints (a message quoting a binary "line" of a file could be megabytes). */
export const MAX_MESSAGE_CHARS = 600;

/**
 * An error message as one printable line: line breaks become spaces, other control characters
 * (which a binary file read as text can put into a quoted token) become \u escapes, and the line
 * is cut at {@link MAX_MESSAGE_CHARS} characters.
 * @example messageLine("a.stl:1: \u0001\u0002: outside a solid") // "a.stl:1: \\u0001\\u0002: outside a solid"
 */
export function messageLine(message: string): string {
  const flat = message
    .replace(/[\r\n]+/g, " ")
    .replace(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, "0")}`);
  return flat.length > MAX_MESSAGE_CHARS ? `${flat.slice(0, MAX_MESSAGE_CHARS - 3)}...` : flat;
}

