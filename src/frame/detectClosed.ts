import { selectInPlace } from "./robustStart.js";
import { hypot3 } from "./hypot3.js";

/**
 * Decides whether an ordered trace is a closed curve: the gap between its last and first points is
 * within a few sample steps plus the noise (noise from the difference-based pseudo-residuals of
 * Gasser, Sroka & Jennen-Steinmetz 1986, Biometrika 73:625) and small against the whole length; no
 * point away from the ends lies nearer to either end than the other end does; and the wire runs on
 * through the gap (the closing step turns by under 75 degrees from the tangents at both ends).
 * Adds one line to `diagnostics` when it calls the trace closed. Cost O(n).
 * Units: any (the result depends only on ratios). `stepsOfXyz`: the step lengths of xyz (`stepLengths`),
 * when the caller has them (not changed).
 */
export function detectClosed(xyz: Float64Array, diagnostics: string[], stepsOfXyz?: Float64Array): boolean {
  const n = xyz.length / 3;
  if (n < 8) return false;
  // The steps from the caller when it has them (robustStart: the same numbers, one pass less).
  const steps = stepsOfXyz ?? new Float64Array(n - 1);
  const total = stepsOfXyz ? sumInOrder(steps) : stepsInto(xyz, steps);
  // The lower median (the element a sort would put at (n - 2) >> 1), by selection.
  const medStep = selectInPlace(steps.slice(), steps.length, (steps.length - 1) >> 1);
  const e2 = secondDifferenceSquares(xyz, n);
  // Var of (p[i-1] + p[i+1]) / 2 - p[i] per coordinate is 1.5 sigma^2 for white noise.
  const sigma = Math.sqrt(e2 / (3 * 1.5 * (n - 2)));
  const gap = Math.hypot(xyz[3 * n - 3] - xyz[0], xyz[3 * n - 2] - xyz[1], xyz[3 * n - 1] - xyz[2]);
  if (!(gap <= 3 * medStep + 4 * Math.SQRT2 * sigma && gap < 0.05 * total)) return false;
  // The ends meet only if they are each other's nearest part of the wire: a tight open coil has its
  // ends a few steps apart, but the neighbouring turn passes closer to them.
  const w = Math.ceil(gap / medStep) + 3;
  const near = nearerThan(xyz, 3 * (n - 1), gap, w, n - 1 - w) || nearerThan(xyz, 0, gap, w, n - 1 - w);
  if (near) {
    diagnostics.push(`not taken for closed: the ends are ${(gap / medStep).toFixed(2)} sample steps apart, but the wire passes closer to an end elsewhere (use --closed to override)`);
    return false;
  }
  // ... and only if the wire runs on through the gap: the step from the last point to the first
  // turns by less than 75 degrees from the tangents at both ends (the open ends of a narrow hairpin
  // face each other across it at 90 degrees). Not judged when the gap is within the noise or under
  // half a step (its direction is then noise, or the ends all but coincide).
  if (gap > Math.max(0.5 * medStep, 4 * sigma)) {
    const h = Math.max(1, Math.min(w, (n - 1) >> 2));
    const e = 3 * (n - 1), eb = 3 * (n - 1 - h);
    const gx = xyz[0] - xyz[e], gy = xyz[1] - xyz[e + 1], gz = xyz[2] - xyz[e + 2];
    const cosEnd = cosine(xyz[e] - xyz[eb], xyz[e + 1] - xyz[eb + 1], xyz[e + 2] - xyz[eb + 2], gx, gy, gz);
    const cosStart = cosine(gx, gy, gz, xyz[3 * h] - xyz[0], xyz[3 * h + 1] - xyz[1], xyz[3 * h + 2] - xyz[2]);
    if (!(cosEnd > 0.25 && cosStart > 0.25)) {
      diagnostics.push(`not taken for closed: the ends are ${(gap / medStep).toFixed(2)} sample steps apart, but the wire does not run on through the gap (it turns by ${angleDeg(Math.min(cosEnd, cosStart))} degrees there; use --closed to override)`);
      return false;
    }
  }
  diagnostics.push(`closed curve detected: the ends meet within ${(gap / medStep).toFixed(2)} sample steps (use --open to override)`);
  return true;
}

/** Cosine of the angle between two vectors (NaN when either is zero). */
function cosine(ax: number, ay: number, az: number, bx: number, by: number, bz: number): number {
  return (ax * bx + ay * by + az * bz) / (Math.hypot(ax, ay, az) * Math.hypot(bx, by, bz));
}

/** An angle in whole degrees from its cosine. */
function angleDeg(c: number): string {
  return Number.isFinite(c) ? (Math.acos(Math.max(-1, Math.min(1, c))) * 180 / Math.PI).toFixed(0) : "an undefined number of";
}

/** Whether a point with index in [from, to] lies nearer than `d` to the point at offset `a`. */
function nearerThan(xyz: Float64Array, a: number, d: number, from: number, to: number): boolean {
  const d2 = d * d;
  for (let i = from; i <= to; ++i) {
    const dx = xyz[3 * i] - xyz[a], dy = xyz[3 * i + 1] - xyz[a + 1], dz = xyz[3 * i + 2] - xyz[a + 2];
    if (dx * dx + dy * dy + dz * dz < d2) return true;
  }
  return false;
}

/** steps[i - 1] = |p_i - p_{i-1}|; returns their sum (in order). One loop per function: see design.ts. */
function stepsInto(xyz: Float64Array, steps: Float64Array): number {
  let total = 0;
  for (let i = 1; i <= steps.length; ++i) {
    steps[i - 1] = hypot3(xyz[3 * i] - xyz[3 * i - 3], xyz[3 * i + 1] - xyz[3 * i - 2], xyz[3 * i + 2] - xyz[3 * i - 1]);
    total += steps[i - 1];
  }
  return total;
}

/** Sum over interior points and coordinates of ((p_{i-1} + p_{i+1}) / 2 - p_i)^2, in order. */
/** steps[0] + steps[1] + ..., in index order (the sum `stepsInto` forms). */
function sumInOrder(steps: Float64Array): number {
  let total = 0;
  for (let i = 0; i < steps.length; ++i) total += steps[i];
  return total;
}

function secondDifferenceSquares(xyz: Float64Array, n: number): number {
  let e2 = 0;
  for (let i = 1; i < n - 1; ++i) {
    for (let c = 0; c < 3; ++c) {
      const e = 0.5 * (xyz[3 * i - 3 + c] + xyz[3 * i + 3 + c]) - xyz[3 * i + c];
      e2 += e * e;
    }
  }
  return e2;
}
