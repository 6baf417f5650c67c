import { Ajv2020 } from "ajv/dist/2020.js";
import type { ErrorObject, ValidateFunction } from "ajv/dist/2020.js";
import { InputError } from "../errors.js";
import schema from "./schemas/material.schema.json" with { type: "json" };
import { MU0 } from "./sampleValidity.js";
import type { IntrinsicAnisotropy, MagneticOrder, Material } from "./types.js";

/** The material JSON as written by a user (see schemas/material.schema.json). */
export interface MaterialJson {
  readonly note?: string;
  order: MagneticOrder;
  exchange?: number;
  anisotropy?: number;
  magneticLength?: number;
  latticeSpacing?: number;
  thickness?: number;
  crossSection?: number;
  temperature?: number;
  magnonSpeed?: number;
  saturationMagnetisation?: number;
  intrinsic?: { constant: number; axis: IntrinsicAnisotropy["axis"]; direction?: [number, number, number] };
  appliedField?: { field: number; direction: [number, number, number] };
}

// strictRequired off: the anyOf/not branches name properties defined at the top level
const ajv = new Ajv2020({ allErrors: true, strict: true, strictRequired: false, allowUnionTypes: true });
const validate: ValidateFunction<MaterialJson> = ajv.compile<MaterialJson>(schema);

/** The shipped JSON Schema (2020-12) of material files. */
export const materialSchema: Readonly<Record<string, unknown>> = schema;

const UNITS: Record<string, string> = {
  exchange: "J/m", anisotropy: "J/m^3", magneticLength: "m", latticeSpacing: "m", thickness: "m",
  crossSection: "m^2", temperature: "K", magnonSpeed: "m/s", constant: "J/m^3", saturationMagnetisation: "A/m", field: "A/m",
};

function fieldName(instancePath: string): string {
  const parts = instancePath.split("/").slice(1).map((p) => p.replace(/~1/g, "/").replace(/~0/g, "~"));
  return ["material", ...parts].join(".");
}

function valueAt(json: unknown, instancePath: string): unknown {
  let v = json;
  for (const p of instancePath.split("/").slice(1)) v = (v as Record<string, unknown> | null)?.[p];
  return v;
}

function show(v: unknown): string {
  return typeof v === "string" ? JSON.stringify(v) : v === undefined ? "nothing" : JSON.stringify(v) ?? String(v);
}

/** Range of a numeric property from the schema, as "(0, 1e-08]" style text. */
function rangeOf(instancePath: string): string {
  const parts = instancePath.split("/").slice(1);
  let node = schema as unknown as Record<string, unknown>;
  for (const p of parts) node = ((node.properties as Record<string, unknown>)[p] ?? {}) as Record<string, unknown>;
  const lo = node.exclusiveMinimum !== undefined ? `(${node.exclusiveMinimum}` : node.minimum !== undefined ? `[${node.minimum}` : "(-inf";
  const hi = node.maximum !== undefined ? `${node.maximum}]` : "inf)";
  return `${lo}, ${hi}`;
}

function message(err: ErrorObject, json: unknown): { field: string; problem: string } {
  const field = fieldName(err.instancePath);
  const last = err.instancePath.split("/").pop() ?? "";
  const unit = UNITS[last];
  switch (err.keyword) {
    case "type":
    case "minimum":
    case "maximum":
    case "exclusiveMinimum":
    case "exclusiveMaximum": {
      const got = show(valueAt(json, err.instancePath));
      if (unit !== undefined) {
        const positive = rangeOf(err.instancePath).startsWith("(0");
        return { field, problem: `must be a ${positive ? "positive " : ""}number in ${unit}, range ${rangeOf(err.instancePath)} (got ${got})` };
      }
      return { field, problem: `must be ${err.params.type ?? "valid"} (got ${got})` };
    }
    case "enum":
      return {
        field,
        problem: `must be one of ${(err.params.allowedValues as unknown[]).map((x) => JSON.stringify(x)).join(", ")} (got ${show(valueAt(json, err.instancePath))})`,
      };
    case "required":
      return { field: `${field}.${err.params.missingProperty}`, problem: "missing required property" };
    case "additionalProperties":
      return { field, problem: `unknown property '${err.params.additionalProperty}'` };
    case "anyOf":
      return { field, problem: "give exchange (J/m) and anisotropy (J/m^3), or magneticLength (m), or (FM) exchange and saturationMagnetisation (A/m)" };
    case "not":
      return { field, problem: "give at most two of exchange, anisotropy and magneticLength (they are tied by l = sqrt(A/K))" };
    default:
      return { field, problem: err.message ?? "invalid" };
  }
}

/**
 * Validate a parsed material JSON against schemas/material.schema.json (ajv, draft 2020-12) and
 * complete it: l = sqrt(A/K) from exchange and anisotropy, or A = K l^2 / K = A / l^2 when one of
 * them accompanies the magnetic length; cross-section pi thickness^2 / 4 (round wire) when not given;
 * temperature 300 K by default. FM with a saturation magnetisation Ms and no K: K = mu0 Ms^2 / 4, the
 * shape anisotropy of a thin round wire (demagnetising factors 0 along the axis, 1/2 across;
 * Osborn, Phys. Rev. 67, 351 (1945), limit of a long cylinder; from memory), flagged
 * anisotropyFromShape. Units: SI throughout.
 * @throws {InputError} naming the file and the field, with the expected unit and range, for the
 *   first problem found, e.g. `mat.json: material.exchange: must be a positive number in J/m,
 *   range (0, 1e-8] (got -1)`. An intrinsic term without K raises too (its size is relative to K).
 * Cost O(size of the JSON).
 * @example parseMaterial({ order: "ferro", exchange: 1.3e-11, anisotropy: 5e5 }, "m.json").magneticLength // 5.1e-9
 */
export function parseMaterial(json: unknown, file: string): Material {
  if (typeof json !== "object" || json === null || Array.isArray(json)) {
    throw new InputError(file, null, "material", `must be a JSON object (got ${Array.isArray(json) ? "an array" : show(json)})`);
  }
  if (!validate(json)) {
    // errors inside the anyOf/not branches are summarised by the branch keyword itself
    const errs = (validate.errors ?? []).filter((e) => !/\/(anyOf|not)\//.test(e.schemaPath));
    // report the most specific problem: property-level errors before the whole-object rules
    const sorted = [...errs].sort((a, b) => b.instancePath.length - a.instancePath.length || rank(a) - rank(b));
    const first = sorted[0];
    if (first === undefined) throw new InputError(file, null, "material", "invalid");
    const m = message(first, json);
    throw new InputError(file, null, m.field, m.problem);
  }
  const j = json;
  let a = j.exchange ?? null, k = j.anisotropy ?? null;
  const ms = j.saturationMagnetisation ?? null;
  if (ms !== null && j.order !== "ferro") throw new InputError(file, null, "material.saturationMagnetisation", "applies to order \"ferro\" only (the AFM chain has no net magnetisation)");
  // K not given: the shape anisotropy of a thin round wire, mu0 Ms^2 / 4
  const fromShape = k === null && ms !== null && (a === null || j.magneticLength === undefined);
  if (fromShape) k = (MU0 * ms! * ms!) / 4;
  if (fromShape && j.intrinsic !== undefined) throw new InputError(file, null, "material.anisotropy", "give K explicitly with an intrinsic term (the shape value mu0 Ms^2 / 4 is only used alone)");
  let l: number;
  if (j.magneticLength !== undefined) {
    l = j.magneticLength;
    if (a !== null && k === null) k = a / (l * l);
    else if (k !== null && a === null) a = k * l * l;
  } else {
    l = Math.sqrt(a! / k!);
  }
  if (!(l > 0) || !Number.isFinite(l)) throw new InputError(file, null, "material.magneticLength", `must be a positive length in m (got ${l})`);
  const unitVector = (d: readonly number[] | undefined, field: string): [number, number, number] => {
    const n = d === undefined ? 0 : Math.hypot(d[0], d[1], d[2]);
    if (!(n > 0) || !Number.isFinite(n)) throw new InputError(file, null, field, `must be a non-zero lab direction [x, y, z] (got ${show(d)})`);
    return [d![0] / n, d![1] / n, d![2] / n];
  };
  let intrinsic: IntrinsicAnisotropy | null = null;
  if (j.intrinsic !== undefined) {
    if (j.intrinsic.axis === "lab") intrinsic = { constant: j.intrinsic.constant, axis: "lab", direction: unitVector(j.intrinsic.direction, "material.intrinsic.direction") };
    else if (j.intrinsic.direction !== undefined) throw new InputError(file, null, "material.intrinsic.direction", `only with axis "lab" (got axis ${show(j.intrinsic.axis)})`);
    else intrinsic = { constant: j.intrinsic.constant, axis: j.intrinsic.axis };
  }
  let appliedField: Material["appliedField"] = null;
  if (j.appliedField !== undefined) {
    if (j.order !== "ferro") throw new InputError(file, null, "material.appliedField", "applies to order \"ferro\" only (the AFM sigma model has no linear Zeeman term)");
    if (ms === null) throw new InputError(file, null, "material.appliedField", "needs saturationMagnetisation (A/m) for the Zeeman energy mu0 Ms H");
    appliedField = { field: j.appliedField.field, direction: unitVector(j.appliedField.direction, "material.appliedField.direction") };
  }
  if (intrinsic !== null && k === null) {
    throw new InputError(file, null, "material.intrinsic", "needs the anisotropy K (J/m^3) to compare the intrinsic constant with");
  }
  const thickness = j.thickness ?? null;
  const crossSection = j.crossSection ?? (thickness !== null ? (Math.PI * thickness * thickness) / 4 : null);
  return {
    order: j.order,
    magneticLength: l,
    exchange: a,
    anisotropy: k,
    intrinsic,
    latticeSpacing: j.latticeSpacing ?? null,
    thickness,
    crossSection,
    temperature: j.temperature ?? 300,
    magnonSpeed: j.magnonSpeed ?? null,
    saturationMagnetisation: ms,
    anisotropyFromShape: fromShape,
    appliedField,
  };
}

function rank(e: ErrorObject): number {
  return e.keyword === "anyOf" || e.keyword === "not" ? 2 : e.keyword === "required" ? 1 : 0;
}
