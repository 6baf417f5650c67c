import { formatNumber } from "./formatNumber.js";
import { oneLine } from "./profileTable.js";
import { TOOL_NAME, TOOL_VERSION } from "./version.js";
import type { WireSummary } from "./wireSummary.js";

/** One row of a batch: the wire's folder and input, and either its summary or the error that stopped it. */
export interface SummaryRow {
  readonly wire: string;
  readonly file: string;
  readonly summary: WireSummary | null;
  /** One-line error when the wire failed (then `summary` is null). */
  readonly error: string | null;
  /** Wall time of the wire (s). */
  readonly seconds: number;
}

/** Columns of summary.csv, in order. */
export const SUMMARY_COLUMNS = [
  "wire", "file", "status", "error", "unit", "points", "length", "closed", "resolution",
  "kappa_mean", "kappa_mean_lo", "kappa_mean_hi", "kappa_max", "kappa_max_lo", "kappa_max_hi",
  "tau_mean", "tau_mean_lo", "tau_mean_hi", "tau_abs_mean", "tau_abs_mean_lo", "tau_abs_mean_hi", "tau_max_abs", "tau_max_abs_lo", "tau_max_abs_hi",
  "stretches_straight", "stretches_arc", "stretches_helix", "stretches_irregular",
  "pinning_sites", "deepest_pin_kT", "metastable_length", "periodic_length", "warnings", "seconds",
] as const;

/** A CSV field: quoted when it holds a comma, quote or line break (RFC 4180). */
export function csvField(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * summary.csv of a batch: `#` comment lines (tool, note, units, column meanings), the header
 * {@link SUMMARY_COLUMNS}, one row per wire in the order given. A failed wire has status "error",
 * its one-line message in `error`, and empty numeric fields. Lengths are in each row's `unit`
 * (the wire's output unit), kappa and tau in 1/unit; bands are 95% bootstrap intervals; warnings
 * are joined with " | ". Text fields are quoted per RFC 4180 (https://www.rfc-editor.org/rfc/rfc4180).
 * Cost O(rows).
 */
export function summaryToCsv(rows: readonly SummaryRow[]): string {
  const lines = [
    `# ${TOOL_NAME} ${TOOL_VERSION}: batch summary, one row per wire`,
    "# note: model estimates, not measurements; bands (_lo, _hi) are 95% bootstrap intervals of the statistic, centred on the estimate (each contains it)",
    "# units: lengths (length, resolution, metastable_length, periodic_length) in the row's unit; kappa and tau in 1/unit; deepest_pin_kT in k_B T; seconds of wall time",
    "# kappa_mean, tau_mean, tau_abs_mean: arc-length weighted means (tau_abs_mean of |torsion|, not |tau_mean|); kappa_max: maximum curvature; tau_max_abs: maximum |torsion| (undefined torsion skipped)",
    "# stretches_*: stretches of each kind; pinning_sites, deepest_pin_kT, metastable_length, periodic_length: empty without a material",
    SUMMARY_COLUMNS.join(","),
  ];
  const f = (v: number | null | undefined): string => (v === null || v === undefined ? "" : formatNumber(v));
  for (const r of rows) {
    const s = r.summary;
    const base = [csvField(r.wire), csvField(r.file), s !== null ? "ok" : "error", csvField(oneLine(r.error ?? ""))];
    if (s === null) {
      lines.push([...base, ...new Array<string>(SUMMARY_COLUMNS.length - base.length - 1).fill(""), f(r.seconds)].join(","));
      continue;
    }
    lines.push([
      ...base, s.unit, String(s.points), f(s.length), String(s.closed), f(s.resolution),
      f(s.kappaMean.value), f(s.kappaMean.lo), f(s.kappaMean.hi), f(s.kappaMax.value), f(s.kappaMax.lo), f(s.kappaMax.hi),
      f(s.tauMean.value), f(s.tauMean.lo), f(s.tauMean.hi), f(s.tauAbsMean.value), f(s.tauAbsMean.lo), f(s.tauAbsMean.hi), f(s.tauMaxAbs.value), f(s.tauMaxAbs.lo), f(s.tauMaxAbs.hi),
      String(s.stretches.straight), String(s.stretches.arc), String(s.stretches.helix), String(s.stretches.irregular),
      f(s.pinningSites), f(s.deepestPinKT), f(s.metastableLength), f(s.periodicLength),
      csvField(s.warnings.map(oneLine).join(" | ")), f(r.seconds),
    ].join(","));
  }
  return `${lines.join("\n")}\n`;
}
