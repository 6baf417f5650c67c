/** What both profile writers share: the column set in output units, and the metadata. */
import { ParameterError } from "../errors.js";
import {
  FLAG_BIAS, FLAG_END, FLAG_FRAME_TRANSPORTED, FLAG_TORSION_NOT_MEASURABLE, FLAG_TORSION_UNDEFINED,
  PER_METRE, type LengthUnit, type Profile,
} from "../types.js";
import { resolveOutputUnit } from "./outputUnit.js";
import type { ProfileWriteOptions } from "./types.js";
import { TOOL_NAME, TOOL_VERSION } from "./version.js";

/** Column names of the profile outputs, in order. */
export const PROFILE_COLUMNS = [
  "s", "x", "y", "z",
  "kappa", "kappa_lo", "kappa_hi", "tau", "tau_lo", "tau_hi",
  "tx", "ty", "tz", "nx", "ny", "nz", "bx", "by", "bz",
  "flags", "input_row",
] as const;

/** Meaning of each flag bit (src/types.ts). */
export const FLAG_MEANINGS: readonly (readonly [number, string])[] = [
  [FLAG_TORSION_UNDEFINED, "torsion undefined: curvature not resolved from 0 (tau NaN, Frenet n and b undefined)"],
  [FLAG_FRAME_TRANSPORTED, "n and b from the twist-free (parallel-transport) frame"],
  [FLAG_END, "within one resolution length of an open end (larger bias)"],
  [FLAG_TORSION_NOT_MEASURABLE, "torsion not measurable (planar projection)"],
  [FLAG_BIAS, "smoothing bias comparable to the band (feature near the resolution length): the band may under-cover"],
];

/** The line every profile output carries: what the numbers are, and are not. */
export const ESTIMATE_NOTE =
  "model estimates from a smoothing-spline fit of a traced centre line, not measurements; bands are 95% bootstrap intervals";

/**
 * The profile's columns in {@link PROFILE_COLUMNS} order, scaled to `unit`: lengths times the exact
 * integer PER_METRE[unit], curvature and torsion divided by it; frame vectors split into components.
 * Cost: O(n) copies (none for metres).
 * @throws {Error} when a column's length does not match `profile.n` (a bug upstream, not bad input).
 */
export function profileColumns(profile: Profile, unit: LengthUnit): ArrayLike<number>[] {
  const n = profile.n;
  const k = PER_METRE[unit];
  const check = (name: string, a: ArrayLike<number>, size: number): void => {
    if (a.length !== size) throw new Error(`profile column ${name} has ${a.length} entries, expected ${size} (n = ${n})`);
  };
  const length = (a: Float64Array, name: string): Float64Array => {
    check(name, a, n);
    return k === 1 ? a : a.map((v) => v * k);
  };
  const inverse = (a: Float64Array, name: string): Float64Array => {
    check(name, a, n);
    return k === 1 ? a : a.map((v) => v / k);
  };
  const component = (a: Float64Array, c: number, name: string): Float64Array => {
    check(name, a, 3 * n);
    const out = new Float64Array(n);
    for (let i = 0; i < n; ++i) out[i] = a[3 * i + c];
    return out;
  };
  check("flags", profile.flags, n);
  return [
    length(profile.s, "s"), length(profile.x, "x"), length(profile.y, "y"), length(profile.z, "z"),
    inverse(profile.kappa, "kappa"), inverse(profile.kappaLo, "kappaLo"), inverse(profile.kappaHi, "kappaHi"),
    inverse(profile.tau, "tau"), inverse(profile.tauLo, "tauLo"), inverse(profile.tauHi, "tauHi"),
    component(profile.T, 0, "T"), component(profile.T, 1, "T"), component(profile.T, 2, "T"),
    component(profile.N, 0, "N"), component(profile.N, 1, "N"), component(profile.N, 2, "N"),
    component(profile.B, 0, "B"), component(profile.B, 1, "B"), component(profile.B, 2, "B"),
    profile.flags,
    inputRows(profile),
  ];
}

/** The input row of each sample (Trace.rows: a text file's line, a JSON point's number), NaN where none. */
function inputRows(profile: Profile): Float64Array {
  const out = new Float64Array(profile.n).fill(NaN);
  const rows = profile.inputRow;
  if (rows && rows.length === profile.n) for (let i = 0; i < profile.n; ++i) if (rows[i] >= 0) out[i] = rows[i];
  return out;
}

/** Scalar facts about a profile, lengths in `unit`. Nothing here is invented: all comes from the profile or the options. */
export interface ProfileFacts {
  readonly tool: string;
  readonly version: string;
  readonly unit: LengthUnit;
  readonly sourceFile: string;
  readonly sourceUnit: string;
  /** Pixel size in `unit`, when the input was in pixels. */
  readonly pixelSize?: number;
  readonly closed: boolean;
  readonly n: number;
  readonly length: number;
  readonly sigma: number;
  readonly lambda: number;
  readonly lambdaTorsion: number;
  readonly edf: number;
  readonly resolution: number;
  readonly replicates: number;
  readonly seed?: number;
  readonly planarProjection: boolean;
  readonly outliers: readonly number[];
  /** Input rows left out before the fit, and down-weighted by it. */
  readonly droppedRows: readonly number[];
  readonly downweightedRows: readonly number[];
  readonly diagnostics: readonly string[];
}

/**
 * The scalar facts a writer states, in the output unit (`options.unit`, else the default for the
 * source). `where` names the calling writer in errors.
 * @throws {ParameterError} an output unit that is not a length unit, or a non-finite seed.
 */
export function profileFacts(profile: Profile, options: ProfileWriteOptions, where: string): ProfileFacts {
  const unit = resolveOutputUnit(options.unit, profile.source, where);
  if (options.seed !== undefined && !Number.isFinite(options.seed)) {
    throw new ParameterError(where, "seed", `must be a finite number (got ${options.seed})`);
  }
  const k = PER_METRE[unit];
  const facts: { -readonly [K in keyof ProfileFacts]: ProfileFacts[K] } = {
    tool: TOOL_NAME,
    version: TOOL_VERSION,
    unit,
    sourceFile: profile.source.file,
    sourceUnit: profile.source.unit,
    closed: profile.closed,
    n: profile.n,
    length: profile.length * k,
    sigma: profile.sigma * k,
    lambda: profile.lambda,
    lambdaTorsion: profile.lambdaTorsion,
    edf: profile.edf,
    resolution: profile.resolution * k,
    replicates: profile.replicates,
    planarProjection: profile.planarProjection,
    outliers: profile.outliers,
    droppedRows: profile.droppedRows ?? [],
    downweightedRows: profile.downweightedRows ?? [],
    diagnostics: profile.diagnostics,
  };
  if (profile.source.pixelSize !== undefined) facts.pixelSize = profile.source.pixelSize * k;
  if (options.seed !== undefined) facts.seed = options.seed;
  return facts;
}

/** A string from a file or a diagnostic, made safe for one comment line. */
export function oneLine(text: string): string {
  return text.replace(/[\r\n\u2028\u2029]+/g, " ");
}
