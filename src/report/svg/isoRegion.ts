/**
 * The region where a sampled function is below zero, as smooth SVG paths: per grid cell the part of
 * the square where the value (linearly interpolated along the cell edges) is negative,
 * and the zero line through the cells. This is marching squares (W. E. Lorensen and H. E. Cline's
 * marching cubes reduced to 2D; see https://en.wikipedia.org/wiki/Marching_squares), with each
 * cell's polygon found by walking its corners and cutting the edges where the sign changes, so the
 * region's edge follows the zero line instead of the cell staircase. Saddle cells join both parts.
 *
 * `values[i + (nx + 1) * j]` is the function at node (i, j), i in 0..nx, j in 0..ny; `toX(i)` and
 * `toY(j)` map (fractional) node coordinates to pixels. NaN counts as not inside.
 * Cost O(nx ny).
 * @example isoRegion(Float64Array.of(-1, 1, -1, 1), 1, 1, (i) => i, (j) => j).fill // "M0 0L0.5 0L0.5 1L0 1Z"
 */
export function isoRegion(values: ArrayLike<number>, nx: number, ny: number, toX: (i: number) => number, toY: (j: number) => number): { fill: string; line: string } {
  const fill: string[] = [];
  const line: string[] = [];
  const r = (v: number): string => String(Math.round(v * 10) / 10);
  const at = (i: number, j: number): number => values[i + (nx + 1) * j];
  for (let j = 0; j < ny; ++j) {
    for (let i = 0; i < nx; ++i) {
      const corners: [number, number][] = [[i, j], [i + 1, j], [i + 1, j + 1], [i, j + 1]];
      const v = corners.map(([a, b]) => at(a, b));
      const inside = v.map((x) => x < 0);
      if (inside.every((x) => !x)) continue;
      const poly: string[] = [];
      const cuts: string[] = [];
      for (let k = 0; k < 4; ++k) {
        const k1 = (k + 1) % 4;
        const [ax, ay] = corners[k], [bx, by] = corners[k1];
        if (inside[k]) poly.push(`${r(toX(ax))} ${r(toY(ay))}`);
        if (inside[k] !== inside[k1] && Number.isFinite(v[k]) && Number.isFinite(v[k1])) {
          const t = v[k] / (v[k] - v[k1]);
          const p = `${r(toX(ax + t * (bx - ax)))} ${r(toY(ay + t * (by - ay)))}`;
          poly.push(p);
          cuts.push(p);
        }
      }
      if (poly.length >= 3) fill.push(`M${poly.join("L")}Z`);
      for (let k = 0; k + 1 < cuts.length; k += 2) line.push(`M${cuts[k]}L${cuts[k + 1]}`);
    }
  }
  return { fill: fill.join(""), line: line.join("") };
}

/**
 * SVG path data of a smooth curve through points (pixels), as cubic Bezier pieces of a uniform
 * Catmull-Rom spline (tension 1/6 per side, the standard conversion; see
 * https://en.wikipedia.org/wiki/Centripetal_Catmull%E2%80%93Rom_spline#Definition for the spline family).
 * It passes through every point. Two points give a straight segment.
 */
export function smoothPath(pts: readonly (readonly [number, number])[]): string {
  if (pts.length < 2) return "";
  const r = (v: number): string => String(Math.round(v * 10) / 10);
  const out = [`M${r(pts[0][0])} ${r(pts[0][1])}`];
  for (let i = 0; i + 1 < pts.length; ++i) {
    const p0 = pts[Math.max(0, i - 1)], p1 = pts[i], p2 = pts[i + 1], p3 = pts[Math.min(pts.length - 1, i + 2)];
    const c1 = [p1[0] + (p2[0] - p0[0]) / 6, p1[1] + (p2[1] - p0[1]) / 6];
    const c2 = [p2[0] - (p3[0] - p1[0]) / 6, p2[1] - (p3[1] - p1[1]) / 6];
    out.push(`C${r(c1[0])} ${r(c1[1])} ${r(c2[0])} ${r(c2[1])} ${r(p2[0])} ${r(p2[1])}`);
  }
  return out.join("");
}
