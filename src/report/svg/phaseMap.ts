import { homogeneousModes } from "../../physics/homogeneousModes.js";
import type { ReducedSystem } from "../../physics/types.js";
import { stateColor, toHex } from "../colorScales.js";
import { escapeHtml } from "../escapeHtml.js";
import { PHASE_BOUNDARY } from "../phaseReference.js";
import { axes, linearScale, niceDomain, px, svgOpen, type Box } from "./plotFrame.js";

/** A stretch on the phase map (reduced units); NaN torsion is drawn at 0 without a torsion bar. */
export interface PhasePoint {
  readonly label: string;
  readonly kappa: number;
  readonly kappaLo: number;
  readonly kappaHi: number;
  readonly tau: number;
  readonly tauLo: number;
  readonly tauHi: number;
  /** State category code (colorScales STATE_CATEGORIES). */
  readonly category: number;
}

export const PHASE_BOX: Box = { width: 470, height: 380, left: 62, right: 16, top: 16, bottom: 42 };

const MARKERS: Readonly<Record<number, (x: number, y: number, fill: string) => string>> = {
  1: (x, y, f) => `<circle cx="${px(x)}" cy="${px(y)}" r="5" fill="${f}"/>`,
  2: (x, y, f) => `<path d="M${px(x)} ${px(y - 6)}L${px(x + 5.5)} ${px(y + 4)}L${px(x - 5.5)} ${px(y + 4)}Z" fill="${f}"/>`,
  3: (x, y, f) => `<rect x="${px(x - 4.5)}" y="${px(y - 4.5)}" width="9" height="9" fill="${f}"/>`,
  4: (x, y, f) => `<path d="M${px(x)} ${px(y - 6)}L${px(x + 6)} ${px(y)}L${px(x)} ${px(y + 6)}L${px(x - 6)} ${px(y)}Z" fill="${f}"/>`,
};

/**
 * SVG phase map of reduced curvature kappa l (up) against reduced torsion tau l (across): the region
 * where the homogeneous state is linearly unstable (shaded; from physics/homogeneousModes on a
 * 96 x 72 grid, so it includes any intrinsic term of the material), the ground-state boundary of
 * the infinite helix for the plain system (see phaseReference.ts; mirrored for tau < 0, since the
 * labels do not depend on the handedness), and each stretch as a marker with its 95% bars.
 * Marker shape and colour give the stretch's label (circle stable, triangle metastable, square
 * unstable, diamond uncertain). Cost: ~7000 closed-form stability checks.
 */
export function phaseMap(system: ReducedSystem, points: readonly PhasePoint[], options: { readonly intrinsic: boolean; readonly id?: string }): string {
  const box = PHASE_BOX;
  const order = system.order;
  let kMax = 0, tMax = 0;
  for (const p of points) {
    for (const v of [p.kappa, p.kappaHi]) if (Number.isFinite(v)) kMax = Math.max(kMax, v);
    for (const v of [p.tau, p.tauLo, p.tauHi]) if (Number.isFinite(v)) tMax = Math.max(tMax, Math.abs(v));
  }
  const X = niceDomain(0, Math.min(2, Math.max(0.5, 1.3 * tMax)))[1];
  const ref = PHASE_BOUNDARY[order];
  let kAtX = 0;
  for (const [t, kc] of ref) if (t <= X) kAtX = Math.max(kAtX, kc);
  const Y = niceDomain(0, Math.max(1.3 * kMax, 1.15 * kAtX, 0.5))[1];
  const x = linearScale(-X, X, box.left, box.width - box.right);
  const y = linearScale(0, Y, box.height - box.bottom, box.top);
  const out: string[] = [svgOpen(box, options.id ?? "phase-map", "phase map: reduced curvature against reduced torsion")];
  // unstable region: runs of grid cells per row
  const nx = 96, ny = 72;
  const cw = (box.width - box.right - box.left) / nx, ch = (box.height - box.bottom - box.top) / ny;
  out.push(`<g class="unstable">`);
  for (let j = 0; j < ny; ++j) {
    const kv = ((j + 0.5) / ny) * Y;
    let start = -1;
    for (let i = 0; i <= nx; ++i) {
      const tv = -X + ((i + 0.5) / nx) * 2 * X;
      const unstable = i < nx && homogeneousModes(system, kv, tv).unstable;
      if (unstable && start < 0) start = i;
      if (!unstable && start >= 0) {
        out.push(`<rect x="${px(box.left + start * cw)}" y="${px(box.height - box.bottom - (j + 1) * ch)}" width="${px((i - start) * cw + 0.3)}" height="${px(ch + 0.3)}"/>`);
        start = -1;
      }
    }
  }
  out.push(`</g>`);
  out.push(axes(box, x, y, "reduced torsion \u03c4 l", "reduced curvature \u03ba l"));
  // boundary line, mirrored
  const pts: string[] = [];
  const rows = ref.filter(([t]) => t <= X * 1.0001);
  const mirrored = [...rows.slice(1).reverse().map(([t, k]) => [-t, k] as const), ...rows];
  for (const [t, k] of mirrored) if (k <= Y) pts.push(`${px(x(t))} ${px(y(k))}`);
  if (pts.length > 1) out.push(`<path class="boundary" d="M${pts.join("L")}"/>`);
  // name the regions beside the line, near the right edge
  const tl = 0.72 * X;
  let kl = NaN;
  for (let i = 0; i + 1 < ref.length; ++i) if (ref[i][0] <= tl && tl <= ref[i + 1][0]) kl = ref[i][1] + ((tl - ref[i][0]) / (ref[i + 1][0] - ref[i][0])) * (ref[i + 1][1] - ref[i][1]);
  if (Number.isFinite(kl) && kl < Y) {
    const [above, below] = order === "ferro" ? ["periodic", "homogeneous"] : ["homogeneous", "periodic"];
    out.push(`<text class="note" x="${px(x(tl))}" y="${px(y(kl) - 8)}" text-anchor="middle">${above}</text>`);
    out.push(`<text class="note" x="${px(x(tl))}" y="${px(y(kl) + 16)}" text-anchor="middle">${below}</text>`);
  }
  if (options.intrinsic) out.push(`<text class="note" x="${px(box.left + 6)}" y="${px(box.height - box.bottom - 6)}">line: plain system (no intrinsic term)</text>`);
  // points with error bars
  out.push(`<g class="points">`);
  const placed: { x: number; y: number }[] = [];
  for (const p of points) {
    const tv = Number.isFinite(p.tau) ? p.tau : 0;
    const cx = x(Math.max(-X, Math.min(X, tv))), cy = y(Math.min(Y, Math.max(0, p.kappa)));
    if (Number.isFinite(p.kappaLo) && Number.isFinite(p.kappaHi)) {
      out.push(`<line class="bar" x1="${px(cx)}" x2="${px(cx)}" y1="${px(y(Math.max(0, Math.min(Y, p.kappaLo))))}" y2="${px(y(Math.max(0, Math.min(Y, p.kappaHi))))}"/>`);
    }
    if (Number.isFinite(p.tau) && Number.isFinite(p.tauLo) && Number.isFinite(p.tauHi)) {
      out.push(`<line class="bar" y1="${px(cy)}" y2="${px(cy)}" x1="${px(x(Math.max(-X, p.tauLo)))}" x2="${px(x(Math.min(X, p.tauHi)))}"/>`);
    }
    const marker = MARKERS[p.category] ?? MARKERS[1];
    // labels of coinciding points are stacked instead of printed over each other
    let lx = cx + 7, ly = cy - 6;
    while (placed.some((q) => Math.abs(q.x - lx) < 14 && Math.abs(q.y - ly) < 11)) ly += 11;
    placed.push({ x: lx, y: ly });
    out.push(`<g class="pt">${marker(cx, cy, toHex(stateColor(p.category)))}<text x="${px(lx)}" y="${px(ly)}">${escapeHtml(p.label)}</text></g>`);
  }
  out.push(`</g></svg>`);
  return out.join("");
}
