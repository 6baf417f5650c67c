/**
 * Reader for ordered traces in delimited text: CSV, TSV and whitespace-separated files
 * (`.csv .tsv .txt .xyz`). A small hand-written, line-aware parser, so that every error can name
 * its line and field, and so that a million rows parse in a fraction of a second.
 */
import { InputError } from "../errors.js";
import { INPUT_UNITS, type InputUnit, type Trace } from "../types.js";
import { buildTrace, type RawTrace } from "./buildTrace.js";
import { fastDecimal } from "./decimal.js";
import type { TraceReadOptions } from "./types.js";
import { badUnitProblem, parseUnitName } from "./unitName.js";

const AXES = ["x", "y", "z"] as const;

/** A header field that names a coordinate: `x`, `X`, `x_nm`, `x/nm`, `x (nm)`, `x [nm]`. */
const COORD_NAME = /^([xyz])(?:\s*[[(]\s*([^\])]*?)\s*[\])]|[_/]([^\s_/]+))?$/i;
/** A field that reads as a word rather than a number (a header cell). */
const WORDY = /^["']?[A-Za-z_\u00b5\u03bc]/;
const NUMBER_WORD = /^[+-]?(inf|infinity|nan)$/i;
/** A whole-line comment that declares a property of the file: `# unit: nm`, `# closed: true`. */
const DIRECTIVE = /^\s*#\s*(unit|closed)\s*:\s*(.*?)\s*$/;

interface Header {
  readonly line: number;
  readonly width: number;
  /** Column index of x, y, z (z: -1 when absent). */
  readonly columns: readonly [number, number, number];
  readonly unit?: InputUnit;
  readonly ignored: readonly string[];
}

function unquote(cell: string): string {
  const t = cell.trim();
  if (t.length >= 2 && (t[0] === '"' || t[0] === "'") && t[t.length - 1] === t[0]) return t.slice(1, -1).trim();
  return t;
}

function readHeader(fields: readonly string[], file: string, line: number): Header {
  const columns: [number, number, number] = [-1, -1, -1];
  const ignored: string[] = [];
  let unit: InputUnit | undefined;
  let unitColumn = "";
  for (let c = 0; c < fields.length; ++c) {
    const name = unquote(fields[c]);
    const m = COORD_NAME.exec(name);
    let axis = -1;
    if (m) {
      const bracketed = m[2];
      const suffix = m[3];
      if (bracketed !== undefined) {
        const u = parseUnitName(bracketed);
        if (u === null) {
          throw new InputError(file, line, "header", `column "${name}": unknown unit ${JSON.stringify(bracketed)} (expected one of ${INPUT_UNITS.join(", ")})`);
        }
        axis = AXES.indexOf(m[1].toLowerCase() as "x");
        if (unit !== undefined && u !== unit) {
          throw new InputError(file, line, "header", `columns "${unitColumn}" and "${name}" disagree on the unit`);
        }
        unit = u;
        unitColumn = name;
      } else if (suffix !== undefined) {
        const u = parseUnitName(suffix);
        if (u !== null) {
          axis = AXES.indexOf(m[1].toLowerCase() as "x");
          if (unit !== undefined && u !== unit) {
            throw new InputError(file, line, "header", `columns "${unitColumn}" and "${name}" disagree on the unit`);
          }
          unit = u;
          unitColumn = name;
        }
      } else {
        axis = AXES.indexOf(m[1].toLowerCase() as "x");
      }
    }
    if (axis < 0) {
      ignored.push(name === "" ? `(column ${c + 1})` : name);
      continue;
    }
    if (columns[axis] >= 0) {
      throw new InputError(file, line, "header", `two columns name ${AXES[axis]} (columns ${columns[axis] + 1} and ${c + 1})`);
    }
    columns[axis] = c;
  }
  for (const axis of [0, 1] as const) {
    if (columns[axis] < 0) throw new InputError(file, line, "header", missingAxisProblem(fields.map(unquote), AXES[axis]));
  }
  const header: { line: number; width: number; columns: [number, number, number]; ignored: string[]; unit?: InputUnit } =
    { line, width: fields.length, columns, ignored };
  if (unit !== undefined) header.unit = unit;
  return header;
}

/**
 * Why the header has no column for `axis`, saying what it most likely meant: a column named after
 * the axis with a unit suffix that is not a unit (`x_mm`), or a header that is one column holding
 * another separator (`x;y;z`); else the columns it has.
 */
function missingAxisProblem(names: readonly string[], axis: string): string {
  for (const name of names) {
    const m = /^([xyz])[_/](.+)$/i.exec(name);
    if (m && m[1].toLowerCase() === axis) {
      return `no column named "${axis}": column "${name}" has the unknown unit ${JSON.stringify(m[2])} (expected one of ${INPUT_UNITS.join(", ")})`;
    }
  }
  if (names.length === 1) {
    const sep = [";", "|", ":"].find((c) => names[0].includes(c));
    if (sep !== undefined) {
      return `no column named "${axis}": the header is one column, ${JSON.stringify(names[0])}; "${sep}" does not separate fields (use commas, tabs or spaces)`;
    }
  }
  return `no column named "${axis}" (columns: ${names.join(", ")})`;
}

function isHeader(fields: readonly string[]): boolean {
  for (const f of fields) {
    const t = f.trim();
    if (!WORDY.test(t) || NUMBER_WORD.test(t)) return false;
  }
  return true;
}

/** Reads text[start, end) as a finite decimal number, or throws naming the field. */
function readNumber(text: string, start: number, end: number, file: string, line: number, field: string): number {
  const fast = fastDecimal(text, start, end);
  if (!Number.isNaN(fast)) return fast;
  const cell = text.slice(start, end);
  if (cell === "") throw new InputError(file, line, field, "empty field");
  const value = Number(cell);
  if (!Number.isFinite(value)) throw new InputError(file, line, field, `not a finite number: ${JSON.stringify(cell)}`);
  // Number() also accepts 0x10, 0o7 and 0b1; a trace holds decimal numbers only.
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(cell)) {
    throw new InputError(file, line, field, `not a decimal number: ${JSON.stringify(cell)}`);
  }
  return value;
}

/** Space, tab, vertical tab, form feed. */
function isBlank(c: number): boolean {
  return c === 32 || c === 9 || c === 11 || c === 12;
}

function readClosed(value: string, file: string, line: number): boolean {
  const v = value.toLowerCase();
  if (v === "true" || v === "yes") return true;
  if (v === "false" || v === "no") return false;
  throw new InputError(file, line, "closed", `must be true or false (got ${JSON.stringify(value)})`);
}

/**
 * Parses an ordered trace from delimited text, one point per line.
 *
 * Format (line-based; `\n`, `\r\n` or `\r` line ends; a UTF-8 byte-order mark is ignored):
 * - `#` starts a comment, to the end of the line; blank lines are skipped.
 * - The separator is `,` if the first non-comment line contains a comma, else runs of spaces/tabs.
 *   With commas, every field is trimmed and an empty field is an error.
 * - The first non-comment line is a header when every field starts with a letter (`x,y,z`,
 *   `t x y z`, `x_nm,y_nm`, `"x (nm)","y (nm)"`). Columns are then picked by name (x and y
 *   required, z optional, others ignored and reported); a unit in the names declares the unit.
 *   Without a header a row holds 2 (x y) or 3 (x y z) numbers, as many as the first row.
 * - 2 coordinates give `dims` 2 with z = 0.
 * - Whole-line comments `# unit: nm` and `# closed: true|false` declare the unit and closure; a
 *   remark in parentheses after the unit (`# unit: nm (s x y z in nm)`) is allowed, so the
 *   profile.csv and chain.csv that twistline writes read back as traces.
 * - Numbers are read with `Number()` (so "1.2e", "3nm", "" and "Infinity" are errors, not 1.2, 3, 0);
 *   hexadecimal, octal and binary literals are refused.
 *
 * Units, duplicates, closing point and the minimum of 4 distinct points: see {@link buildTrace}.
 *
 * Cost: one pass over the text, O(n), no allocation per row; numbers by Clinger's fast path
 * (./decimal.ts), which returns exactly what `Number()` would.
 * @throws {InputError} naming file, line and field, e.g. `wire.csv:41: z: not a finite number: "1.2e"`.
 * @example parseDelimited("x,y\n0,0\n1,0\n1,1\n0,1\n", "sq.csv", { unit: "um" }).xyz[3] // 1e-6
 */
export function parseDelimited(text: string, file: string, options: TraceReadOptions = {}): Trace {
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  if (text.indexOf("\n") < 0 && text.indexOf("\r") >= 0) text = text.replace(/\r/g, "\n");

  const len = text.length;
  let cap = 1024;
  let values = new Float64Array(3 * cap);
  let lines = new Int32Array(cap);
  let count = 0;

  let comma = false;
  let header: Header | undefined;
  let width = 0; // values per row; 0 until the first non-comment line is seen
  let xc = 0, yc = 1, zc = 2;
  let declaredUnit: { value: InputUnit; line: number } | undefined;
  let declaredClosed: { value: boolean; line: number } | undefined;
  // Field boundaries of the current row: [starts[f], ends[f]).
  let starts = new Int32Array(8);
  let ends = new Int32Array(8);

  let nextHash = text.indexOf("#");
  if (nextHash < 0) nextHash = len;
  let pos = 0;
  let lineNo = 0;
  while (pos <= len) {
    let end = text.indexOf("\n", pos);
    if (end < 0) end = len;
    ++lineNo;
    const lineStart = pos;
    pos = end + 1;
    if (end > lineStart && text.charCodeAt(end - 1) === 13) --end;

    if (nextHash < lineStart) {
      nextHash = text.indexOf("#", lineStart);
      if (nextHash < 0) nextHash = len;
    }
    if (nextHash < end) {
      const line = text.slice(lineStart, end);
      const d = DIRECTIVE.exec(line);
      if (d && text.slice(lineStart, nextHash).trim() === "") {
        if (d[1] === "unit") {
          // "# unit: nm (s x y z in nm; ...)": a remark in parentheses after the unit (twistline's own outputs) is not part of it
          const value = /^(\S+)\s+\(.*\)$/.exec(d[2])?.[1] ?? d[2];
          const u = parseUnitName(value);
          if (u === null) throw new InputError(file, lineNo, "unit", badUnitProblem(d[2]));
          if (declaredUnit !== undefined && declaredUnit.value !== u) {
            throw new InputError(file, lineNo, "unit", `"${u}" contradicts "${declaredUnit.value}" declared on line ${declaredUnit.line}`);
          }
          declaredUnit = { value: u, line: lineNo };
        } else {
          const c = readClosed(d[2], file, lineNo);
          if (declaredClosed !== undefined && declaredClosed.value !== c) {
            throw new InputError(file, lineNo, "closed", `${c} contradicts ${declaredClosed.value} declared on line ${declaredClosed.line}`);
          }
          declaredClosed = { value: c, line: lineNo };
        }
      }
      end = nextHash;
    }

    let a = lineStart;
    while (a < end && isBlank(text.charCodeAt(a))) ++a;
    while (end > a && isBlank(text.charCodeAt(end - 1))) --end;
    if (a === end) continue;

    if (width === 0) {
      // First non-comment line: choose the separator, and read a header if there is one.
      const body = text.slice(a, end);
      comma = body.indexOf(",") >= 0;
      const fields = comma ? body.split(",") : body.split(/[ \t\v\f]+/);
      if (isHeader(fields)) {
        header = readHeader(fields, file, lineNo);
        width = header.width;
        [xc, yc, zc] = header.columns;
        if (starts.length < width) {
          starts = new Int32Array(width);
          ends = new Int32Array(width);
        }
        continue;
      }
      if (fields.length !== 2 && fields.length !== 3) {
        throw new InputError(file, lineNo, "point", `expected 2 or 3 values (x y [z]), got ${fields.length}; a header line naming the x, y, z columns selects columns`);
      }
      width = fields.length;
      if (width === 2) zc = -1;
    }

    // Split [a, end) into fields without allocating.
    let nf = 0;
    if (comma) {
      let f = a;
      for (;;) {
        let b = text.indexOf(",", f);
        if (b < 0 || b > end) b = end;
        let fs = f, fe = b;
        while (fs < fe && isBlank(text.charCodeAt(fs))) ++fs;
        while (fe > fs && isBlank(text.charCodeAt(fe - 1))) --fe;
        if (nf < starts.length) {
          starts[nf] = fs;
          ends[nf] = fe;
        }
        ++nf;
        if (b >= end) break;
        f = b + 1;
      }
    } else {
      let f = a;
      while (f < end) {
        let b = f;
        while (b < end && !isBlank(text.charCodeAt(b))) ++b;
        if (nf < starts.length) {
          starts[nf] = f;
          ends[nf] = b;
        }
        ++nf;
        f = b;
        while (f < end && isBlank(text.charCodeAt(f))) ++f;
      }
    }
    if (nf !== width) {
      const like = header ? ` (one per column of the header on line ${header.line})` : "";
      throw new InputError(file, lineNo, "point", `expected ${width} values${like}, got ${nf}`);
    }

    if (count === cap) {
      cap *= 2;
      const v2 = new Float64Array(3 * cap);
      v2.set(values);
      values = v2;
      const l2 = new Int32Array(cap);
      l2.set(lines);
      lines = l2;
    }
    const j = 3 * count;
    values[j] = readNumber(text, starts[xc], ends[xc], file, lineNo, "x");
    values[j + 1] = readNumber(text, starts[yc], ends[yc], file, lineNo, "y");
    values[j + 2] = zc < 0 ? 0 : readNumber(text, starts[zc], ends[zc], file, lineNo, "z");
    lines[count] = lineNo;
    ++count;
  }

  if (count === 0) {
    const problem = header ? `no data rows after the header on line ${header.line}` : "no data rows (the file is empty or holds only comments)";
    throw new InputError(file, null, "points", problem);
  }

  const declared: { unit?: { value: InputUnit; line: number | null }; closed?: boolean } = {};
  if (header?.unit !== undefined && declaredUnit !== undefined && header.unit !== declaredUnit.value) {
    throw new InputError(file, header.line, "header", `unit "${header.unit}" contradicts "${declaredUnit.value}" declared on line ${declaredUnit.line}`);
  }
  if (declaredUnit !== undefined) declared.unit = declaredUnit;
  else if (header?.unit !== undefined) declared.unit = { value: header.unit, line: header.line };
  if (declaredClosed !== undefined) declared.closed = declaredClosed.value;

  const diagnostics: string[] = [];
  if (header && header.ignored.length > 0) {
    diagnostics.push(`ignored ${header.ignored.length === 1 ? "column" : "columns"} ${header.ignored.map((c) => JSON.stringify(c)).join(", ")} (not x, y or z)`);
  }

  const raw: RawTrace = {
    values: values.subarray(0, 3 * count),
    count,
    dims: zc < 0 ? 2 : 3,
    lines: lines.subarray(0, count),
    declared,
    diagnostics,
  };
  return buildTrace(raw, file, options);
}
