/**
 * Kinks: points where the wire's tangent turns by a finite angle within a few points (a growth
 * defect, a corner of a designed path, a hairpin tighter than the point spacing). A smoothing
 * spline cannot resolve one at any level: its curvature is a spike one resolution length wide
 * whatever the level, and the bias there dominates every global level rule, which then smooths the
 * whole wire for the kink. An arc of radius 300 nm (2 nm steps, 0.2 nm of noise) with one 30 degree
 * kink came out with the resolution cut from 263 nm to 29 nm and the arc's curvature 38% off
 * (median, away from the kink; 58 samples with bands that exclude the truth, unflagged).
 *
 * The test compares the tangents of least-squares quadratics fitted to the KINK_WINDOW points
 * before and after each point (a quadratic follows the wire's own curvature, so on a smooth wire
 * the two tangents agree up to noise), and again with twice the window: at a kink both angles are
 * the kink's, on a smooth bend the angle grows with the window. A kink is a local maximum of the
 * angle above KINK_MIN_ANGLE and KINK_NOISE_RATIO times the median angle along the trace (the
 * noise of such angles, measured on the trace itself; angles times the parameter length their
 * points span, so that unevenly sampled traces compare), whose angle with the doubled window is
 * 0.7-1.25 times the first. The scans need a full window on both sides; within 2 windows of an
 * open end a one-sided test (`endKink`) takes over: it continues the interior's quadratic into the
 * end piece. Without it a 60 degree kink 10-15 points from the end of an arc (radius 200 nm, 1 nm
 * steps, 0.1 nm of noise) went unfound and set the level of the whole wire: curvature 26-27% off
 * beyond 40 points of it. Pure function over typed arrays.
 */
import { hypot3 } from "./hypot3.js";
import { medianInPlace } from "./robustStart.js";

/**
 * Points on each side of the tangent fits (the second test doubles the window). Fixed: a window
 * grown with the noise, m = (100 sigma / h)^(2/3) points of spacing h, found the 90 degree corner
 * of a trace with noise of 2 steps but took smooth families for kinks (81 of 1152 traces), the
 * quadratics no longer following the wire over the longer windows. Instead a second scan with
 * twice the window (and four times for its check) runs too (`findKinks`): the windows of the first
 * scan see a kink only where the noise is below about a quarter of the point spacing, those of the
 * second to about half of it (a 90 degree corner between straight legs at 0.5 steps of noise is
 * found, at 1 step it is not; a 20 degree kink on an arc at 0.1-0.3 steps is found by the second
 * scan alone).
 */
export const KINK_WINDOW = 8;
/** Least kink angle (rad, about 10 degrees). */
export const KINK_MIN_ANGLE = 0.17;
/**
 * Times the median (span-scaled) side-tangent angle of the trace a kink's must exceed, with both
 * windows. Measured: eight wire families (helix, ring, trefoil, Viviani, conical helix, bump, sharp
 * bend, wavy coil), 100-5000 points sampled unevenly (1:1 to 30:1), noise 0 to 10% of the size, 2304
 * traces: no kink found (a sharp bend of 100 points at 2% noise was, with doubled-window ratios up
 * to 1.4: hence 1.25); kinks of 30 and 60 degrees on an arc at 0.2 nm noise on 2 nm steps, 57-150
 * degrees inside a helix at 0.5 nm noise and 90 degree corners all found at the kink (with 8, the
 * 30 degree kink of one draw and the 57 degree one were missed; a 10 degree kink is not found).
 */
export const KINK_NOISE_RATIO = 6;

export interface Kink {
  /** Index of the point (in the trace given). */
  readonly at: number;
  /** Angle between the tangents before and after it (rad). */
  readonly angle: number;
  /** Points on each side of the tangent fits that found it. */
  readonly window: number;
  /**
   * Chord over arc (parameter) length between the points two windows either side: about
   * cos(angle / 2) at a kink, near 0 where the wire turns back along itself (a hairpin).
   */
  readonly opening: number;
}

/**
 * Kinks of the points y (interleaved xyz) with parameter u (increasing, e.g. chord length; on a
 * closed trace `span` is the parameter length of the whole loop): those of a scan with KINK_WINDOW
 * points either side, then those of a scan with twice the window that lie more than two of its
 * windows from any of the first (the wider window averages more noise: it finds a 20 degree kink
 * on an arc at noise 0.1-0.3 of the point spacing, which the first misses and which had set the
 * smoothing of the whole arc, 12-23% off away from the kink; on 1152 smooth traces of eight
 * families it finds none either); on an open trace then the kink each end test finds
 * (`endKink`: 4-15 points from the end) if none of those lies within two of their windows of it.
 * Sorted by index. Cost 25-27 ms at 1e5 points.
 */
export function findKinks(y: Float64Array, u: Float64Array, closed: boolean, span: number): Kink[] {
  const fine = scanKinks(y, u, closed, span, KINK_WINDOW);
  const coarse = scanKinks(y, u, closed, span, 2 * KINK_WINDOW).filter((k) => fine.every((f) => indexDistance(f.at, k.at, u.length, closed) > 2 * k.window) && turnsWithinHalf(y, u, closed, span, k));
  const found = [...fine, ...coarse];
  if (!closed) for (const dir of [1, -1] as const) {
    const k = endKink(y, u, dir);
    if (k && found.every((f) => Math.abs(f.at - k.at) > 2 * f.window)) found.push(k);
  }
  return found.sort((a, b) => a.at - b.at);
}

/**
 * Least points of an end piece cut off by a kink (besides the kink's own point) that the end test
 * (`endKink`) looks for.
 */
export const KINK_END_MIN = 4;

/**
 * A kink near the open end at index 0 (dir 1) or n - 1 (dir -1), where the scans have no full
 * window on the end's side: at each point i from KINK_END_MIN to 3 KINK_WINDOW points from the end,
 * a quadratic fitted to the 2 KINK_WINDOW points on the interior side gives the tangent and the
 * curvature there; the end piece (all the points from i to the end) minus that curvature term is
 * fitted by a line, whose slope is the end piece's tangent (`endAngle`: a line with the interior's
 * curvature continues the interior, so on a smooth wire the two agree up to noise, however few points
 * the end piece has). A kink is the largest such angle if it lies less than 2 KINK_WINDOW points
 * from the end (there the first scan cannot reach), is above KINK_MIN_ANGLE and KINK_NOISE_RATIO
 * times the median of the same angle (same end-piece length) over the interior of the trace
 * (span-scaled as in the scans) and times the standard error of the end piece's direction from its
 * own scatter, and is 0.7-1.25 times the angle with twice the interior window; where the interior
 * turns by more than KINK_END_MAX_TURN over end piece and window, or either piece progresses by
 * less than KINK_END_MIN_PROGRESS, no angle is taken. Null when none, or when the trace has fewer
 * than 12 windows of points. Measured (an arc of radius 200 nm, 2 nm steps, noise 0.1-0.2 of the
 * step, 6 seeds): 60 degree kinks 4-12 points from the end found within a point in 107 of 108
 * draws, 13-15 points in 29 of 36 (the first scan finds them from 16 on); none on 7200 smooth
 * traces of eight families (100-5000 points, sampling 1:1-30:1, noise 0-10%).
 */
function endKink(y: Float64Array, u: Float64Array, dir: 1 | -1): Kink | null {
  const n = u.length, m = KINK_WINDOW, w = 2 * m;
  if (n < 12 * m) return null;
  const q = new Float64Array(7);
  const at = (d: number) => (dir > 0 ? d : n - 1 - d);
  let best = -1, bestA = 0, bestSe = 0;
  for (let d = KINK_END_MIN; d <= 3 * m; ++d) {
    const a = endAngle(y, u, at(d), d, w, dir, q);
    if (a > bestA) { bestA = a; best = d; bestSe = q[6]; }
  }
  if (best < 0 || best >= w || !(bestA > KINK_MIN_ANGLE)) return null;
  const i = at(best);
  // Both pieces must progress along the wire (noise well below the spacing).
  if (!(progress(y, u, i, at(0)) >= KINK_END_MIN_PROGRESS && progress(y, u, i, i + dir * w) >= KINK_END_MIN_PROGRESS)) return null;
  // The end piece's own scatter: its direction must stand out of it too.
  if (!(bestA > KINK_NOISE_RATIO * bestSe)) return null;
  // The noise of this angle with an end piece of `best` points: its median over the interior.
  const stride = Math.max(1, Math.ceil((n - 6 * m) / 2048));
  const v: number[] = [];
  for (let j = 2 * w; j < n - 2 * w; j += stride) {
    const a = endAngle(y, u, j, best, w, dir, q);
    if (Number.isFinite(a)) v.push(a * endSpan(u, j, best, w, dir));
  }
  v.sort((a, b) => a - b);
  const med = v.length > 0 ? v[v.length >> 1] : 0;
  if (!(bestA * endSpan(u, i, best, w, dir) > KINK_NOISE_RATIO * med)) return null;
  const r = endAngle(y, u, i, best, 2 * w, dir, q, false) / bestA;
  if (!(r >= 0.7 && r <= 1.25)) return null;
  return { at: i, angle: bestA, window: m, opening: opening(y, u, false, 0, i, 2 * m) };
}

/**
 * Most turn (rad) of the interior quadratic over the end piece and its window for the end test: a
 * quadratic against the parameter follows a gentle turn only. Measured: without it a conical helix
 * of 200 points sampled 30:1 (its sparse end turning about a half turn over 32 points) and a wavy
 * coil of 100 points (25 a turn) were taken for kinks of 168-177 degrees 7-16 points from an end
 * (the quadratic continued past the turn); the arc of radius 200 nm at 1 nm steps turns 0.16 rad
 * over 32 points.
 */
export const KINK_END_MAX_TURN = 0.5;

/**
 * Least chord over parameter length of the end piece and of the interior window for the end test:
 * where the noise is as large as the spacing the chord-length parameter follows the noise and the
 * fits no longer see the wire. Measured: a bump of 600 points sampled 10:1 at noise 3% of its size
 * (about 2 steps at its dense end) was taken for a 157 degree kink 16 points from the end without
 * it (progress 0.3-0.5 there); a kinked arc at noise 0.2 of the step progresses by 0.95 and more.
 */
export const KINK_END_MIN_PROGRESS = 0.8;

/** Chord over parameter length between points a and b (open trace). */
function progress(y: Float64Array, u: Float64Array, a: number, b: number): number {
  const arc = Math.abs(u[b] - u[a]);
  return arc > 0 ? hypot3(y[3 * b] - y[3 * a], y[3 * b + 1] - y[3 * a + 1], y[3 * b + 2] - y[3 * a + 2]) / arc : 0;
}

/** Parameter length of the end piece of `len` points and the interior window of `w` points at i. */
function endSpan(u: Float64Array, i: number, len: number, w: number, dir: 1 | -1): number {
  return Math.abs(u[i + dir * w] - u[i - dir * len]);
}

/**
 * Angle at point i between the tangent of the least-squares quadratic through i and the `w` points
 * on the interior side (i + dir, ..., i + dir w) and that of the end piece (i, i - dir, ..., i - dir
 * len): a line fitted to its points less the quadratic's curvature term. NaN where not defined.
 * Null (NaN) where the interior turns by more than KINK_END_MAX_TURN over the end piece and window
 * (unless `gate` is false: the check with the doubled window, the turn gated with the window). `q` gets the quadratic (`sideQuadratic`) and in q[6] the standard error (rad) of the end
 * piece's direction from its scatter about the line.
 */
function endAngle(y: Float64Array, u: Float64Array, i: number, len: number, w: number, dir: 1 | -1, q: Float64Array, gate = true): number {
  const n = u.length;
  if (i - dir * len < 0 || i - dir * len >= n || i + dir * w < 0 || i + dir * w >= n) return NaN;
  if (!sideQuadratic(y, u, i, w, dir, q)) return NaN;
  // The interior's turn per parameter length (the angle between the chords of the two halves of
  // twice the window over half its length; model-free, the long chords average the noise) times the
  // length of end piece and window: the quadratic must follow (and continue) the wire over it.
  const h = i + dir * w, e = i + dir * 2 * w;
  if (gate && (e < 0 || e >= n)) return NaN;
  const ax = y[3 * h] - y[3 * i], ay = y[3 * h + 1] - y[3 * i + 1], az = y[3 * h + 2] - y[3 * i + 2];
  const fx = y[3 * e] - y[3 * h], fy = y[3 * e + 1] - y[3 * h + 1], fz = y[3 * e + 2] - y[3 * h + 2];
  const cc = (ax * fx + ay * fy + az * fz) / (hypot3(ax, ay, az) * hypot3(fx, fy, fz));
  // Nor may the quadratic's own curvature |b x 2c| / |b|^3 turn it by more (chords of a tight coil
  // can line up again).
  const cx = q[1] * q[5] - q[2] * q[4], cy = q[2] * q[3] - q[0] * q[5], cz = q[0] * q[4] - q[1] * q[3], lb0 = hypot3(q[0], q[1], q[2]);
  const kq = (2 * hypot3(cx, cy, cz)) / (lb0 * lb0 * lb0);
  const turn = Math.max(Math.acos(cc > 1 ? 1 : cc < -1 ? -1 : cc) / (0.5 * Math.abs(u[e] - u[i])), kq) * endSpan(u, i, len, w, dir);
  if (gate && !(turn <= KINK_END_MAX_TURN)) return NaN;
  // Line through the end piece's points less c t^2 (relative to point i).
  let s0 = 0, s1 = 0, s2 = 0, rx = 0, ry = 0, rz = 0, qx = 0, qy = 0, qz = 0, vv = 0;
  for (let k = 0; k <= len; ++k) {
    const j = i - dir * k, t = u[j] - u[i], t2 = t * t;
    const vx = y[3 * j] - y[3 * i] - q[3] * t2, vy = y[3 * j + 1] - y[3 * i + 1] - q[4] * t2, vz = y[3 * j + 2] - y[3 * i + 2] - q[5] * t2;
    s0 += 1; s1 += t; s2 += t2;
    rx += vx; ry += vy; rz += vz; qx += vx * t; qy += vy * t; qz += vz * t; vv += vx * vx + vy * vy + vz * vz;
  }
  const det = s0 * s2 - s1 * s1;
  if (!(det > 0)) return NaN;
  const bx = (s0 * qx - s1 * rx) / det, by = (s0 * qy - s1 * ry) / det, bz = (s0 * qz - s1 * rz) / det;
  const lb = hypot3(bx, by, bz), lq = hypot3(q[0], q[1], q[2]);
  if (!(lb > 0 && lq > 0)) return NaN;
  // Standard error of the end piece's direction from its own scatter about the line (2 of its 3
  // components across the tangent; residual sum of squares by the normal equations).
  const ax0 = (rx - bx * s1) / s0, ay0 = (ry - by * s1) / s0, az0 = (rz - bz * s1) / s0;
  const rss = Math.max(0, vv - (ax0 * rx + ay0 * ry + az0 * rz) - (bx * qx + by * qy + bz * qz));
  q[6] = Math.sqrt((2 * rss) / Math.max(1, 3 * s0 - 6) / (det / s0)) / lb;
  const c = (bx * q[0] + by * q[1] + bz * q[2]) / (lb * lq);
  return Math.acos(c > 1 ? 1 : c < -1 ? -1 : c);
}

/**
 * Least-squares quadratic a + b t + c t^2 through point i and the m points i + dir, ..., i + dir m
 * (t = u_j - u_i, relative to point i; open trace, all inside): q gets b (0-2) and c (3-5). False
 * when degenerate.
 */
function sideQuadratic(y: Float64Array, u: Float64Array, i: number, m: number, dir: 1 | -1, q: Float64Array): boolean {
  const z = SUMS;
  if (!quadraticSums(y, u, false, 0, i, m, dir, z)) return false;
  const s1 = z[0], s2 = z[1], s3 = z[2], s4 = z[3], s0 = m + 1;
  const det = s0 * (s2 * s4 - s3 * s3) - s1 * (s1 * s4 - s3 * s2) + s2 * (s1 * s3 - s2 * s2);
  if (!(Math.abs(det) > 0)) return false;
  // Cramer's rule for b and c.
  for (let c = 0; c < 3; ++c) {
    const r0 = z[4 + c], r1 = z[7 + c], r2 = z[10 + c];
    q[c] = (s0 * (r1 * s4 - s3 * r2) - r0 * (s1 * s4 - s3 * s2) + s2 * (s1 * r2 - r1 * s2)) / det;
    q[3 + c] = (s0 * (s2 * r2 - r1 * s3) - s1 * (s1 * r2 - r1 * s2) + r0 * (s1 * s3 - s2 * s2)) / det;
  }
  return true;
}

/**
 * Least ratio of the side-tangent angle with half a kink's window (the largest within a quarter
 * window of it) to the kink's angle, for a kink of the wider scan: at a kink the half windows see
 * the whole turn too, across a bend of a few points they see part of it. Measured: a 90 degree
 * bend of radius 10 nm traced every 2 nm (8 points along it; the wider windows took it for a kink,
 * and the hinged fit put its turn 35 degrees off) 0.48; kinks of 20-90 degrees on an arc and a
 * helix found by the wider scan alone, at 0.1-0.3 steps of noise, 0.72-1.39.
 */
export const KINK_HALF_WINDOW_RATIO = 0.6;

/** Whether the turn at kink k is seen whole by half its window (KINK_HALF_WINDOW_RATIO). */
function turnsWithinHalf(y: Float64Array, u: Float64Array, closed: boolean, span: number, k: Kink): boolean {
  const tl = new Float64Array(3), tr = new Float64Array(3), half = k.window >> 1, n = u.length;
  let best = 0;
  for (let d = -(half >> 1); d <= half >> 1; ++d) {
    let j = k.at + d;
    if (j < 0 || j >= n) {
      if (!closed) continue;
      j = ((j % n) + n) % n;
    }
    const a = sideAngle(y, u, closed, span, j, half, tl, tr);
    if (a > best) best = a;
  }
  return best >= KINK_HALF_WINDOW_RATIO * k.angle;
}

/** Points between indices a and b (the short way round when closed). */
function indexDistance(a: number, b: number, n: number, closed: boolean): number {
  const d = Math.abs(a - b);
  return closed ? Math.min(d, n - d) : d;
}

/**
 * One scan with m points either side (2m for the check). Empty when the trace has fewer than 6
 * windows of points. The angles are computed at every (m/4)-th point and around the candidates:
 * cost O(n m / (m / 4)).
 */
function scanKinks(y: Float64Array, u: Float64Array, closed: boolean, span: number, m: number): Kink[] {
  const n = u.length;
  if (n < 6 * m) return [];
  const tl = new Float64Array(3), tr = new Float64Array(3);
  const lo = closed ? 0 : 2 * m, hi = closed ? n : n - 2 * m;
  const stride = Math.max(1, Math.floor(m / 4));
  // The angles on every stride-th point, with the doubled window on a few thousand (their medians:
  // the noise of the trace).
  const a1 = new Float64Array(n).fill(NaN), a2 = new Float64Array(n).fill(NaN);
  for (let i = lo; i < hi; i += stride) a1[i] = sideAngle(y, u, closed, span, i, m, tl, tr);
  const stride2 = Math.max(stride, Math.ceil(n / 4096));
  for (let i = lo; i < hi; i += stride2) a2[i] = sideAngle(y, u, closed, span, i, 2 * m, tl, tr);
  const med1 = scaledMedian(a1, u, closed, span, m, stride), med2 = scaledMedian(a2, u, closed, span, 2 * m, stride2);
  const out: Kink[] = [];
  for (let i = lo; i < hi; i += stride) {
    if (!(a1[i] > KINK_MIN_ANGLE && a1[i] * windowSpan(u, closed, span, i, m) > KINK_NOISE_RATIO * med1)) continue;
    // The largest angle within a stride either side, then a local maximum over the window.
    let best = i;
    for (let j = Math.max(lo, i - stride + 1); j < Math.min(hi, i + stride); ++j) {
      if (!Number.isFinite(a1[j])) a1[j] = sideAngle(y, u, closed, span, j, m, tl, tr);
      if (a1[j] > a1[best]) best = j;
    }
    if (out.length > 0 && out[out.length - 1].at === best) continue;
    if (!isLocalMax(a1, best, m, closed)) continue;
    const t = a1[best], t2 = sideAngle(y, u, closed, span, best, 2 * m, tl, tr);
    if (!(t > KINK_MIN_ANGLE && t2 * windowSpan(u, closed, span, best, 2 * m) > KINK_NOISE_RATIO * med2)) continue;
    const r = t2 / t;
    if (r < 0.7 || r > 1.25) continue;
    out.push({ at: best, angle: t, window: m, opening: opening(y, u, closed, span, best, 2 * m) });
  }
  return out;
}

/** Angle between the side tangents at point i with `m` points on each side (NaN where not defined). */
function sideAngle(y: Float64Array, u: Float64Array, closed: boolean, span: number, i: number, m: number, tl: Float64Array, tr: Float64Array): number {
  if (closed && u.length < 2 * m + 2) return NaN;
  if (!sideTangent(y, u, closed, span, i, m, -1, tl) || !sideTangent(y, u, closed, span, i, m, 1, tr)) return NaN;
  const c = tl[0] * tr[0] + tl[1] * tr[1] + tl[2] * tr[2];
  return Math.acos(c > 1 ? 1 : c < -1 ? -1 : c);
}

/**
 * Unit tangent at point i of the least-squares quadratic through points i, i + dir, ..., i + dir m
 * against the parameter (t = u_j - u_i, unwrapped on a closed trace); false when degenerate.
 * Sums by `quadraticSums`.
 */
function sideTangent(y: Float64Array, u: Float64Array, closed: boolean, span: number, i: number, m: number, dir: 1 | -1, out: Float64Array): boolean {
  const q = SUMS;
  if (!quadraticSums(y, u, closed, span, i, m, dir, q)) return false;
  const s1 = q[0], s2 = q[1], s3 = q[2], s4 = q[3];
  const r0x = q[4], r0y = q[5], r0z = q[6], r1x = q[7], r1y = q[8], r1z = q[9], r2x = q[10], r2y = q[11], r2z = q[12];
  const s0 = m + 1;
  // Normal equations [s0 s1 s2; s1 s2 s3; s2 s3 s4] [a b c]^T = [r0 r1 r2]^T; the tangent is b
  // (Cramer's rule for the middle unknown).
  const det = s0 * (s2 * s4 - s3 * s3) - s1 * (s1 * s4 - s3 * s2) + s2 * (s1 * s3 - s2 * s2);
  if (!(Math.abs(det) > 0)) return false;
  const p = s1 * s4 - s3 * s2;
  const bx = s0 * (r1x * s4 - s3 * r2x) - r0x * p + s2 * (s1 * r2x - r1x * s2);
  const by = s0 * (r1y * s4 - s3 * r2y) - r0y * p + s2 * (s1 * r2y - r1y * s2);
  const bz = s0 * (r1z * s4 - s3 * r2z) - r0z * p + s2 * (s1 * r2z - r1z * s2);
  const len = hypot3(bx, by, bz);
  if (!(len > 0)) return false;
  // The sign of det divides out of the direction: keep the tangent pointing along u.
  const sgn = det > 0 ? 1 : -1;
  out[0] = (sgn * bx) / len; out[1] = (sgn * by) / len; out[2] = (sgn * bz) / len;
  return true;
}

/** Scratch of `quadraticSums` for the scans (one fit at a time). */
const SUMS = new Float64Array(13);

/**
 * Sums of the least-squares quadratic through point i and the m points i + dir, ..., i + dir m
 * against the parameter (t = u_j - u_i, unwrapped on a closed trace), relative to point i (its own
 * term is 0 but for s0 = m + 1): into q, s1..s4 (0-3), then sum v, v t, v t^2 per coordinate (4-6,
 * 7-9, 10-12) with v = y_j - y_i. False where the points run past an open end.
 */
function quadraticSums(y: Float64Array, u: Float64Array, closed: boolean, span: number, i: number, m: number, dir: 1 | -1, q: Float64Array): boolean {
  const n = u.length;
  let s1 = 0, s2 = 0, s3 = 0, s4 = 0;
  let r0x = 0, r0y = 0, r0z = 0, r1x = 0, r1y = 0, r1z = 0, r2x = 0, r2y = 0, r2z = 0;
  for (let k = 1; k <= m; ++k) {
    let j = i + dir * k;
    let t = 0;
    if (j < 0 || j >= n) {
      if (!closed) return false;
      j = ((j % n) + n) % n;
      t = u[j] - u[i] + (dir > 0 ? span : -span);
    } else t = u[j] - u[i];
    const t2 = t * t;
    s1 += t; s2 += t2; s3 += t2 * t; s4 += t2 * t2;
    const vx = y[3 * j] - y[3 * i], vy = y[3 * j + 1] - y[3 * i + 1], vz = y[3 * j + 2] - y[3 * i + 2];
    r0x += vx; r0y += vy; r0z += vz;
    r1x += vx * t; r1y += vy * t; r1z += vz * t;
    r2x += vx * t2; r2y += vy * t2; r2z += vz * t2;
  }
  q[0] = s1; q[1] = s2; q[2] = s3; q[3] = s4;
  q[4] = r0x; q[5] = r0y; q[6] = r0z; q[7] = r1x; q[8] = r1y; q[9] = r1z; q[10] = r2x; q[11] = r2y; q[12] = r2z;
  return true;
}

/** Chord over parameter length between points i - d and i + d (wrapping when closed; clamped at open ends). */
function opening(y: Float64Array, u: Float64Array, closed: boolean, span: number, i: number, d: number): number {
  const n = u.length;
  const a = closed ? (((i - d) % n) + n) % n : Math.max(0, i - d), b = closed ? (i + d) % n : Math.min(n - 1, i + d);
  const chord = hypot3(y[3 * b] - y[3 * a], y[3 * b + 1] - y[3 * a + 1], y[3 * b + 2] - y[3 * a + 2]);
  const arc = closed ? ((u[b] - u[a]) % span + span) % span : u[b] - u[a];
  return arc > 0 ? chord / arc : 0;
}

/** Median of a[i] times the parameter length of its window, over every stride-th i where a[i] is finite (0 when none). */
function scaledMedian(a: Float64Array, u: Float64Array, closed: boolean, span: number, m: number, stride: number): number {
  const v = new Float64Array(Math.ceil(a.length / stride));
  let c = 0;
  for (let i = 0; i < a.length; i += stride) if (Number.isFinite(a[i])) v[c++] = a[i] * windowSpan(u, closed, span, i, m);
  return c > 0 ? medianInPlace(v, c) : 0;
}

/** Parameter length of the 2m + 1 points centred on i (wrapping on a closed trace of parameter length `span`). */
function windowSpan(u: Float64Array, closed: boolean, span: number, i: number, m: number): number {
  const n = u.length;
  let lo = i - m, hi = i + m, extra = 0;
  if (lo < 0) { lo += n; extra += span; }
  if (hi >= n) { hi -= n; extra += span; }
  return u[hi] - u[lo] + (closed ? extra : 0);
}

/** a[i] is the largest of a[i - m .. i + m] (wrapping when closed; ties go to the first). */
function isLocalMax(a: Float64Array, i: number, m: number, closed: boolean): boolean {
  const n = a.length;
  for (let d = -m; d <= m; ++d) {
    if (d === 0) continue;
    let j = i + d;
    if (j < 0 || j >= n) {
      if (!closed) continue;
      j = ((j % n) + n) % n;
    }
    if (a[j] > a[i] || (a[j] === a[i] && d < 0)) return false;
  }
  return true;
}
