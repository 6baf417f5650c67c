/** Start of the general caution that every model run carries (physics stage wording). */
export const GENERAL_CAUTION_PREFIX = "model estimates, not measurements";

/** Input of {@link composeWarnings}. */
export interface WarningSources {
  /** Warnings of the physics stage (or the geometry-only note), in their order. */
  readonly model: readonly string[];
  /** Specific warnings of the export stage (sharp bends, thin-wire limit, torsion, resolution, spacing). */
  readonly specific: readonly string[];
  /** The wire is a closed loop (warnings about open ends do not apply). */
  readonly closed: boolean;
}

/** Is this the general caution rather than a finding about this wire? */
export function isGeneralCaution(w: string): boolean {
  return w.startsWith(GENERAL_CAUTION_PREFIX);
}

/**
 * The warnings list of model.json and the report: specific findings first (export stage, then the
 * model's), the general caution once at the end; nothing that does not apply to this wire (open-end
 * notes on a closed loop); no pointer to fields that are not written (a "see <field>" tail naming an
 * in-memory array such as the local gap profile is cut, since model.json does not carry it);
 * duplicates removed. Pure, O(total length).
 */
export function composeWarnings(src: WarningSources): string[] {
  const general: string[] = [];
  const specific: string[] = [];
  for (const w0 of [...src.specific, ...src.model]) {
    if (src.closed && /\bopen end\b/.test(w0)) continue;
    const w = w0.replace(/:\s*see gapProfile\.\w+\s*$/, "");
    (isGeneralCaution(w) ? general : specific).push(w);
  }
  return [...new Set([...specific, ...general.slice(0, 1)])];
}
