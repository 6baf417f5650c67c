/**
 * Orthonormal frames along sampled curve derivatives: the Frenet frame T, N = kappa N / kappa, B = T x N
 * where the curvature is resolved, and a twist-free frame carried across the rest by projecting the
 * previous normal on the new normal plane (a first-order rotation-minimising frame; Bishop 1975,
 * Amer. Math. Monthly 82:246; Wang, Juttler, Zheng & Liu 2008, ACM TOG 27:2; from memory).
 *
 * Inputs: r1 = r' (3 per sample, any scale), kv = curvature vector kappa N (3 per sample),
 * resolved[j] = 1 where the Frenet frame is trusted. Outputs interleaved T, N, B and a mask of
 * samples whose N, B were transported. Cost O(m). Degenerate: with nothing resolved the frame starts
 * from the coordinate axis most perpendicular to T at the first sample.
 */
import { hypot3 } from "./hypot3.js";
export function frames(
  r1: Float64Array,
  kv: Float64Array,
  resolved: Uint8Array,
  closed: boolean,
): { T: Float64Array; N: Float64Array; B: Float64Array; transported: Uint8Array } {
  const m = resolved.length;
  const T = new Float64Array(3 * m), N = new Float64Array(3 * m), B = new Float64Array(3 * m);
  const transported = new Uint8Array(m);
  // One loop per function below (the JIT compiles each alone).
  frenetPart(r1, kv, resolved, T, N);
  let start = -1;
  for (let j = 0; j < m; ++j) if (resolved[j]) { start = j; break; }
  if (start < 0) {
    // Nothing resolved: seed with the axis most perpendicular to T.
    const tx = Math.abs(T[0]), ty = Math.abs(T[1]), tz = Math.abs(T[2]);
    const ax = tx <= ty && tx <= tz ? 1 : 0, ay = ax === 0 && ty <= tz ? 1 : 0, az = ax === 0 && ay === 0 ? 1 : 0;
    setNormal(T, N, 0, ax, ay, az);
    transported[0] = 1;
    start = 0;
  }
  // Forward from the first trusted sample (wrapping on closed curves), then backward to the start.
  transportForward(T, N, resolved, transported, start, closed ? m : m - start);
  if (!closed) transportBackward(T, N, transported, start);
  binormals(T, N, B);
  return { T, N, B, transported };
}

/** T = r1 / |r1| everywhere; N from the curvature vector where resolved. */
function frenetPart(r1: Float64Array, kv: Float64Array, resolved: Uint8Array, T: Float64Array, N: Float64Array): void {
  for (let j = 0; j < resolved.length; ++j) {
    const l = hypot3(r1[3 * j], r1[3 * j + 1], r1[3 * j + 2]);
    T[3 * j] = r1[3 * j] / l; T[3 * j + 1] = r1[3 * j + 1] / l; T[3 * j + 2] = r1[3 * j + 2] / l;
    if (resolved[j]) {
      const k = hypot3(kv[3 * j], kv[3 * j + 1], kv[3 * j + 2]);
      setNormal(T, N, j, kv[3 * j] / k, kv[3 * j + 1] / k, kv[3 * j + 2] / k);
    }
  }
}

/** Carries N forward over `count - 1` samples after `start` (mod m), where not resolved. */
function transportForward(T: Float64Array, N: Float64Array, resolved: Uint8Array, transported: Uint8Array, start: number, count: number): void {
  const m = resolved.length;
  for (let k = 1; k < count; ++k) {
    const j = (start + k) % m, p = (start + k - 1) % m;
    if (resolved[j]) continue;
    setNormal(T, N, j, N[3 * p], N[3 * p + 1], N[3 * p + 2]);
    transported[j] = 1;
  }
}

/** Carries N backward from `start` to the first sample (open curves). */
function transportBackward(T: Float64Array, N: Float64Array, transported: Uint8Array, start: number): void {
  for (let j = start - 1; j >= 0; --j) {
    setNormal(T, N, j, N[3 * j + 3], N[3 * j + 4], N[3 * j + 5]);
    transported[j] = 1;
  }
}

/** B = T x N. */
function binormals(T: Float64Array, N: Float64Array, B: Float64Array): void {
  for (let j = 0; j < T.length / 3; ++j) {
    const tx = T[3 * j], ty = T[3 * j + 1], tz = T[3 * j + 2];
    const nx = N[3 * j], ny = N[3 * j + 1], nz = N[3 * j + 2];
    B[3 * j] = ty * nz - tz * ny; B[3 * j + 1] = tz * nx - tx * nz; B[3 * j + 2] = tx * ny - ty * nx;
  }
}

/** N[j] = normalised part of v perpendicular to T[j]; falls back to any perpendicular when v || T. */
function setNormal(T: Float64Array, N: Float64Array, j: number, vx: number, vy: number, vz: number): void {
  const tx = T[3 * j], ty = T[3 * j + 1], tz = T[3 * j + 2];
  let d = vx * tx + vy * ty + vz * tz;
  let nx = vx - d * tx, ny = vy - d * ty, nz = vz - d * tz;
  let l = hypot3(nx, ny, nz);
  if (!(l > 1e-12)) {
    const ax = Math.abs(tx) < 0.9 ? 1 : 0, ay = ax ? 0 : 1;
    d = ax * tx + ay * ty;
    nx = ax - d * tx; ny = ay - d * ty; nz = -d * tz;
    l = hypot3(nx, ny, nz);
  }
  N[3 * j] = nx / l; N[3 * j + 1] = ny / l; N[3 * j + 2] = nz / l;
}
