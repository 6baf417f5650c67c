import type { Profile } from "../types.js";
import { formatNumber } from "./formatNumber.js";
import { ESTIMATE_NOTE, FLAG_MEANINGS, oneLine, PROFILE_COLUMNS, profileColumns, profileFacts } from "./profileTable.js";
import { chunksToText, rereadable, RowBuffer, rowBytes, type Chunks } from "./tableChunks.js";
import type { ProfileWriteOptions } from "./types.js";

const MAX_LISTED_OUTLIERS = 50;

/**
 * Writes a curvature/torsion profile as CSV text.
 *
 * Layout: `#` comment lines first (tool and version, a note that these are model estimates, source
 * file and unit, output unit, closed, sample count, length, noise sigma, smoothing lambda (and the
 * torsion estimate's), edf,
 * resolution length, bootstrap replicates and seed, planar projection, outliers, flag meanings,
 * one line per diagnostic), then the header row
 * `s,x,y,z,kappa,kappa_lo,kappa_hi,tau,tau_lo,tau_hi,tx,ty,tz,nx,ny,nz,bx,by,bz,flags,input_row`
 * and one row per sample (`input_row`: the input file's line, or a JSON point's number, that the
 * sample comes from; NaN for resampled samples; s starts at 0). Lengths are in the output unit, kappa and tau (and their 95% bands) in
 * 1/unit, t n b are unit vectors, flags the bit set of src/types.ts. Numbers carry 12 significant
 * digits in shortest form; undefined values are `NaN`. Line ends are `\n`.
 *
 * Units: `options.unit` (default: the input's unit; for pixels, see defaultOutputUnit).
 * Cost: O(n), about 20 numbers per sample; see {@link profileCsvChunks} for tables too long for one string.
 * @throws {ParameterError} an output unit that is not a length unit.
 * @example profileToCsv(profile, { unit: "nm", seed: 1 }).split("\n").find((l) => !l.startsWith("#")) // "s,x,y,z,kappa,..."
 */
export function profileToCsv(profile: Profile, options: ProfileWriteOptions = {}): string {
  return chunksToText(profileCsvChunks(profile, options));
}

/**
 * {@link profileToCsv} as a re-readable sequence of byte chunks (UTF-8), for writing to a file
 * chunk by chunk: the same bytes, never one string, memory one chunk (256 KiB) beyond the profile.
 * Options are checked at once, before the first chunk is asked for.
 * @throws {ParameterError} an output unit that is not a length unit.
 */
export function profileCsvChunks(profile: Profile, options: ProfileWriteOptions = {}): Chunks {
  const f = profileFacts(profile, options, "profileToCsv");
  const u = f.unit;
  const lines: string[] = [];
  lines.push(`# ${f.tool} ${f.version}: curvature and torsion profile`);
  lines.push(`# note: ${ESTIMATE_NOTE}`);
  const pixel = f.pixelSize !== undefined ? `, pixel size ${formatNumber(f.pixelSize)} ${u}` : "";
  lines.push(`# source: ${oneLine(f.sourceFile)} (unit ${f.sourceUnit}${pixel})`);
  lines.push(`# unit: ${u} (s x y z in ${u}; kappa tau and their bands in 1/${u}; t n b unit vectors)`);
  lines.push(`# closed: ${f.closed}`);
  lines.push(`# samples: ${f.n}`);
  lines.push(`# length: ${formatNumber(f.length)} ${u}`);
  lines.push(`# noise sigma: ${formatNumber(f.sigma)} ${u} (estimated, per coordinate)`);
  lines.push(`# smoothing lambda: ${formatNumber(f.lambda)} (dimensionless)`);
  lines.push(`# torsion smoothing lambda: ${formatNumber(f.lambdaTorsion)} (dimensionless)`);
  lines.push(`# edf: ${formatNumber(f.edf)} (effective degrees of freedom per coordinate)`);
  lines.push(`# resolution: ${formatNumber(f.resolution)} ${u} (shortest length scale the fit resolves)`);
  const seed = f.seed !== undefined ? `seed ${f.seed}` : "seed not recorded";
  lines.push(`# bootstrap: ${f.replicates} replicates, ${seed}`);
  lines.push(`# planar projection: ${f.planarProjection}`);
  const listed = f.outliers.slice(0, MAX_LISTED_OUTLIERS).join(" ");
  const more = f.outliers.length > MAX_LISTED_OUTLIERS ? ` and ${f.outliers.length - MAX_LISTED_OUTLIERS} more` : "";
  lines.push(`# outliers: ${f.outliers.length}${f.outliers.length > 0 ? ` (input point indices from 0: ${listed}${more})` : ""}`);
  const rowList = (rows: readonly number[]) => `${rows.length}${rows.length > 0 ? ` (${rows.slice(0, MAX_LISTED_OUTLIERS).join(" ")}${rows.length > MAX_LISTED_OUTLIERS ? ` and ${rows.length - MAX_LISTED_OUTLIERS} more` : ""})` : ""}`;
  lines.push(`# dropped rows: ${rowList(f.droppedRows)} (gross outliers left out before the fit; input_row numbering)`);
  lines.push(`# down-weighted rows: ${rowList(f.downweightedRows)} (robust weight below 0.5)`);
  for (const [bit, meaning] of FLAG_MEANINGS) lines.push(`# flag ${bit}: ${meaning}`);
  for (const d of f.diagnostics) lines.push(`# diagnostic: ${oneLine(d)}`);
  lines.push(PROFILE_COLUMNS.join(","));
  const head = new TextEncoder().encode(`${lines.join("\n")}\n`);
  const columns = profileColumns(profile, u);
  return rereadable(function* rows() {
    yield head;
    const width = columns.length;
    const out = new RowBuffer(rowBytes(width), "NaN");
    for (let i = 0; i < f.n; ++i) {
      for (let c = 0; c < width; ++c) out.num(columns[c][i], c === width - 1 ? 10 : 44);
      if (out.full()) yield out.take();
    }
    if (out.size > 0) yield out.take();
  });
}
