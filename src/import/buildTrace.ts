/**
 * The last step every ordered-trace reader shares: unit resolution and conversion to metres,
 * removal of consecutive duplicate points, an explicit closing point, and the minimum size.
 */
import { InputError } from "../errors.js";
import { PER_METRE, type InputUnit, type Source, type Trace } from "../types.js";
import { DEFAULT_INPUT_UNIT, type TraceReadOptions } from "./types.js";
import { orderCloud } from "./cloud/orderCloud.js";
import { orderStats, outOfOrder, regularTurning } from "./orderCheck.js";

/** Fewest distinct points a trace may have (a quintic fit needs a few more; it says so itself). */
export const MIN_TRACE_POINTS = 4;

/** Points closer to their predecessor than this fraction of the median step count as duplicates. */
export const DUPLICATE_REL_TOL = 1e-9;

/** What a reader found in the file, before units and repairs. */
export interface RawTrace {
  /** Coordinates in the file's unit, interleaved x, y, z (z = 0 for 2D); only the first 3 * count are read. */
  readonly values: Float64Array;
  readonly count: number;
  readonly dims: 2 | 3;
  /**
   * 1-based line of each point, for messages ("line 12"). Without it, points are named by index
   * into the file's `points` array ("points[12]").
   */
  readonly lines?: Int32Array;
  /** What the file itself says. `line` is where the unit was declared (null: no line, e.g. JSON). */
  readonly declared: {
    readonly unit?: { readonly value: InputUnit; readonly line: number | null };
    readonly pixelSize?: number;
    readonly closed?: boolean;
    readonly planarProjection?: boolean;
  };
  /** Notes the reader already made (ignored columns and the like). */
  readonly diagnostics?: readonly string[];
}

/**
 * `buildTrace`'s options: those of every reader, plus `orderCheck: false` for points that are read
 * as an unordered cloud (`--format cloud` on text), which the cloud orderer puts in order itself:
 * the ordered-trace order check and its note ("read the file with --format cloud") mean nothing there.
 */
export interface BuildTraceOptions extends TraceReadOptions {
  readonly orderCheck?: boolean;
}

const MAX_LISTED = 10;

/**
 * The lower median (element (m - 1) >> 1 in sorted order) of `a`, which it reorders in place.
 * Hoare's quickselect (Hoare 1961, CACM 4:321, "Algorithm 65: find"), middle pivot: O(m) expected.
 */
function lowerMedian(a: Float64Array): number {
  const k = (a.length - 1) >> 1;
  let lo = 0, hi = a.length - 1;
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1];
    let i = lo, j = hi;
    while (i <= j) {
      while (a[i] < pivot) ++i;
      while (a[j] > pivot) --j;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        ++i;
        --j;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else break;
  }
  return a[k];
}

function listPlaces(places: readonly string[], lines: boolean): string {
  const shown = places.slice(0, MAX_LISTED).join(", ");
  const more = places.length > MAX_LISTED ? `, and ${places.length - MAX_LISTED} more` : "";
  if (!lines) return `${shown}${more}`;
  return `${places.length === 1 ? "line" : "lines"} ${shown}${more}`;
}

/**
 * Turns what a reader found into a `Trace` in metres.
 *
 * - Unit: the file's declaration, else `options.unit`, else "nm"; if both are given they must agree.
 *   Lengths are divided by the exact integer `PER_METRE[unit]` (so 3 A gives 3 / 1e10, correctly
 *   rounded); pixels are multiplied by the pixel size (m), which "px" requires and other units refuse.
 * - Duplicates: a point equal to the last kept one, or closer to it than 1e-9 x the median non-zero
 *   step (the lower median for an even count), is dropped and reported in `diagnostics` with its line (or index).
 * - Closing point: a last point that repeats the first is dropped; the trace is then closed unless
 *   the caller said open (then the point is kept).
 * - `closed`: the caller's option, else the file's, else undefined (the fit decides).
 * - Order: points out of order along the wire are reordered or refused (`checkOrder`), unless
 *   `orderCheck` is false (a cloud, ordered by its reader).
 *
 * Cost: O(n), with an O(n) expected quickselect for the median step.
 * @throws {InputError} conflicting or missing unit / pixel size, or fewer than 4 distinct points.
 */
export function buildTrace(raw: RawTrace, file: string, options: BuildTraceOptions = {}): Trace {
  const declaredUnit = raw.declared.unit;
  if (declaredUnit !== undefined && options.unit !== undefined && declaredUnit.value !== options.unit) {
    throw new InputError(
      file,
      declaredUnit.line,
      "unit",
      `the file declares "${declaredUnit.value}" but "${options.unit}" was asked for`,
    );
  }
  const unit: InputUnit = declaredUnit?.value ?? options.unit ?? DEFAULT_INPUT_UNIT;

  const filePixel = raw.declared.pixelSize;
  if (filePixel !== undefined && options.pixelSize !== undefined && filePixel !== options.pixelSize) {
    throw new InputError(
      file,
      null,
      "pixelSize",
      `the file declares ${filePixel} m but ${options.pixelSize} m was asked for`,
    );
  }
  const pixelSize = filePixel ?? options.pixelSize;
  if (pixelSize !== undefined && !(Number.isFinite(pixelSize) && pixelSize > 0)) {
    throw new InputError(file, null, "pixelSize", `must be a positive length in metres (got ${pixelSize})`);
  }
  if (unit === "px" && pixelSize === undefined) {
    throw new InputError(file, null, "pixelSize", 'unit "px" needs a pixel size (metres per pixel)');
  }
  if (unit !== "px" && pixelSize !== undefined) {
    throw new InputError(file, null, "pixelSize", `only applies to unit "px" (the unit is "${unit}")`);
  }

  const n = raw.count;
  const v = raw.values;
  const xyz = new Float64Array(3 * n);
  if (unit === "px") {
    const h = pixelSize as number;
    for (let k = 0; k < 3 * n; ++k) xyz[k] = v[k] * h;
  } else {
    const perMetre = PER_METRE[unit];
    for (let k = 0; k < 3 * n; ++k) xyz[k] = v[k] / perMetre;
  }

  const place = (i: number): string => (raw.lines ? String(raw.lines[i]) : `points[${i}]`);
  const diagnostics: string[] = [...(raw.diagnostics ?? [])];

  // The median non-zero step sets the duplicate tolerance (relative, so it works in any unit).
  // Squared lengths throughout: the order, and so the median, is the same. Differences are taken
  // over the largest coordinate, so their squares neither underflow (coordinates of 1e-200 m) nor
  // overflow.
  let big = 0;
  for (let k = 0; k < 3 * n; ++k) big = Math.max(big, Math.abs(xyz[k]));
  const inv = big > 0 ? 1 / big : 1;
  const steps2 = new Float64Array(Math.max(n - 1, 0));
  let nonZero = 0;
  for (let i = 1; i < n; ++i) {
    const j = 3 * i;
    const dx = (xyz[j] - xyz[j - 3]) * inv, dy = (xyz[j + 1] - xyz[j - 2]) * inv, dz = (xyz[j + 2] - xyz[j - 1]) * inv;
    const d2 = dx * dx + dy * dy + dz * dz;
    if (d2 > 0) steps2[nonZero++] = d2;
  }
  const median2 = nonZero > 0 ? lowerMedian(steps2.subarray(0, nonZero)) : 0;
  const tol2 = DUPLICATE_REL_TOL * DUPLICATE_REL_TOL * median2;

  const keep = new Uint8Array(n);
  const dropped: string[] = [];
  let kept = 0;
  let last = -1;
  for (let i = 0; i < n; ++i) {
    if (last >= 0) {
      const j = 3 * i, l = 3 * last;
      const dx = (xyz[j] - xyz[l]) * inv, dy = (xyz[j + 1] - xyz[l + 1]) * inv, dz = (xyz[j + 2] - xyz[l + 2]) * inv;
      const d2 = dx * dx + dy * dy + dz * dz;
      if (d2 === 0 || d2 < tol2) {
        dropped.push(place(i));
        continue;
      }
    }
    keep[i] = 1;
    last = i;
    ++kept;
  }
  if (dropped.length > 0) {
    const noun = dropped.length === 1 ? "point" : "points";
    diagnostics.push(`dropped ${dropped.length} consecutive duplicate ${noun} (${listPlaces(dropped, raw.lines !== undefined)})`);
  }

  let closed: boolean | undefined = options.closed ?? raw.declared.closed;
  let first = -1;
  for (let i = 0; i < n; ++i) if (keep[i]) { first = i; break; }
  if (kept > MIN_TRACE_POINTS && closed !== false) {
    const j = 3 * last, f = 3 * first;
    const dx = (xyz[j] - xyz[f]) * inv, dy = (xyz[j + 1] - xyz[f + 1]) * inv, dz = (xyz[j + 2] - xyz[f + 2]) * inv;
    const d2 = dx * dx + dy * dy + dz * dz;
    if (d2 === 0 || d2 < tol2) {
      keep[last] = 0;
      --kept;
      const where = raw.lines ? `line ${place(last)}` : place(last);
      diagnostics.push(
        closed === true
          ? `dropped the last point (${where}), which repeats the first`
          : `the last point (${where}) repeats the first: dropped it and treated the trace as closed`,
      );
      closed = true;
    }
  }

  if (kept < MIN_TRACE_POINTS) {
    const after = dropped.length > 0 ? ` after dropping ${dropped.length} ${dropped.length === 1 ? "duplicate" : "duplicates"}` : "";
    throw new InputError(file, null, "points", `need at least ${MIN_TRACE_POINTS} distinct points, got ${kept}${after}`);
  }

  let out = xyz;
  const rows = new Int32Array(kept);
  for (let i = 0, r = 0; i < n; ++i) if (keep[i]) rows[r++] = raw.lines ? raw.lines[i] : i + 1;
  if (kept < n) {
    out = new Float64Array(3 * kept);
    let o = 0;
    for (let i = 0; i < n; ++i) {
      if (!keep[i]) continue;
      out[o++] = xyz[3 * i];
      out[o++] = xyz[3 * i + 1];
      out[o++] = xyz[3 * i + 2];
    }
  }

  const source: Source = unit === "px" ? { file, unit, pixelSize: pixelSize as number } : { file, unit };
  const trace: {
    xyz: Float64Array; dims: 2 | 3; source: Source; diagnostics: readonly string[];
    closed?: boolean; planarProjection?: boolean; rows: Int32Array;
  } = { xyz: out, dims: raw.dims, source, diagnostics, rows };
  if (closed !== undefined) trace.closed = closed;
  if (raw.declared.planarProjection !== undefined) trace.planarProjection = raw.declared.planarProjection;
  return kept >= 6 && options.orderCheck !== false ? checkOrder(trace, file, unit, pixelSize) : trace;
}

/**
 * An ordered trace whose points are not in order (see `orderStats`) is reordered by the cloud
 * orderer when that ordering is unambiguous (no self-crossing or branch, few outliers, and the
 * result passes the same order test), with a diagnostic that says so; otherwise refused with the
 * measured ratios. Rows follow their points, so results still name the file's lines.
 */
function checkOrder(
  trace: { xyz: Float64Array; dims: 2 | 3; source: Source; diagnostics: readonly string[]; closed?: boolean; planarProjection?: boolean; rows: Int32Array },
  file: string, unit: InputUnit, pixelSize: number | undefined,
): Trace {
  const stats = orderStats(trace.xyz);
  if (!outOfOrder(stats)) return trace;
  const measured = `polyline ${stats.polylineOverTree.toFixed(0)}x its minimum spanning tree, median step ${stats.stepOverNeighbour.toFixed(0)}x the median nearest-neighbour distance; ordered traces stay below ${stats.limit.toFixed(1)}`;
  if (regularTurning(trace.xyz)) {
    const note = `order check: the points lie closer to other turns than to their neighbours in the file (${measured}), but they turn by nearly the same angle at every point (a coarse spiral or coil): kept in file order`;
    return { ...trace, diagnostics: [note, ...trace.diagnostics] };
  }
  let why: string;
  try {
    const r = orderCloud(trace.xyz, file, { unit, ...(pixelSize !== undefined ? { pixelSize } : {}), ...(trace.closed !== undefined ? { closed: trace.closed } : {}), dims: trace.dims });
    const after = orderStats(r.trace.xyz);
    if (r.outliers <= Math.max(1, 0.01 * (trace.xyz.length / 3)) && !outOfOrder(after) && after.polylineOverTree < 3) {
      const rows = Int32Array.from(r.order, (i) => trace.rows[i]);
      const note = `the points were not in order along the wire (${measured}): reordered them as an unordered cloud along ${r.closed ? "a closed" : "an open"} curve${r.outliers > 0 ? `, leaving out ${r.outliers} outlier(s)` : ""}; check the result, or read the file with --format cloud`;
      const out: { xyz: Float64Array; dims: 2 | 3; source: Source; diagnostics: readonly string[]; closed?: boolean; planarProjection?: boolean; rows: Int32Array; cloudOrder?: NonNullable<Trace["cloudOrder"]> } = {
        xyz: r.trace.xyz, dims: trace.dims, source: trace.source, diagnostics: [note, ...trace.diagnostics], rows, closed: r.closed,
      };
      if (r.trace.cloudOrder !== undefined) out.cloudOrder = r.trace.cloudOrder;
      if (trace.planarProjection !== undefined) out.planarProjection = trace.planarProjection;
      return out;
    }
    why = r.outliers > 0.01 * (trace.xyz.length / 3) ? `${r.outliers} points left out as outliers` : "the ordered result still jumps along the wire";
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    why = e.problem;
  }
  throw new InputError(file, null, "points", `the points are not in order along the wire (${measured}) and do not order unambiguously as a cloud (${why}); read them as an unordered cloud with --format cloud, or fix the order`);
}
