import { escapeHtml } from "../escapeHtml.js";
import { KIND_STYLE } from "../kindStyle.js";
import { axes, linearScale, niceDomain, px, svgOpen, type Box } from "./plotFrame.js";
import type { ShadedStretch } from "./profilePlot.js";

/** Magnon gaps of one stretch in reduced frequency (units of c/l); null where not computed. */
export interface MagnonStretch {
  readonly label: string;
  readonly s0: number;
  readonly s1: number;
  readonly lower0: number | null;
  readonly upper0: number | null;
  readonly lowerMin: number | null;
  readonly depth: number | null;
  readonly unstable: boolean;
}

/** Input of {@link magnonPanel}; positions in the plot's length unit. */
export interface MagnonPanelInput {
  readonly stretches: readonly MagnonStretch[];
  readonly shading: readonly ShadedStretch[];
  /** Levels of a closed ring (reduced frequencies), drawn in a column at the right; null when none. */
  readonly ringLevels: readonly { readonly j: number; readonly lower: number | null; readonly upper: number | null }[] | null;
  readonly xLabel: string;
  readonly sMin: number;
  readonly sMax: number;
}

export const MAGNON_BOX: Box = { width: 760, height: 250, left: 66, right: 96, top: 24, bottom: 40 };

const ok = (v: number | null): v is number => v !== null && Number.isFinite(v);

/**
 * SVG of the antiferromagnet's magnon gaps along the wire: per stretch, the two branches at k = 0
 * (upper: solid dark, lower: solid teal) and the bottom of the lower branch where it dips below its
 * k = 0 value (dashed, with the depth marked by an arrow), stretches shaded behind; a stretch whose
 * homogeneous state is unstable is marked "unstable" instead (no gap). With ring levels (a closed
 * ring made of one arc) their lower and upper levels j = 0, 1, ... are ticked in a column at the
 * right. Reduced frequencies (units of c/l), y from 0 with 8% headroom. Text escaped. Cost O(stretches + levels).
 */
export function magnonPanel(p: MagnonPanelInput): string {
  const box = MAGNON_BOX;
  let top = 0;
  for (const g of p.stretches) for (const v of [g.lower0, g.upper0]) if (ok(v)) top = Math.max(top, v);
  for (const r of p.ringLevels ?? []) for (const v of [r.lower, r.upper]) if (ok(v)) top = Math.max(top, v);
  const [, yMax] = niceDomain(0, top > 0 ? 1.08 * top : 1);
  const x = linearScale(p.sMin, p.sMax > p.sMin ? p.sMax : p.sMin + 1, box.left, box.width - box.right);
  const y = linearScale(0, yMax, box.height - box.bottom, box.top);
  const out: string[] = [svgOpen(box, "magnon-panel", "antiferromagnet magnon gaps along the wire")];
  out.push(`<g class="stretches">`);
  for (const g of p.shading) {
    const a = x(Math.max(p.sMin, g.s0)), b = x(Math.min(p.sMax, g.s1));
    out.push(`<rect x="${px(a)}" y="${px(box.top)}" width="${px(Math.max(0, b - a))}" height="${px(box.height - box.bottom - box.top)}" fill="${KIND_STYLE[g.kind].fill}"/>`);
    if (b - a > 18) out.push(`<text class="stretch-label" x="${px((a + b) / 2)}" y="${px(box.top - 5)}" text-anchor="middle">${escapeHtml(g.label)}</text>`);
  }
  out.push(`</g>`);
  out.push(axes(box, x, y, p.xLabel, "frequency (units of c/l)"));
  out.push(`<g class="magnons">`);
  for (const g of p.stretches) {
    const a = x(Math.max(p.sMin, g.s0)) + 2, b = x(Math.min(p.sMax, g.s1)) - 2;
    if (!(b > a)) continue;
    if (g.unstable) {
      out.push(`<text class="note" x="${px((a + b) / 2)}" y="${px(y(0) - 6)}" text-anchor="middle">unstable</text>`);
      continue;
    }
    if (ok(g.upper0)) out.push(`<line class="upper" x1="${px(a)}" x2="${px(b)}" y1="${px(y(g.upper0))}" y2="${px(y(g.upper0))}"/>`);
    if (ok(g.lower0)) out.push(`<line class="lower" x1="${px(a)}" x2="${px(b)}" y1="${px(y(g.lower0))}" y2="${px(y(g.lower0))}"/>`);
    if (ok(g.lowerMin) && ok(g.lower0) && ok(g.depth) && g.depth > 0) {
      const m = (a + b) / 2;
      out.push(`<line class="dip" x1="${px(a)}" x2="${px(b)}" y1="${px(y(g.lowerMin))}" y2="${px(y(g.lowerMin))}"/>`);
      out.push(`<line class="depth" x1="${px(m)}" x2="${px(m)}" y1="${px(y(g.lower0))}" y2="${px(y(g.lowerMin))}" marker-end="url(#magnon-arrow)"/>`);
    }
  }
  out.push(`</g>`);
  out.push(`<defs><marker id="magnon-arrow" viewBox="0 0 6 6" refX="3" refY="6" markerWidth="6" markerHeight="6" orient="auto-start-reverse"><path d="M0 0L3 6L6 0Z" fill="#1d232b"/></marker></defs>`);
  if (p.ringLevels !== null && p.ringLevels.length > 0) {
    const cx = box.width - box.right + 22;
    out.push(`<g class="ring-levels"><text class="note" x="${px(cx + 20)}" y="${px(box.top - 5)}" text-anchor="middle">ring levels</text>`);
    for (const r of p.ringLevels) {
      for (const [v, cls] of [[r.lower, "lower"], [r.upper, "upper"]] as const) {
        if (!ok(v) || v > yMax) continue;
        out.push(`<line class="${cls}" x1="${px(cx)}" x2="${px(cx + 16)}" y1="${px(y(v))}" y2="${px(y(v))}"/>`);
      }
      if (ok(r.lower) && r.lower <= yMax) out.push(`<text class="note" x="${px(cx + 20)}" y="${px(y(r.lower) + 3.5)}">j=${r.j}</text>`);
    }
    out.push(`</g>`);
  }
  out.push(`</svg>`);
  return out.join("");
}
