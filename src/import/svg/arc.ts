/**
 * Centre parameterisation of an SVG elliptical arc given in endpoint form, with out-of-range radii
 * corrected. SVG 1.1 Appendix F.6 ("Elliptical arc implementation notes"): F.6.5 (conversion from
 * endpoint to centre parameterisation, equations F.6.5.1-F.6.5.6) and F.6.6 (correction of
 * out-of-range radii: scale rx, ry by sqrt(Lambda) when Lambda > 1).
 * https://www.w3.org/TR/SVG11/implnote.html#ArcImplementationNotes
 *
 * Returns null for the degenerate cases of F.6.2: identical endpoints (the arc is omitted) or a
 * zero radius (then the caller draws a straight line). Angles in radians.
 */
export interface ArcCentre {
  readonly cx: number;
  readonly cy: number;
  readonly rx: number;
  readonly ry: number;
  /** Rotation of the ellipse's x axis (radians). */
  readonly phi: number;
  readonly theta1: number;
  readonly dtheta: number;
}

export function arcCentre(
  x1: number, y1: number, rxIn: number, ryIn: number, phiDeg: number, largeArc: boolean, sweep: boolean, x2: number, y2: number,
): ArcCentre | null {
  if (x1 === x2 && y1 === y2) return null;
  let rx = Math.abs(rxIn), ry = Math.abs(ryIn);
  if (rx === 0 || ry === 0) return null;
  const phi = (((phiDeg % 360) + 360) % 360) * (Math.PI / 180);
  const cp = Math.cos(phi), sp = Math.sin(phi);
  // F.6.5.1
  const dx = (x1 - x2) / 2, dy = (y1 - y2) / 2;
  const x1p = cp * dx + sp * dy, y1p = -sp * dx + cp * dy;
  // F.6.6.2-3
  const lambda = (x1p * x1p) / (rx * rx) + (y1p * y1p) / (ry * ry);
  if (lambda > 1) {
    const s = Math.sqrt(lambda);
    rx *= s;
    ry *= s;
  }
  // F.6.5.2
  const rx2 = rx * rx, ry2 = ry * ry;
  const num = rx2 * ry2 - rx2 * y1p * y1p - ry2 * x1p * x1p;
  const den = rx2 * y1p * y1p + ry2 * x1p * x1p;
  const coef = (largeArc !== sweep ? 1 : -1) * Math.sqrt(Math.max(0, num / den));
  const cxp = (coef * rx * y1p) / ry, cyp = (-coef * ry * x1p) / rx;
  // F.6.5.3
  const cx = cp * cxp - sp * cyp + (x1 + x2) / 2, cy = sp * cxp + cp * cyp + (y1 + y2) / 2;
  // F.6.5.4-6
  const ux = (x1p - cxp) / rx, uy = (y1p - cyp) / ry, vx = (-x1p - cxp) / rx, vy = (-y1p - cyp) / ry;
  const angle = (ax: number, ay: number, bx: number, by: number) => Math.atan2(ax * by - ay * bx, ax * bx + ay * by);
  const theta1 = angle(1, 0, ux, uy);
  let dtheta = angle(ux, uy, vx, vy);
  if (!sweep && dtheta > 0) dtheta -= 2 * Math.PI;
  else if (sweep && dtheta < 0) dtheta += 2 * Math.PI;
  return { cx, cy, rx, ry, phi, theta1, dtheta };
}

/** Point of the arc at angle theta (F.6.3.1). */
export function arcPoint(a: ArcCentre, theta: number): [number, number] {
  const cp = Math.cos(a.phi), sp = Math.sin(a.phi), ct = Math.cos(theta), st = Math.sin(theta);
  return [a.cx + a.rx * cp * ct - a.ry * sp * st, a.cy + a.rx * sp * ct + a.ry * cp * st];
}
