import { homogeneousModes } from "../../physics/homogeneousModes.js";
import type { ReducedSystem } from "../../physics/types.js";
import { stateColor, toHex } from "../colorScales.js";
import { escapeHtml } from "../escapeHtml.js";
import { boundaryAt, PHASE_BOUNDARY } from "../phaseReference.js";
import { isoRegion, smoothPath } from "./isoRegion.js";
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

/** kappa l where a closed ferromagnetic ring switches between the vortex and the onion state (PHYSICS.md). */
export const RING_SWITCH_FM = 0.657;

/** A free spot for a marker of radius ~6 px near (x, y): the spot itself, else the first free one on growing circles. */
function freeSpot(x: number, y: number, taken: readonly { x: number; y: number }[], minDist: number): { x: number; y: number } {
  const free = (a: number, b: number): boolean => taken.every((q) => Math.hypot(q.x - a, q.y - b) >= minDist);
  if (free(x, y)) return { x, y };
  for (let ring = 1; ring <= 6; ++ring) {
    for (let k = 0; k < 8 * ring; ++k) {
      const ang = -Math.PI / 4 + (2 * Math.PI * k) / (8 * ring);
      const a = x + ring * minDist * Math.cos(ang), b = y - ring * minDist * Math.sin(ang);
      if (free(a, b)) return { x: a, y: b };
    }
  }
  return { x, y };
}

/**
 * SVG phase map of reduced curvature kappa l (up) against reduced torsion tau l (across): the region
 * where the homogeneous state is linearly unstable (shaded, from the stability margin of
 * physics/homogeneousModes on a 120 x 90 node grid, contoured with smooth edges by isoRegion, so it
 * includes any intrinsic term of the material), the ground-state boundary of the infinite helix for
 * the plain system (see phaseReference.ts; a smooth curve through its rows, mirrored for tau < 0,
 * since the labels do not depend on the handedness), the closed-ring rule (ferromagnet: vortex below,
 * onion above kappa l = 0.657, at tau = 0) when the wire is a closed loop, and each stretch as a
 * marker with its 95% bars. Marker shape and colour give the stretch's label (circle stable, triangle
 * metastable, square unstable, diamond uncertain). Markers that would cover each other are moved
 * aside to a free spot with a leader line to their true position (a small dot). Region names sit
 * clear of the line, on a white halo. Cost: ~11000 closed-form stability checks.
 */
export function phaseMap(system: ReducedSystem, points: readonly PhasePoint[], options: { readonly intrinsic: boolean; readonly id?: string; readonly closedRing?: boolean }): string {
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
  const ringRule = options.closedRing === true && order === "ferro";
  const Y = niceDomain(0, Math.max(1.3 * kMax, 1.15 * kAtX, ringRule ? 1.2 * RING_SWITCH_FM : 0, 0.5))[1];
  const x = linearScale(-X, X, box.left, box.width - box.right);
  const y = linearScale(0, Y, box.height - box.bottom, box.top);
  const out: string[] = [svgOpen(box, options.id ?? "phase-map", "phase map: reduced curvature against reduced torsion")];
  // unstable region: the stability margin on a node grid, contoured (margin < 0: unstable)
  const nx = 120, ny = 90;
  const margin = new Float64Array((nx + 1) * (ny + 1));
  for (let j = 0; j <= ny; ++j) {
    for (let i = 0; i <= nx; ++i) margin[i + (nx + 1) * j] = homogeneousModes(system, (j / ny) * Y, -X + (i / nx) * 2 * X).margin;
  }
  const gx = (i: number): number => box.left + (i / nx) * (box.width - box.right - box.left);
  const gy = (j: number): number => box.height - box.bottom - (j / ny) * (box.height - box.bottom - box.top);
  const region = isoRegion(margin, nx, ny, gx, gy);
  out.push(`<g class="unstable"><path class="region" d="${region.fill}"/><path class="edge" d="${region.line}"/></g>`);
  out.push(axes(box, x, y, "reduced torsion \u03c4 l", "reduced curvature \u03ba l"));
  // boundary line, mirrored, as a smooth curve through the table's rows (clipped to the plot)
  const rows: (readonly [number, number])[] = ref.filter(([t]) => t <= X * 1.0001);
  const kX = boundaryAt(order, X);
  if (rows[rows.length - 1][0] < X * 0.9999 && Number.isFinite(kX)) rows.push([X, kX]);
  const mirrored = [...rows.slice(1).reverse().map(([t, k]) => [-t, k] as const), ...rows];
  // keep the part below the top of the plot, cut where it crosses it (linear between rows)
  const inside: (readonly [number, number])[] = [];
  for (let i = 0; i < mirrored.length; ++i) {
    const [t, k] = mirrored[i];
    const prev = mirrored[i - 1];
    if (prev !== undefined && (prev[1] <= Y) !== (k <= Y)) {
      const f = (Y - prev[1]) / (k - prev[1]);
      inside.push([prev[0] + f * (t - prev[0]), Y]);
    }
    if (k <= Y) inside.push([t, k]);
  }
  const pts = inside.map(([t, k]) => [x(t), y(k)] as const);
  if (pts.length > 1) out.push(`<path class="boundary" d="${smoothPath(pts)}"/>`);
  // name the regions clear of the line: on the left half, halfway between the line and the frame
  const tl = -0.6 * X;
  const kl = boundaryAt(order, Math.abs(tl));
  if (Number.isFinite(kl)) {
    const [above, below] = order === "ferro" ? ["periodic", "homogeneous"] : ["homogeneous", "periodic"];
    const yLine = y(Math.min(kl, Y)), yTop = box.top, yBottom = box.height - box.bottom;
    const ya = (yLine + yTop) / 2 + 4, yb = (yLine + yBottom) / 2 + 4;
    if (kl < Y && yLine - yTop > 26) out.push(`<text class="note region-label" x="${px(x(tl))}" y="${px(ya)}" text-anchor="middle">${above}</text>`);
    if (yBottom - yLine > 26) out.push(`<text class="note region-label" x="${px(x(tl))}" y="${px(yb)}" text-anchor="middle">${below}</text>`);
  }
  if (ringRule) {
    const yr = y(RING_SWITCH_FM);
    out.push(`<g class="ring-rule"><line x1="${px(x(0) - 22)}" x2="${px(x(0) + 22)}" y1="${px(yr)}" y2="${px(yr)}"/>` +
      `<text class="note region-label" x="${px(x(0) + 24)}" y="${px(yr + 18)}">ring switch (dashed)</text></g>`);
  }
  if (options.intrinsic) out.push(`<text class="note" x="${px(box.left + 6)}" y="${px(box.height - box.bottom - 6)}">line: plain system (no intrinsic term)</text>`);
  // points with error bars; markers moved aside (with a leader) where they would cover each other
  out.push(`<g class="points">`);
  // markers first (each moved to a free spot if needed), then the labels, clear of every marker and earlier label
  const taken: { x: number; y: number }[] = [];
  const placed = points.map((p) => {
    const tv = Number.isFinite(p.tau) ? p.tau : 0;
    const cx = x(Math.max(-X, Math.min(X, tv))), cy = y(Math.min(Y, Math.max(0, p.kappa)));
    const spot = freeSpot(cx, cy, taken, 13);
    taken.push(spot);
    return { p, cx, cy, spot };
  });
  const labels: { x: number; y: number }[] = [];
  const clear = (lx: number, ly: number): boolean =>
    labels.every((q) => Math.abs(q.x - lx) >= 16 || Math.abs(q.y - ly) >= 11) &&
    taken.every((q) => Math.abs(q.x - (lx + 3)) >= 9 || Math.abs(q.y - (ly - 4)) >= 9);
  for (const { p, cx, cy, spot } of placed) {
    if (Number.isFinite(p.kappaLo) && Number.isFinite(p.kappaHi)) {
      out.push(`<line class="bar" x1="${px(cx)}" x2="${px(cx)}" y1="${px(y(Math.max(0, Math.min(Y, p.kappaLo))))}" y2="${px(y(Math.max(0, Math.min(Y, p.kappaHi))))}"/>`);
    }
    if (Number.isFinite(p.tau) && Number.isFinite(p.tauLo) && Number.isFinite(p.tauHi)) {
      out.push(`<line class="bar" y1="${px(cy)}" y2="${px(cy)}" x1="${px(x(Math.max(-X, p.tauLo)))}" x2="${px(x(Math.min(X, p.tauHi)))}"/>`);
    }
    const moved = spot.x !== cx || spot.y !== cy;
    const marker = MARKERS[p.category] ?? MARKERS[1];
    const leader = moved ? `<line class="leader" x1="${px(cx)}" y1="${px(cy)}" x2="${px(spot.x)}" y2="${px(spot.y)}"/><circle class="true-spot" cx="${px(cx)}" cy="${px(cy)}" r="1.8"/>` : "";
    // label: upper right of the marker, else lower right, left, then further down until clear
    const tries: [number, number][] = [[8, -7], [8, 12], [-16, -7], [-16, 12]];
    let [lx, ly] = [spot.x + 8, spot.y - 7];
    const found = tries.find(([dx, dy]) => clear(spot.x + dx, spot.y + dy));
    if (found !== undefined) [lx, ly] = [spot.x + found[0], spot.y + found[1]];
    else while (!clear(lx, ly) && ly < box.height) ly += 11;
    labels.push({ x: lx, y: ly });
    out.push(`<g class="pt">${leader}${marker(spot.x, spot.y, toHex(stateColor(p.category)))}<text x="${px(lx)}" y="${px(ly)}">${escapeHtml(p.label)}</text></g>`);
  }
  out.push(`</g></svg>`);
  return out.join("");
}
