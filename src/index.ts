/**
 * The library API: `import { profile, analyze } from "twistline"`.
 *
 * Everything here is pure (no files): give a Trace (as the readers make it) or plain coordinates
 * with their unit; get SI results (metres, 1/m, J) back. Writers for the files `twistline analyze`
 * makes are exported too (`buildWireOutputs`, `modelToJson`, ...).
 */
import { ParameterError } from "./errors.js";
import { analyzeTrace, type Analysis, type AnalyzeOptions } from "./export/analyzeTrace.js";
import { fitProfile, type ProfileOptions } from "./frame/profile.js";
import { buildTrace } from "./import/buildTrace.js";
import { parseMaterial, type MaterialJson } from "./physics/parseMaterial.js";
import type { Material } from "./physics/types.js";
import type { LengthUnit, Profile, Trace } from "./types.js";

export type { Analysis, AnalyzeOptions } from "./export/analyzeTrace.js";
export type { ProfileOptions } from "./frame/profile.js";
export type { SegmentOptions } from "./frame/segment.js";
export type { MaterialJson } from "./physics/parseMaterial.js";
export type { Material, WireModel, StretchModel, PinningSite, SampleInteractions } from "./physics/types.js";
export type { LengthUnit, InputUnit, Profile, Segment, SegmentKind, Source, Trace } from "./types.js";
export { FLAG_BIAS, FLAG_END, FLAG_FRAME_TRANSPORTED, FLAG_JUNCTION_ZONE, FLAG_TORSION_NOT_MEASURABLE, FLAG_TORSION_UNDEFINED, PER_METRE } from "./types.js";
export { InputError, ParameterError } from "./errors.js";
export { segment } from "./frame/segment.js";
export { buildWireModel } from "./physics/buildWireModel.js";
export { parseMaterial } from "./physics/parseMaterial.js";
export { readTraceFile, readTracesFile } from "./import/readTrace.js";
export { readNetworkFile, type ReadNetworkOptions } from "./import/network/readNetwork.js";
export { markJunctionZones, zonesOfBranch, type JunctionZone } from "./import/network/junctionZones.js";
export type { WireNetwork, NetworkBranch, NetworkJunction, NetworkEnd } from "./import/network/types.js";
export { profileToCsv } from "./export/profileToCsv.js";
export { profileToJson } from "./export/profileToJson.js";
export { buildModelDocument, modelToJson, MODEL_SCHEMA_ID, type ModelDocument } from "./export/modelDocument.js";
export { chainToCsv } from "./export/chainToCsv.js";
export { resampleWire, type ResampledWire } from "./export/resampleWire.js";
export { tubeMesh, type TubeMesh } from "./export/tubeMesh.js";
export { meshToBytes, MESH_FORMATS, type MeshFormat } from "./export/meshToBytes.js";
export { buildWireOutputs, type WireOutputs, type WireOutputOptions } from "./export/wireOutputs.js";
export { wireSummary, type WireSummary } from "./export/wireSummary.js";
export { viewerScript } from "./report/viewerScript.js";

/** Plain coordinates of a wire: x, y, z interleaved (or rows of [x, y, z] / [x, y]) in `unit`. */
export interface XyzInput {
  readonly xyz: ArrayLike<number> | readonly (readonly number[])[];
  /** Unit of the numbers (default "nm"). */
  readonly unit?: LengthUnit;
  /** Closed loop or open wire (default: detected by the fit). */
  readonly closed?: boolean;
  /** Name used in messages and outputs (default "<array>"). */
  readonly file?: string;
}

function isTrace(input: Trace | XyzInput): input is Trace {
  return (input as Trace).dims !== undefined && (input as Trace).source !== undefined && (input as Trace).xyz instanceof Float64Array;
}

/**
 * A Trace from plain coordinates, through the import stage's own checks (unit conversion by exact
 * integer factors, consecutive duplicates dropped and reported, at least 4 distinct points).
 * Rows of length 2 give a planar (2D) trace.
 * @throws {InputError} non-finite values, too few points. {@link ParameterError} ragged rows.
 */
export function toTrace(input: Trace | XyzInput): Trace {
  if (isTrace(input)) return input;
  const file = input.file ?? "<array>";
  const src = input.xyz;
  let values: Float64Array, dims: 2 | 3 = 3;
  if (Array.isArray(src) && src.length > 0 && Array.isArray(src[0])) {
    const rows = src as readonly (readonly number[])[];
    const width = rows[0].length;
    if (width !== 2 && width !== 3) throw new ParameterError("toTrace", "xyz", `rows must have 2 or 3 numbers (got ${width})`);
    dims = width;
    values = new Float64Array(3 * rows.length);
    rows.forEach((r, i) => {
      if (r.length !== width) throw new ParameterError("toTrace", "xyz", `row ${i} has ${r.length} numbers, expected ${width}`);
      values[3 * i] = r[0]; values[3 * i + 1] = r[1]; values[3 * i + 2] = width === 3 ? r[2] : 0;
    });
  } else {
    const flat = src as ArrayLike<number>;
    if (flat.length % 3 !== 0) throw new ParameterError("toTrace", "xyz", `an interleaved array needs 3 numbers per point (got ${flat.length})`);
    values = Float64Array.from(flat);
  }
  for (let i = 0; i < values.length; ++i) {
    if (!Number.isFinite(values[i])) throw new ParameterError("toTrace", "xyz", `value ${i} is not a finite number (${values[i]})`);
  }
  return buildTrace(
    { values, count: values.length / 3, dims, declared: {} },
    file,
    { unit: input.unit ?? "nm", ...(input.closed !== undefined ? { closed: input.closed } : {}) },
  );
}

/**
 * Curvature and torsion profile of a wire with 95% bootstrap bands (the geometry stage).
 * Units: metres and 1/m in the result, whatever unit the input used.
 * @example profile({ xyz: [[0, 0, 0], [1, 1, 0], ...], unit: "nm" }).kappa
 */
export function profile(input: Trace | XyzInput, options: ProfileOptions = {}): Profile {
  return fitProfile(toTrace(input), options);
}

/** Options of {@link analyze}: those of the pipeline, with the material also accepted as its JSON form. */
export interface AnalyzeApiOptions extends Omit<AnalyzeOptions, "material"> {
  readonly material?: Material | MaterialJson | null;
}

function isMaterial(m: Material | MaterialJson): m is Material {
  return typeof (m as Material).magneticLength === "number" && (m as Material).crossSection !== undefined;
}

/**
 * The whole pipeline for one wire: profile (with bootstrap replicates), stretches and, with a
 * material, the curvilinear-magnet model. No files; SI units out.
 * @throws {InputError} bad coordinates or material JSON. {@link ParameterError} bad options.
 * @example analyze(trace, { material: { order: "ferro", exchange: 1.3e-11, anisotropy: 2e5 } }).model?.segments
 */
export function analyze(input: Trace | XyzInput, options: AnalyzeApiOptions = {}): Analysis {
  const { material, ...rest } = options;
  const mat = material === undefined || material === null ? null : isMaterial(material) ? material : parseMaterial(material, "material");
  return analyzeTrace(toTrace(input), { ...rest, material: mat });
}
