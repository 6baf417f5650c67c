import { escapeHtml } from "../escapeHtml.js";
import { KIND_STYLE } from "../kindStyle.js";
import { axes, bandPath, clampTo, decimate, linearScale, linePath, niceDomain, px, svgOpen, type Box } from "./plotFrame.js";

/** A stretch to shade behind a profile plot (lengths in the plot's unit). */
export interface ShadedStretch {
  readonly s0: number;
  readonly s1: number;
  readonly kind: "straight" | "arc" | "helix" | "irregular";
  /** Label drawn in the strip above the plot, e.g. "2 H". */
  readonly label: string;
}

/** A stretch of samples to mark along the s axis: near an open end, or where the smoothing bias is comparable to the band. */
export interface Zone {
  readonly s0: number;
  readonly s1: number;
  readonly kind: "end" | "bias" | "junction";
}

/** Input of {@link profilePlot}: one quantity along the wire with its 95% band. */
export interface ProfilePlotInput {
  readonly id: string;
  readonly title: string;
  readonly s: ArrayLike<number>;
  readonly value: ArrayLike<number>;
  readonly lo: ArrayLike<number>;
  readonly hi: ArrayLike<number>;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly stretches: readonly ShadedStretch[];
  /** Draw a zero line (torsion). */
  readonly zeroLine?: boolean;
  /** Force the y domain to include 0 (curvature). */
  readonly fromZero?: boolean;
  /** Half-height of the y range when the values do not span one (e.g. torsion 0 everywhere on a planar wire). */
  readonly fallbackSpan?: number;
  /** Zones marked by a strip along the bottom of the plot and a light shade over its height. */
  readonly zones?: readonly Zone[];
  /** Extra labelled vertical markers (s, label), e.g. pinning sites. */
  readonly markers?: readonly { readonly s: number; readonly label: string }[];
}

export const PROFILE_BOX: Box = { width: 760, height: 230, left: 66, right: 14, top: 24, bottom: 40 };

/**
 * SVG of a quantity along the wire: the 95% band (filled), the estimate (line, broken where
 * undefined), stretches shaded by kind with their numbers in a strip above. The y range covers the
 * estimate and the band, clipped to 3x the estimate's range so one wild band edge at an open end
 * does not flatten the plot (clipped edges are drawn at the border). All text escaped.
 * Cost: O(n), at most 1500 plotted points.
 */
export function profilePlot(p: ProfilePlotInput): string {
  const box = PROFILE_BOX;
  const d = decimate(p.s, [p.value], [p.lo], [p.hi]);
  const xs = d.x, v = d.series[0], lo = d.lows[0], hi = d.highs[0];
  let vMin = Infinity, vMax = -Infinity, bMin = Infinity, bMax = -Infinity, sMin = Infinity, sMax = -Infinity;
  for (let i = 0; i < xs.length; ++i) {
    if (Number.isFinite(xs[i])) { sMin = Math.min(sMin, xs[i]); sMax = Math.max(sMax, xs[i]); }
    if (Number.isFinite(v[i])) { vMin = Math.min(vMin, v[i]); vMax = Math.max(vMax, v[i]); }
    if (Number.isFinite(lo[i])) bMin = Math.min(bMin, lo[i]);
    if (Number.isFinite(hi[i])) bMax = Math.max(bMax, hi[i]);
  }
  for (const g of p.stretches) { sMin = Math.min(sMin, g.s0); sMax = Math.max(sMax, g.s1); }
  const hasData = vMin <= vMax;
  if (!hasData) { vMin = 0; vMax = 1; }
  let range = Math.max(vMax - vMin, Math.abs(vMax), Math.abs(vMin));
  if (!(range > 0)) {
    // constant values (torsion 0 on a planar wire): a range set by the caller instead of float noise
    range = p.fallbackSpan !== undefined && p.fallbackSpan > 0 ? p.fallbackSpan : 1;
    vMin -= range; vMax += range;
    bMin = Math.max(bMin, vMin); bMax = Math.min(bMax, vMax);
  }
  let y0 = Math.max(Math.min(vMin, bMin), vMin - 1.5 * range);
  let y1 = Math.min(Math.max(vMax, bMax), vMax + 1.5 * range);
  // headroom: 6% of the span above (and below unless pinned at 0), so the curve never rides the frame
  const pad = 0.06 * (y1 - y0 || range);
  y1 += pad;
  if (!p.fromZero || y0 < 0) y0 -= pad;
  if (p.fromZero) y0 = Math.min(0, y0);
  if (p.zeroLine) { y0 = Math.min(y0, 0); y1 = Math.max(y1, 0); }
  const [ya, yb] = niceDomain(y0, y1);
  // arc length is measured from the start of the fitted curve: the axis starts at 0
  const [xa, xb] = sMin < sMax ? [Math.min(0, sMin), sMax] : [0, 1];
  const x = linearScale(xa, xb, box.left, box.width - box.right);
  const y = linearScale(ya, yb, box.height - box.bottom, box.top);
  const out: string[] = [svgOpen(box, p.id, p.title)];
  // stretch shading and labels
  out.push(`<g class="stretches">`);
  for (const g of p.stretches) {
    const st = KIND_STYLE[g.kind];
    const a = x(Math.max(xa, g.s0)), b = x(Math.min(xb, g.s1));
    out.push(`<rect class="kind-${g.kind}" x="${px(a)}" y="${px(box.top)}" width="${px(Math.max(0, b - a))}" height="${px(box.height - box.bottom - box.top)}" fill="${st.fill}"/>`);
    out.push(`<line x1="${px(a)}" x2="${px(a)}" y1="${px(box.top - 14)}" y2="${px(box.height - box.bottom)}" class="cut"/>`);
    if (b - a > 18) out.push(`<text class="stretch-label" x="${px((a + b) / 2)}" y="${px(box.top - 5)}" text-anchor="middle">${escapeHtml(g.label)}</text>`);
  }
  out.push(`</g>`);
  const zoneTop = box.top, zoneBottom = box.height - box.bottom;
  if ((p.zones ?? []).length > 0) {
    out.push(`<g class="zones">`);
    for (const z of p.zones ?? []) {
      const a = x(Math.max(xa, z.s0)), b = x(Math.min(xb, z.s1));
      if (!(b > a)) continue;
      out.push(`<rect class="${z.kind}-zone" x="${px(a)}" y="${px(zoneTop)}" width="${px(Math.max(1, b - a))}" height="${px(zoneBottom - zoneTop)}"/>`);
    }
    out.push(`</g>`);
  }
  out.push(axes(box, x, y, p.xLabel, p.yLabel));
  if (p.zeroLine && ya < 0 && yb > 0) out.push(`<line class="zero" x1="${px(box.left)}" x2="${px(box.width - box.right)}" y1="${px(y(0))}" y2="${px(y(0))}"/>`);
  const cl = (a: Float64Array) => a.map((t) => clampTo(y, t));
  out.push(`<path class="band" d="${bandPath(xs, cl(lo), cl(hi), x, y)}"/>`);
  out.push(`<path class="estimate" d="${linePath(xs, cl(v), x, y)}"/>`);
  for (const m of p.markers ?? []) {
    if (!(m.s >= xa && m.s <= xb)) continue;
    out.push(`<g class="marker"><line x1="${px(x(m.s))}" x2="${px(x(m.s))}" y1="${px(box.top)}" y2="${px(box.height - box.bottom)}"/>` +
      `<text x="${px(x(m.s) + 3)}" y="${px(box.top + 11)}">${escapeHtml(m.label)}</text></g>`);
  }
  if (!hasData) out.push(`<text class="empty" x="${px(box.width / 2)}" y="${px(box.height / 2)}" text-anchor="middle">no defined values</text>`);
  out.push(`</svg>`);
  return out.join("");
}
