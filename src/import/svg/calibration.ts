import { InputError } from "../../errors.js";

/**
 * Metres per unit of the lengths an SVG root's width/height may carry. The CSS absolute units
 * (CSS Values and Units Level 3, section 5.2: 1in = 2.54cm = 96px, 1pt = 1/72 in, 1pc = 12 pt)
 * plus, as an extension for exports calibrated to a scale bar, m, um (or µm) and nm. "px" and
 * unitless lengths are not physical: they give no calibration.
 */
const METRES_PER: Readonly<Record<string, number>> = {
  m: 1, cm: 0.01, mm: 0.001, um: 1e-6, "µm": 1e-6, nm: 1e-9, in: 0.0254, pt: 0.0254 / 72, pc: 0.0254 / 6,
};

/** A length attribute: its number, and metres per that unit (undefined when not physical). */
export function parseLength(text: string, file: string, line: number, field: string): { value: number; metresPer?: number } {
  const m = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*([a-zA-Zµ%]*)\s*$/.exec(text);
  if (m === null) throw new InputError(file, line, field, `expected a length such as "12.5mm", got ${JSON.stringify(text)}`);
  const value = Number(m[1]), unit = m[2];
  if (unit === "" || unit === "px") return { value };
  if (unit === "%" || unit === "em" || unit === "ex") return { value };
  const per = METRES_PER[unit];
  if (per === undefined) throw new InputError(file, line, field, `unknown unit ${JSON.stringify(unit)}`);
  return { value, metresPer: per };
}

/** Scale from root user units to metres: separate x and y factors, and the origin to subtract (user units). */
export interface Calibration {
  readonly sx: number;
  readonly sy: number;
  readonly x0: number;
  readonly y0: number;
  /** How it was found, for diagnostics. */
  readonly how: string;
}

/**
 * Calibration of an SVG drawing: `pixelSize` (metres per root user unit, e.g. one micrograph
 * pixel) when given; else the root's physical width/height divided by its viewBox (SVG 1.1
 * section 7.7 and 7.8: viewBox and preserveAspectRatio; "none" scales x and y separately,
 * "slice" takes the larger factor, otherwise the smaller, as for "meet"). Without a viewBox, user
 * units are CSS px (1/96 in).
 * @throws {InputError} when neither gives a calibration.
 */
export function calibrate(
  root: ReadonlyMap<string, string>,
  file: string,
  line: number,
  pixelSize: number | undefined,
): Calibration {
  const vbText = root.get("viewBox");
  let vb: number[] | undefined;
  if (vbText !== undefined) {
    vb = vbText.trim().split(/[\s,]+/).map(Number);
    if (vb.length !== 4 || !vb.every(Number.isFinite) || !(vb[2] > 0) || !(vb[3] > 0)) {
      throw new InputError(file, line, "viewBox", `expected 4 numbers "min-x min-y width height" with positive sizes, got ${JSON.stringify(vbText)}`);
    }
  }
  if (pixelSize !== undefined) {
    return { sx: pixelSize, sy: pixelSize, x0: 0, y0: 0, how: `pixel size ${pixelSize} m per user unit (given)` };
  }
  const w = root.has("width") ? parseLength(root.get("width") as string, file, line, "width") : undefined;
  const h = root.has("height") ? parseLength(root.get("height") as string, file, line, "height") : undefined;
  const CSS_PX = 0.0254 / 96;
  const fx = w?.metresPer !== undefined ? (vb ? (w.value * w.metresPer) / vb[2] : CSS_PX) : undefined;
  const fy = h?.metresPer !== undefined ? (vb ? (h.value * h.metresPer) / vb[3] : CSS_PX) : undefined;
  if (fx === undefined && fy === undefined) {
    throw new InputError(
      file, line, "svg",
      "no pixel calibration: give --pixel-size, the size of one user unit (e.g. --pixel-size 2.5nm; `pixelSize` in metres from the library), or give the root <svg> a width or height in a physical unit (mm, cm, in, pt, pc, or m, um, nm) with a viewBox",
    );
  }
  const par = (root.get("preserveAspectRatio") ?? "").trim();
  let sx: number, sy: number;
  if (fx !== undefined && fy !== undefined) {
    if (par.startsWith("none")) [sx, sy] = [fx, fy];
    else sx = sy = par.includes("slice") ? Math.max(fx, fy) : Math.min(fx, fy);
  } else sx = sy = (fx ?? fy) as number;
  const how = `from the root's ${root.get("width") ?? ""}${root.has("width") && root.has("height") ? " x " : ""}${root.get("height") ?? ""}${vb ? ` over viewBox ${vbText}` : ""}: ${sx.toPrecision(4)} m per user unit${sx !== sy ? ` (x), ${sy.toPrecision(4)} (y)` : ""}`;
  return { sx, sy, x0: vb ? vb[0] : 0, y0: vb ? vb[1] : 0, how };
}
