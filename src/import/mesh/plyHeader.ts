import { InputError } from "../../errors.js";

/** Scalar types of PLY properties (both the classic and the sized names) and their byte sizes. */
const SIZES: Readonly<Record<string, number>> = {
  char: 1, uchar: 1, short: 2, ushort: 2, int: 4, uint: 4, float: 4, double: 8,
  int8: 1, uint8: 1, int16: 2, uint16: 2, int32: 4, uint32: 4, float32: 4, float64: 8,
};

export interface PlyProperty {
  readonly name: string;
  readonly type: string;
  /** For list properties: the type of the count. */
  readonly countType?: string;
}

export interface PlyElement {
  readonly name: string;
  readonly count: number;
  readonly properties: readonly PlyProperty[];
  /** Header line of the element statement (for messages). */
  readonly line: number;
}

export interface PlyHeader {
  readonly format: "ascii" | "binary_little_endian" | "binary_big_endian";
  readonly elements: readonly PlyElement[];
  /** Byte offset of the body (just after the end_header line break). */
  readonly bodyOffset: number;
  /** Number of header lines (the body's first line is headerLines + 1). */
  readonly headerLines: number;
}

/** Size in bytes of a PLY scalar type, or undefined if unknown. */
export function plySize(type: string): number | undefined {
  return SIZES[type];
}

/**
 * Parses and checks a PLY header (Turk 1994, "The PLY polygon file format";
 * https://paulbourke.net/dataformats/ply/). Every statement must be one the format defines, so that
 * three's PLYLoader never meets one it would only log.
 * @throws {InputError} "file:3: format: expected ascii, binary_little_endian or binary_big_endian ..."
 */
export function parsePlyHeader(bytes: Uint8Array, file: string): PlyHeader {
  const limit = Math.min(bytes.byteLength, 1 << 16);
  const head = new TextDecoder("latin1").decode(bytes.subarray(0, limit));
  const m = /end_header[ \t]*(\r\n|\n|\r)/.exec(head);
  if (!head.startsWith("ply")) throw new InputError(file, 1, "magic", `expected "ply", got ${JSON.stringify(head.slice(0, 8))}`);
  if (m === null) throw new InputError(file, null, "header", "no end_header line (truncated or not a PLY file)");
  const bodyOffset = m.index + m[0].length;
  const lines = head.slice(0, m.index).split(/\r\n|\n|\r/);
  let format: PlyHeader["format"] | undefined;
  const elements: { name: string; count: number; properties: PlyProperty[]; line: number }[] = [];
  for (let i = 1; i < lines.length; i++) {
    const line = i + 1;
    const tok = lines[i].trim().split(/\s+/);
    const key = tok[0];
    if (key === "" || key === "comment" || key === "obj_info") continue;
    if (key === "format") {
      if (tok[1] !== "ascii" && tok[1] !== "binary_little_endian" && tok[1] !== "binary_big_endian") {
        throw new InputError(file, line, "format", `expected ascii, binary_little_endian or binary_big_endian, got ${JSON.stringify(tok[1] ?? "")}`);
      }
      format = tok[1];
    } else if (key === "element") {
      const count = Number(tok[2]);
      if (tok.length !== 3 || !Number.isInteger(count) || count < 0) {
        throw new InputError(file, line, "element", `expected "element <name> <count>", got ${JSON.stringify(lines[i].trim())}`);
      }
      elements.push({ name: tok[1], count, properties: [], line });
    } else if (key === "property") {
      const el = elements[elements.length - 1];
      if (el === undefined) throw new InputError(file, line, "property", "before any element");
      if (tok[1] === "list") {
        if (tok.length !== 5 || SIZES[tok[2]] === undefined || SIZES[tok[3]] === undefined) {
          throw new InputError(file, line, "property", `expected "property list <count type> <item type> <name>", got ${JSON.stringify(lines[i].trim())}`);
        }
        el.properties.push({ name: tok[4], type: tok[3], countType: tok[2] });
      } else {
        if (tok.length !== 3 || SIZES[tok[1]] === undefined) {
          throw new InputError(file, line, "property", `expected "property <type> <name>" with a PLY type, got ${JSON.stringify(lines[i].trim())}`);
        }
        el.properties.push({ name: tok[2], type: tok[1] });
      }
    } else {
      throw new InputError(file, line, key, "unknown header statement");
    }
  }
  if (format === undefined) throw new InputError(file, null, "format", "missing format line");
  return { format, elements, bodyOffset, headerLines: (head.slice(0, m.index).match(/\r\n|\n|\r/g)?.length ?? 0) + 1 };
}
