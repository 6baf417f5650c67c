import { escapeHtml } from "../escapeHtml.js";
import { axes, clampTo, linearScale, linePath, niceDomain, px, svgOpen, type Box } from "./plotFrame.js";
import type { ShadedStretch } from "./profilePlot.js";
import { KIND_STYLE } from "../kindStyle.js";

/** Input of {@link pinningPlot}; positions in the plot's length unit, energies reduced (K l area). */
export interface PinningPlotInput {
  readonly q: ArrayLike<number>;
  readonly energy: ArrayLike<number>;
  /** First-order estimate (NaN where there is none). */
  readonly firstOrder: ArrayLike<number>;
  /** Ranked sites (rank 1 deepest), position in the plot unit. */
  readonly sites: readonly { readonly rank: number; readonly s: number }[];
  readonly stretches: readonly ShadedStretch[];
  readonly xLabel: string;
  readonly sMin: number;
  readonly sMax: number;
}

export const PINNING_BOX: Box = { width: 760, height: 230, left: 66, right: 14, top: 24, bottom: 40 };

/** Most ranked sites labelled in the plot (all are in the table). */
export const LABELLED_SITES = 8;

/**
 * SVG of the wall-pinning landscape: the wall energy against the wall position (solid), the
 * first-order estimate where the model has one (dashed), stretches shaded behind, and the deepest
 * sites marked with their rank. Text escaped. Cost O(points).
 */
export function pinningPlot(p: PinningPlotInput): string {
  const box = PINNING_BOX;
  let e0 = Infinity, e1 = -Infinity;
  for (let i = 0; i < p.q.length; ++i) {
    for (const v of [p.energy[i], p.firstOrder[i]]) if (Number.isFinite(v)) { e0 = Math.min(e0, v); e1 = Math.max(e1, v); }
  }
  const has = e0 <= e1;
  const [ya, yb] = has ? niceDomain(e0, e1) : [0, 1];
  const x = linearScale(p.sMin, p.sMax > p.sMin ? p.sMax : p.sMin + 1, box.left, box.width - box.right);
  const y = linearScale(ya, yb, box.height - box.bottom, box.top);
  const out: string[] = [svgOpen(box, "pinning-plot", "wall-pinning landscape")];
  out.push(`<g class="stretches">`);
  for (const g of p.stretches) {
    const a = x(Math.max(p.sMin, g.s0)), b = x(Math.min(p.sMax, g.s1));
    out.push(`<rect x="${px(a)}" y="${px(box.top)}" width="${px(Math.max(0, b - a))}" height="${px(box.height - box.bottom - box.top)}" fill="${KIND_STYLE[g.kind].fill}"/>`);
    if (b - a > 18) out.push(`<text class="stretch-label" x="${px((a + b) / 2)}" y="${px(box.top - 5)}" text-anchor="middle">${escapeHtml(g.label)}</text>`);
  }
  out.push(`</g>`);
  out.push(axes(box, x, y, p.xLabel, "wall energy (units of K l area)"));
  out.push(`<path class="first-order" d="${linePath(p.q, Array.from(p.firstOrder, (v) => clampTo(y, v)), x, y)}"/>`);
  out.push(`<path class="estimate" d="${linePath(p.q, Array.from(p.energy, (v) => clampTo(y, v)), x, y)}"/>`);
  const at = (s: number): number => {
    let best = NaN, dist = Infinity;
    for (let i = 0; i < p.q.length; ++i) {
      const d = Math.abs(p.q[i] - s);
      if (d < dist && Number.isFinite(p.energy[i])) { dist = d; best = p.energy[i]; }
    }
    return best;
  };
  for (const site of p.sites.slice(0, LABELLED_SITES)) {
    const e = at(site.s);
    if (!Number.isFinite(e)) continue;
    const cx = x(site.s), cy = y(clampTo(y, e));
    out.push(`<g class="site"><circle cx="${px(cx)}" cy="${px(cy)}" r="7"/><text x="${px(cx)}" y="${px(cy + 3.5)}" text-anchor="middle">${site.rank}</text></g>`);
  }
  if (!has) out.push(`<text class="empty" x="${px(box.width / 2)}" y="${px(box.height / 2)}" text-anchor="middle">no landscape computed</text>`);
  out.push(`</svg>`);
  return out.join("");
}
