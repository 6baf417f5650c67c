/** Small SVG building blocks for the report's plots: scales, axes, paths with gaps, text. */
import { ticks } from "d3-array";
import simplify from "simplify-js";
import { escapeHtml } from "../escapeHtml.js";

/** A plot box in pixels: outer size and the inner (data) rectangle. */
export interface Box {
  readonly width: number;
  readonly height: number;
  readonly left: number;
  readonly right: number;
  readonly top: number;
  readonly bottom: number;
}

/** A linear map from data to pixels. */
export interface Scale {
  readonly d0: number;
  readonly d1: number;
  readonly r0: number;
  readonly r1: number;
  (v: number): number;
}

export function linearScale(d0: number, d1: number, r0: number, r1: number): Scale {
  const span = d1 - d0 || 1;
  const f = ((v: number) => r0 + ((v - d0) / span) * (r1 - r0)) as Scale;
  return Object.assign(f, { d0, d1, r0, r1 });
}

/** Round a number for an SVG attribute (0.1 px is plenty). */
export function px(v: number): string {
  return String(Math.round(v * 10) / 10);
}

/** Tick label: enough digits to tell neighbouring ticks apart, no float noise. */
export function tickLabel(v: number, step: number): string {
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-3) return v.toExponential(Math.max(0, Math.min(3, -Math.floor(Math.log10(step / a)) ))).replace("e+", "e");
  const digits = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  return v.toFixed(Math.min(6, digits)).replace(/^-0$/, "0");
}

/** Nice domain covering [lo, hi] (padded when empty). */
export function niceDomain(lo: number, hi: number, count = 5): [number, number] {
  if (!(Number.isFinite(lo) && Number.isFinite(hi))) return [0, 1];
  if (hi <= lo) {
    const pad = Math.abs(lo) > 0 ? Math.abs(lo) * 0.1 : 1;
    lo -= pad; hi += pad;
  }
  const t = ticks(lo, hi, count);
  const step = t.length > 1 ? t[1] - t[0] : (hi - lo) / count;
  return [Math.floor(lo / step + 1e-9) * step, Math.ceil(hi / step - 1e-9) * step];
}

/** Axes with ticks, grid lines and labels (text escaped). */
export function axes(box: Box, x: Scale, y: Scale, xLabel: string, yLabel: string, options: { xTicks?: number; yTicks?: number } = {}): string {
  const out: string[] = [];
  const xt = ticks(x.d0, x.d1, options.xTicks ?? 8);
  const yt = ticks(y.d0, y.d1, options.yTicks ?? 5);
  const xs = xt.length > 1 ? xt[1] - xt[0] : 1, ys = yt.length > 1 ? yt[1] - yt[0] : 1;
  const bottom = box.height - box.bottom, right = box.width - box.right;
  out.push(`<g class="grid">`);
  for (const v of yt) out.push(`<line x1="${px(box.left)}" x2="${px(right)}" y1="${px(y(v))}" y2="${px(y(v))}"/>`);
  for (const v of xt) out.push(`<line y1="${px(box.top)}" y2="${px(bottom)}" x1="${px(x(v))}" x2="${px(x(v))}"/>`);
  out.push(`</g><g class="axis">`);
  out.push(`<rect x="${px(box.left)}" y="${px(box.top)}" width="${px(right - box.left)}" height="${px(bottom - box.top)}" fill="none"/>`);
  for (const v of xt) {
    out.push(`<line x1="${px(x(v))}" x2="${px(x(v))}" y1="${px(bottom)}" y2="${px(bottom + 4)}"/>`);
    out.push(`<text x="${px(x(v))}" y="${px(bottom + 15)}" text-anchor="middle">${escapeHtml(tickLabel(v, xs))}</text>`);
  }
  for (const v of yt) {
    out.push(`<line x1="${px(box.left - 4)}" x2="${px(box.left)}" y1="${px(y(v))}" y2="${px(y(v))}"/>`);
    out.push(`<text x="${px(box.left - 6)}" y="${px(y(v) + 3.5)}" text-anchor="end">${escapeHtml(tickLabel(v, ys))}</text>`);
  }
  out.push(`<text class="label" x="${px((box.left + right) / 2)}" y="${px(box.height - 4)}" text-anchor="middle">${escapeHtml(xLabel)}</text>`);
  out.push(`<text class="label" transform="translate(13 ${px((box.top + bottom) / 2)}) rotate(-90)" text-anchor="middle">${escapeHtml(yLabel)}</text>`);
  out.push(`</g>`);
  return out.join("");
}

/**
 * Path data of a polyline through (x[i], y[i]) in pixels, broken at non-finite values, simplified
 * per run with simplify-js (2D, tolerance in pixels: the plot is 2D, so the 2D simplifier fits).
 */
export function linePath(xs: ArrayLike<number>, ys: ArrayLike<number>, x: Scale, y: Scale, tolerance = 0.25): string {
  const parts: string[] = [];
  let run: { x: number; y: number }[] = [];
  const flush = (): void => {
    if (run.length === 0) return;
    const pts = run.length > 2 ? simplify(run, tolerance, true) : run;
    parts.push(`M${pts.map((p) => `${px(p.x)} ${px(p.y)}`).join("L")}`);
    run = [];
  };
  for (let i = 0; i < xs.length; ++i) {
    const a = xs[i], b = ys[i];
    if (Number.isFinite(a) && Number.isFinite(b)) run.push({ x: x(a), y: y(b) });
    else flush();
  }
  flush();
  return parts.join("");
}

/** Path data of the band between lo and hi, one closed polygon per finite run. */
export function bandPath(xs: ArrayLike<number>, lo: ArrayLike<number>, hi: ArrayLike<number>, x: Scale, y: Scale): string {
  const parts: string[] = [];
  let start = -1;
  const close = (end: number): void => {
    if (start < 0) return;
    const upper: string[] = [], lower: string[] = [];
    for (let i = start; i < end; ++i) upper.push(`${px(x(xs[i]))} ${px(y(hi[i]))}`);
    for (let i = end - 1; i >= start; --i) lower.push(`${px(x(xs[i]))} ${px(y(lo[i]))}`);
    parts.push(`M${upper.join("L")}L${lower.join("L")}Z`);
    start = -1;
  };
  for (let i = 0; i < xs.length; ++i) {
    const ok = Number.isFinite(xs[i]) && Number.isFinite(lo[i]) && Number.isFinite(hi[i]);
    if (ok && start < 0) start = i;
    else if (!ok) close(i);
  }
  close(xs.length);
  return parts.join("");
}

/** Clamp a value into the y domain of a scale (so out-of-range band edges stay inside the plot). */
export function clampTo(s: Scale, v: number): number {
  const lo = Math.min(s.d0, s.d1), hi = Math.max(s.d0, s.d1);
  return Number.isFinite(v) ? Math.min(hi, Math.max(lo, v)) : v;
}

/**
 * Evenly bucketed copy of series for plotting at most `max` points: per bucket the middle sample
 * of each value series and the extremes of the band edges (so the band never shrinks).
 */
export function decimate(
  xs: ArrayLike<number>,
  series: readonly ArrayLike<number>[],
  lows: readonly ArrayLike<number>[],
  highs: readonly ArrayLike<number>[],
  max = 1500,
): { x: Float64Array; series: Float64Array[]; lows: Float64Array[]; highs: Float64Array[] } {
  const n = xs.length;
  const buckets = Math.min(n, max);
  const out = {
    x: new Float64Array(buckets),
    series: series.map(() => new Float64Array(buckets)),
    lows: lows.map(() => new Float64Array(buckets)),
    highs: highs.map(() => new Float64Array(buckets)),
  };
  for (let b = 0; b < buckets; ++b) {
    const i0 = Math.floor((b * n) / buckets), i1 = Math.max(i0 + 1, Math.floor(((b + 1) * n) / buckets));
    const mid = (i0 + i1 - 1) >> 1;
    out.x[b] = xs[mid];
    series.forEach((s, k) => { out.series[k][b] = s[mid]; });
    lows.forEach((s, k) => {
      let v = Infinity, bad = false;
      for (let i = i0; i < i1; ++i) { if (Number.isFinite(s[i])) v = Math.min(v, s[i]); else bad = true; }
      out.lows[k][b] = bad && i1 - i0 === 1 ? NaN : v === Infinity ? NaN : v;
    });
    highs.forEach((s, k) => {
      let v = -Infinity, bad = false;
      for (let i = i0; i < i1; ++i) { if (Number.isFinite(s[i])) v = Math.max(v, s[i]); else bad = true; }
      out.highs[k][b] = bad && i1 - i0 === 1 ? NaN : v === -Infinity ? NaN : v;
    });
  }
  return out;
}

/** Opening tag of a plot's SVG element with its accessible title. */
export function svgOpen(box: Box, id: string, title: string): string {
  return `<svg id="${escapeHtml(id)}" class="plot" viewBox="0 0 ${box.width} ${box.height}" width="${box.width}" height="${box.height}" role="img" aria-label="${escapeHtml(title)}" xmlns="http://www.w3.org/2000/svg"><title>${escapeHtml(title)}</title>`;
}
