/**
 * Junction geometry from the branches around it: each branch's axis near the junction as a line
 * (its end point and end tangent), the point where those lines meet in the least-squares sense, and
 * the angles between the tangents. Pure; metres and radians.
 */

/** A branch axis near a junction: a point on it and the unit tangent pointing away from the junction. */
export interface AxisLine {
  readonly point: readonly [number, number, number];
  readonly tangent: readonly [number, number, number];
}

/**
 * The axis at one end of a polyline: a quadratic fitted per coordinate against arc length over the
 * first `window` metres from that end (ordinary least squares, common practice), evaluated at the
 * end. The tangent points into the polyline (away from the end). `atEnd`: the last point instead of
 * the first. Null when fewer than 3 points lie in the window, or the polyline has no length.
 */
export function endAxis(xyz: Readonly<Float64Array>, atEnd: boolean, window: number): AxisLine | null {
  const n = xyz.length / 3;
  if (n < 2) return null;
  const idx = (k: number) => (atEnd ? n - 1 - k : k);
  const s: number[] = [0];
  for (let k = 1; k < n; k++) {
    const a = 3 * idx(k - 1), b = 3 * idx(k);
    s.push(s[k - 1] + Math.hypot(xyz[b] - xyz[a], xyz[b + 1] - xyz[a + 1], xyz[b + 2] - xyz[a + 2]));
    if (s[k] > window) break;
  }
  let m = s.length;
  if (m < 3) {
    if (n < 3) return null;
    m = Math.min(n, 3);
    while (s.length < m) {
      const a = 3 * idx(s.length - 1), b = 3 * idx(s.length);
      s.push(s[s.length - 1] + Math.hypot(xyz[b] - xyz[a], xyz[b + 1] - xyz[a + 1], xyz[b + 2] - xyz[a + 2]));
    }
  }
  const scale = s[m - 1];
  if (!(scale > 0)) return null;
  // normal equations of [1, u, u^2] with u = s / scale
  const A = [0, 0, 0, 0, 0], rhs = [[0, 0, 0], [0, 0, 0], [0, 0, 0]];
  for (let k = 0; k < m; k++) {
    const u = s[k] / scale, p = 3 * idx(k);
    const pw = [1, u, u * u, u * u * u, u * u * u * u];
    for (let q = 0; q < 5; q++) A[q] += pw[q];
    for (let c = 0; c < 3; c++) for (let r = 0; r < 3; r++) rhs[r][c] += pw[r] * xyz[p + c];
  }
  const M = [[A[0], A[1], A[2]], [A[1], A[2], A[3]], [A[2], A[3], A[4]]];
  const quadratic = m >= 4;
  const point: number[] = [], tangent: number[] = [];
  for (let c = 0; c < 3; c++) {
    if (quadratic) {
      const coef = solve3(M, [rhs[0][c], rhs[1][c], rhs[2][c]]);
      if (coef === null) return null;
      point.push(coef[0]);
      tangent.push(coef[1]);
    } else {
      // a straight line through the points
      const det = A[0] * A[2] - A[1] * A[1];
      if (!(Math.abs(det) > 0)) return null;
      const b = (A[0] * rhs[1][c] - A[1] * rhs[0][c]) / det;
      point.push((rhs[0][c] - b * A[1]) / A[0]);
      tangent.push(b);
    }
  }
  const l = Math.hypot(tangent[0], tangent[1], tangent[2]);
  if (!(l > 0)) return null;
  return { point: [point[0], point[1], point[2]], tangent: [tangent[0] / l, tangent[1] / l, tangent[2] / l] };
}

/** Solves a 3x3 system by Cramer's rule; null when singular (relative determinant under 1e-14). */
export function solve3(M: readonly (readonly number[])[], b: readonly number[]): [number, number, number] | null {
  const det = (m: readonly (readonly number[])[]) =>
    m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
  const d = det(M);
  let norm = 0;
  for (const r of M) for (const v of r) norm = Math.max(norm, Math.abs(v));
  if (!(Math.abs(d) > 1e-14 * norm * norm * norm)) return null;
  const out: number[] = [];
  for (let c = 0; c < 3; c++) {
    const Mc = M.map((r, i) => r.map((v, j) => (j === c ? b[i] : v)));
    out.push(det(Mc) / d);
  }
  return [out[0], out[1], out[2]];
}

/**
 * The point nearest to a set of lines in the least-squares sense: minimises
 * sum_i |(I - t_i t_i^T)(p - a_i)|^2 + w |p - prior|^2, i.e. solves
 * (sum_i (I - t_i t_i^T) + w I) p = sum_i (I - t_i t_i^T) a_i + w prior
 * (the normal equations of the distances to the lines; common practice, e.g. the triangulation of
 * rays). The small weight `w` (default 1e-3 per line) keeps the system solvable when the lines are
 * parallel, pulling the free direction to `prior`. Returns the point and the RMS distance of the
 * lines from it.
 */
export function nearestPointToLines(lines: readonly AxisLine[], prior: readonly [number, number, number], w = 1e-3): { point: [number, number, number]; rms: number } {
  const M = [[0, 0, 0], [0, 0, 0], [0, 0, 0]], b = [0, 0, 0];
  const wt = w * Math.max(1, lines.length);
  for (const { point: a, tangent: t } of lines) {
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) {
        const pij = (i === j ? 1 : 0) - t[i] * t[j];
        M[i][j] += pij;
        b[i] += pij * a[j];
      }
    }
  }
  for (let i = 0; i < 3; i++) {
    M[i][i] += wt;
    b[i] += wt * prior[i];
  }
  const p = solve3(M, b) ?? [prior[0], prior[1], prior[2]];
  let ss = 0;
  for (const { point: a, tangent: t } of lines) {
    const d = [p[0] - a[0], p[1] - a[1], p[2] - a[2]];
    const along = d[0] * t[0] + d[1] * t[1] + d[2] * t[2];
    ss += d[0] * d[0] + d[1] * d[1] + d[2] * d[2] - along * along;
  }
  return { point: p, rms: lines.length ? Math.sqrt(Math.max(0, ss) / lines.length) : 0 };
}

/** Angle between two unit vectors (degrees, 0..180), by atan2 of |a x b| and a . b (stable near 0 and 180). */
export function angleDeg(a: readonly number[], b: readonly number[]): number {
  const cx = a[1] * b[2] - a[2] * b[1], cy = a[2] * b[0] - a[0] * b[2], cz = a[0] * b[1] - a[1] * b[0];
  return (Math.atan2(Math.hypot(cx, cy, cz), a[0] * b[0] + a[1] * b[1] + a[2] * b[2]) * 180) / Math.PI;
}

/**
 * Cycle rank (first Betti number) of a multigraph: edges - vertices + connected components
 * (Kirchhoff's circuit rank; see any graph theory textbook, e.g. Diestel, "Graph Theory", section 1.9).
 */
export function cycleRank(edges: number, vertices: number, components: number): number {
  return edges - vertices + components;
}
