import type { Profile } from "../types.js";
import { jsonNumber } from "./formatNumber.js";
import { ESTIMATE_NOTE, FLAG_MEANINGS, PROFILE_COLUMNS, profileColumns, profileFacts } from "./profileTable.js";
import { chunksToText, rereadable, RowBuffer, type Chunks } from "./tableChunks.js";
import type { ProfileWriteOptions } from "./types.js";

/** `format` tag of the JSON profile document. */
export const PROFILE_JSON_FORMAT = "twistline-profile";
/** Version of the JSON profile layout; raised when a field changes meaning or goes away. */
export const PROFILE_JSON_VERSION = 1;

/**
 * Writes a curvature/torsion profile as a JSON document: the same content as {@link profileToCsv}.
 *
 * ```json
 * { "format": "twistline-profile", "formatVersion": 1, "tool": {...}, "note": "...",
 *   "unit": "nm", "curvatureUnit": "1/nm", "source": { "file", "unit", "pixelSize"? },
 *   "closed", "n", "length", "sigma", "lambda", "lambdaTorsion", "edf", "resolution",
 *   "bootstrap": { "replicates", "seed", "level": 0.95 }, "planarProjection", "outliers", "droppedRows", "downweightedRows",
 *   "flags": { "1": "...", ... }, "diagnostics": [...],
 *   "columns": { "s": [...], "x": [...], ..., "flags": [...] } }
 * ```
 * Lengths (also `pixelSize`, `sigma`, `resolution`) are in `unit`, kappa and tau in 1/unit.
 * Column names equal the CSV's. Numbers carry 12 significant digits; NaN becomes `null`
 * (JSON has no NaN); `seed` is null when not recorded.
 *
 * Cost: O(n). Each column is one line of the output.
 * @throws {ParameterError} an output unit that is not a length unit.
 */
export function profileToJson(profile: Profile, options: ProfileWriteOptions = {}): string {
  return chunksToText(profileJsonChunks(profile, options));
}

/**
 * {@link profileToJson} as a re-readable sequence of byte chunks (UTF-8): the same bytes, never one
 * string, for writing a profile of millions of samples chunk by chunk.
 * @throws {ParameterError} an output unit that is not a length unit.
 */
export function profileJsonChunks(profile: Profile, options: ProfileWriteOptions = {}): Chunks {
  const f = profileFacts(profile, options, "profileToJson");
  const source: { file: string; unit: string; pixelSize?: number | null } = { file: f.sourceFile, unit: f.sourceUnit };
  if (f.pixelSize !== undefined) source.pixelSize = jsonNumber(f.pixelSize);
  const meta = {
    format: PROFILE_JSON_FORMAT,
    formatVersion: PROFILE_JSON_VERSION,
    tool: { name: f.tool, version: f.version },
    note: ESTIMATE_NOTE,
    unit: f.unit,
    curvatureUnit: `1/${f.unit}`,
    source,
    closed: f.closed,
    n: f.n,
    length: jsonNumber(f.length),
    sigma: jsonNumber(f.sigma),
    lambda: jsonNumber(f.lambda),
    lambdaTorsion: jsonNumber(f.lambdaTorsion),
    edf: jsonNumber(f.edf),
    resolution: jsonNumber(f.resolution),
    bootstrap: { replicates: f.replicates, seed: f.seed ?? null, level: 0.95 },
    planarProjection: f.planarProjection,
    outliers: f.outliers,
    droppedRows: f.droppedRows,
    downweightedRows: f.downweightedRows,
    flags: Object.fromEntries(FLAG_MEANINGS.map(([bit, meaning]) => [String(bit), meaning])),
    diagnostics: f.diagnostics,
  };
  const head = JSON.stringify(meta, null, 2);
  const columns = profileColumns(profile, f.unit);
  const opening = new TextEncoder().encode(`${head.slice(0, head.length - 2)},\n  "columns": {\n`);
  return rereadable(function* body() {
    yield opening;
    // numbers as jsonNumber gives them (12 significant digits, shortest form), null for NaN and infinities
    const out = new RowBuffer(64, "null");
    for (let c = 0; c < PROFILE_COLUMNS.length; ++c) {
      out.text(`    ${JSON.stringify(PROFILE_COLUMNS[c])}: [`);
      const col = columns[c];
      for (let i = 0; i < col.length; ++i) {
        out.num(col[i], i === col.length - 1 ? 0 : 44);
        if (out.full()) yield out.take();
      }
      out.text(c === PROFILE_COLUMNS.length - 1 ? "]\n" : "],\n");
    }
    out.text("  }\n}\n");
    yield out.take();
  });
}
