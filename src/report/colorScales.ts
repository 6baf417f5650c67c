/**
 * The report's colour scales (this project's own design), shared by the SVG legends (Node) and the
 * 3D viewer (browser): plain functions, no DOM.
 * - curvature: sequential, pale straw -> green -> teal -> steel blue -> indigo (0 .. max); every
 *   step keeps a clear luminance drop, so it also reads in grey on paper.
 * - torsion: diverging, brick (left-handed, tau < 0) -> warm grey (0) -> navy (right-handed, tau > 0).
 * - state: categories of the model's stability label.
 */

/** An RGB colour with channels 0..1. */
export type Rgb = readonly [number, number, number];

function hex(h: string): Rgb {
  const v = Number.parseInt(h.slice(1), 16);
  return [((v >> 16) & 255) / 255, ((v >> 8) & 255) / 255, (v & 255) / 255];
}

export const CURVATURE_STOPS: readonly Rgb[] = ["#ebe3c2", "#a6cf9b", "#4aa19e", "#2d6391", "#341f5c"].map(hex);
export const TORSION_STOPS: readonly Rgb[] = ["#9c3b1f", "#d8996a", "#e2ded6", "#8badd3", "#1c3d78"].map(hex);
/** Colour of samples where the value is undefined (NaN torsion). */
export const UNDEFINED_COLOR: Rgb = hex("#b9b9b9");

/** Model categories of a sample (index = category code). */
export const STATE_CATEGORIES: readonly { readonly code: number; readonly label: string; readonly color: Rgb }[] = [
  { code: 0, label: "no model (geometry only)", color: hex("#a3a3a3") },
  { code: 1, label: "homogeneous state, stable", color: hex("#3d8b57") },
  { code: 2, label: "periodic ground state, homogeneous metastable", color: hex("#d38a1d") },
  { code: 3, label: "homogeneous state linearly unstable", color: hex("#b5302c") },
  { code: 4, label: "uncertain: the band straddles a boundary", color: hex("#7d68b8") },
];

function ramp(stops: readonly Rgb[], t: number): Rgb {
  const x = Math.min(1, Math.max(0, t)) * (stops.length - 1);
  const i = Math.min(stops.length - 2, Math.floor(x));
  const f = x - i;
  const a = stops[i], b = stops[i + 1];
  return [a[0] + f * (b[0] - a[0]), a[1] + f * (b[1] - a[1]), a[2] + f * (b[2] - a[2])];
}

/** Curvature colour: `min` (and below) at the pale end, `max` (and above) at the dark end. */
export function curvatureColor(kappa: number, min: number, max: number): Rgb {
  if (!Number.isFinite(kappa)) return UNDEFINED_COLOR;
  return ramp(CURVATURE_STOPS, max > min ? (kappa - min) / (max - min) : 0.5);
}

/** Torsion colour: symmetric about 0, saturating at +-`maxAbs`. */
export function torsionColor(tau: number, maxAbs: number): Rgb {
  if (!Number.isFinite(tau)) return UNDEFINED_COLOR;
  return ramp(TORSION_STOPS, maxAbs > 0 ? 0.5 + 0.5 * (tau / maxAbs) : 0.5);
}

/** Colour of a state category code (unknown codes: the "no model" grey). */
export function stateColor(code: number): Rgb {
  return (STATE_CATEGORIES[code] ?? STATE_CATEGORIES[0]).color;
}

/** "#rrggbb" of a colour. */
export function toHex(c: Rgb): string {
  return `#${c.map((v) => Math.round(Math.min(1, Math.max(0, v)) * 255).toString(16).padStart(2, "0")).join("")}`;
}
