import { ticks } from "d3-array";
import { STATE_CATEGORIES, toHex, UNDEFINED_COLOR, type Rgb } from "../colorScales.js";
import { escapeHtml } from "../escapeHtml.js";
import { px, tickLabel } from "./plotFrame.js";

/**
 * SVG colour bar for a continuous scale: 48 swatches of `color(v)` over [min, max], ticks, a label,
 * and a grey swatch for undefined values when `undefinedLabel` is given. Text escaped.
 */
export function rampLegend(color: (v: number) => Rgb, min: number, max: number, label: string, undefinedLabel?: string): string {
  const w = 360, h = 52, left = 10, bar = 300, top = 18;
  const out: string[] = [`<svg class="legend" viewBox="0 0 ${w + 120} ${h}" width="${w + 120}" height="${h}" xmlns="http://www.w3.org/2000/svg">`];
  out.push(`<text class="label" x="${left}" y="12">${escapeHtml(label)}</text>`);
  const steps = 48;
  for (let i = 0; i < steps; ++i) {
    const v = min + ((i + 0.5) / steps) * (max - min);
    out.push(`<rect x="${px(left + (i * bar) / steps)}" y="${top}" width="${px(bar / steps + 0.4)}" height="12" fill="${toHex(color(v))}"/>`);
  }
  out.push(`<rect x="${left}" y="${top}" width="${bar}" height="12" fill="none" stroke="#555" stroke-width="0.6"/>`);
  const t = ticks(min, max, 5);
  const step = t.length > 1 ? t[1] - t[0] : Math.abs(max - min) || 1;
  for (const v of t) {
    const xx = left + ((v - min) / (max - min || 1)) * bar;
    out.push(`<line x1="${px(xx)}" x2="${px(xx)}" y1="${top + 12}" y2="${top + 16}" stroke="#555"/><text x="${px(xx)}" y="${top + 27}" text-anchor="middle">${escapeHtml(tickLabel(v, step))}</text>`);
  }
  if (undefinedLabel !== undefined) {
    out.push(`<rect x="${left + bar + 16}" y="${top}" width="14" height="12" fill="${toHex(UNDEFINED_COLOR)}" stroke="#555" stroke-width="0.6"/><text x="${left + bar + 34}" y="${top + 10}">${escapeHtml(undefinedLabel)}</text>`);
  }
  out.push(`</svg>`);
  return out.join("");
}

/** HTML legend of the state categories present (`codes`), as swatches with labels. */
export function categoryLegend(codes: readonly number[]): string {
  const items = STATE_CATEGORIES.filter((c) => codes.includes(c.code));
  return `<ul class="swatches">${items.map((c) => `<li><span class="swatch" style="background:${toHex(c.color)}"></span>${escapeHtml(c.label)}</li>`).join("")}</ul>`;
}
