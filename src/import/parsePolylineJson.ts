/**
 * Reader for ordered traces stored as JSON, checked against the shipped JSON Schema
 * `schemas/polyline.schema.json` (draft 2020-12, `$id` "urn:twistline:schema:polyline:1"):
 *
 * ```json
 * { "unit": "nm", "closed": false, "points": [[0, 0, 0], [1.5, 0.2, 0.1], ...] }
 * ```
 */
import { Ajv2020 } from "ajv/dist/2020.js";
import type { ErrorObject, ValidateFunction } from "ajv/dist/2020.js";
import { InputError } from "../errors.js";
import type { InputUnit, Trace } from "../types.js";
import { buildTrace } from "./buildTrace.js";
import schema from "./schemas/polyline.schema.json" with { type: "json" };
import type { TraceReadOptions } from "./types.js";

/** The document the schema describes (lengths in `unit`, pixelSize in metres). */
export interface PolylineDocument {
  $schema?: string;
  name?: string;
  description?: string;
  unit?: InputUnit;
  pixelSize?: number;
  closed?: boolean;
  planarProjection?: boolean;
  points: number[][];
}

/** The schema as shipped (for writers and for tests). */
export const POLYLINE_SCHEMA: typeof schema = schema;

let validator: ValidateFunction<PolylineDocument> | undefined;

/** Compiles the schema once, on first use (strict mode: a sloppy schema fails here, loudly). */
export function polylineValidator(): ValidateFunction<PolylineDocument> {
  validator ??= new Ajv2020({ allErrors: true, strict: true, verbose: true }).compile<PolylineDocument>(schema);
  return validator;
}

/** JSON Pointer "/points/3/1" -> "points[3][1]"; "" -> "(top level)". */
export function pointerToField(pointer: string): string {
  if (pointer === "") return "(top level)";
  let out = "";
  for (const raw of pointer.slice(1).split("/")) {
    const part = raw.replace(/~1/g, "/").replace(/~0/g, "~");
    if (/^(0|[1-9]\d*)$/.test(part)) out += `[${part}]`;
    else out += out === "" ? part : `.${part}`;
  }
  return out;
}

function child(parent: string, name: string): string {
  return parent === "(top level)" ? name : `${parent}.${name}`;
}

const ARTICLE: Readonly<Record<string, string>> = { array: "an array", object: "an object", integer: "an integer" };

/** The offending value for a message: `(got "3")`, shortened; empty without ajv's `verbose`. */
function got(error: ErrorObject): string {
  if (!("data" in error)) return "";
  const data: unknown = error.data;
  const shown = typeof data === "number" ? String(data) : (JSON.stringify(data) ?? String(data));
  return ` (got ${shown.length > 40 ? `${shown.slice(0, 37)}...` : shown})`;
}

/** One ajv error as [field, problem], in the house message style. */
export function describeSchemaError(error: ErrorObject): [string, string] {
  const field = pointerToField(error.instancePath);
  const p = error.params as Record<string, unknown>;
  switch (error.keyword) {
    case "type": {
      const t = String(p.type);
      // JSON.parse turns 1e400 into Infinity, which is a JS number but not a JSON Schema one.
      if (t === "number" && typeof error.data === "number") return [field, `must be a finite number${got(error)}`];
      return [field, `must be ${ARTICLE[t] ?? `a ${t}`}${got(error)}`];
    }
    case "required":
      return [child(field, String(p.missingProperty)), "missing (required)"];
    case "additionalProperties": {
      const known = Object.keys(schema.properties).filter((k) => k !== "$schema").join(", ");
      return [child(field, String(p.additionalProperty)), `unknown property (expected ${known})`];
    }
    case "enum": {
      const allowed = (p.allowedValues as unknown[]).map((v) => JSON.stringify(v)).join(", ");
      return [field, `must be one of ${allowed}${got(error)}`];
    }
    case "minItems":
    case "maxItems":
      if (/^\/points\/\d+$/.test(error.instancePath)) return [field, "must have 2 or 3 coordinates ([x, y] or [x, y, z])"];
      return [field, error.message ?? error.keyword];
    case "exclusiveMinimum":
      return [field, `must be > ${String(p.limit)}${got(error)}`];
    default:
      return [field, error.message ?? error.keyword];
  }
}

function lineAt(text: string, position: number): number {
  let line = 1;
  for (let i = 0; i < position && i < text.length; ++i) if (text.charCodeAt(i) === 10) ++line;
  return line;
}

function parseJsonText(text: string, file: string): unknown {
  try {
    return JSON.parse(text);
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    if (/end of JSON input/i.test(message)) {
      const lines = text.split("\n").length;
      throw new InputError(file, lines, "json", "unexpected end of input (is the file truncated?)");
    }
    const at = /position (\d+)/.exec(message);
    const pos = at ? Number(at[1]) : null;
    if (pos !== null && pos >= text.trimEnd().length) {
      throw new InputError(file, lineAt(text, pos), "json", "unexpected end of input (is the file truncated?)");
    }
    const core = message
      .replace(/\s*in JSON at position \d+.*$/s, "")
      .replace(/\s*after JSON at position \d+.*$/s, " after the end of the JSON value")
      .replace(/, (\.\.\.)?".*" is not valid JSON$/s, "");
    const line = pos === null ? null : lineAt(text, pos);
    throw new InputError(file, line, "json", `not valid JSON: ${core.charAt(0).toLowerCase()}${core.slice(1)}`);
  }
}

/**
 * Parses an ordered trace from a JSON polyline document (schema above).
 *
 * - The document is validated with ajv (JSON Schema 2020-12); the first problem is reported as
 *   `file: points[3][1]: must be a number`. JSON syntax errors name the line:
 *   `file:12: json: not valid JSON: expected ',' or ']' after array element`.
 * - All points must have the same number of coordinates; [x, y] points give `dims` 2 with z = 0.
 * - `unit` (default: `options.unit`, else nm) must agree with `options.unit` when both are given;
 *   `pixelSize` is in metres. `closed` from the caller wins over the document's.
 *   Conversion, duplicates and the 4-point minimum: see {@link buildTrace}.
 *
 * Cost: JSON.parse plus one validation pass, O(n).
 * @throws {InputError} on invalid JSON, a schema violation, mixed 2D/3D points, or see buildTrace.
 * @example parsePolylineJson('{"unit":"A","points":[[3,0],[0,3],[-3,0],[0,-3]]}', "sq.json").xyz[0] // 3e-10
 */
export function parsePolylineJson(text: string, file: string, options: TraceReadOptions = {}): Trace {
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const doc = parseJsonText(text, file);
  const validate = polylineValidator();
  if (!validate(doc)) {
    const first = (validate.errors ?? [])[0];
    if (first === undefined) throw new InputError(file, null, "(top level)", "does not match the polyline schema");
    const [field, problem] = describeSchemaError(first);
    throw new InputError(file, null, field, problem);
  }

  const points = doc.points;
  const count = points.length;
  const width = count > 0 ? points[0].length : 3;
  const values = new Float64Array(3 * count);
  for (let i = 0; i < count; ++i) {
    const p = points[i];
    if (p.length !== width) {
      throw new InputError(file, null, `points[${i}]`, `has ${p.length} coordinates but points[0] has ${width}`);
    }
    values[3 * i] = p[0];
    values[3 * i + 1] = p[1];
    values[3 * i + 2] = width === 3 ? p[2] : 0;
  }

  const declared: {
    unit?: { value: InputUnit; line: null }; pixelSize?: number; closed?: boolean; planarProjection?: boolean;
  } = {};
  if (doc.unit !== undefined) declared.unit = { value: doc.unit, line: null };
  if (doc.pixelSize !== undefined) declared.pixelSize = doc.pixelSize;
  if (doc.closed !== undefined) declared.closed = doc.closed;
  if (doc.planarProjection !== undefined) declared.planarProjection = doc.planarProjection;

  return buildTrace({ values, count, dims: width === 2 ? 2 : 3, declared }, file, options);
}
