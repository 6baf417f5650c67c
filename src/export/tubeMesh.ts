import { ParameterError } from "../errors.js";

/** A closed (watertight) triangle mesh of a tube, ready for a float32 format. */
export interface TubeMesh {
  /** Vertex positions relative to `offset`, interleaved x, y, z, in the caller's unit. */
  readonly positions: Float32Array;
  /** Triangles, 3 vertex indices each, counter-clockwise seen from outside (normals point out). */
  readonly indices: Uint32Array;
  /** The centroid of the centre line that was subtracted (caller's unit, Float64): add it back to place the mesh. */
  readonly offset: readonly [number, number, number];
  readonly radius: number;
  readonly rings: number;
  readonly radial: number;
  readonly closed: boolean;
}

/** Options of {@link tubeMesh}. */
export interface TubeMeshOptions {
  /** Vertices per ring (default 16, at least 3). */
  readonly radial?: number;
  /** Most rings (default 4000): longer centre lines are subsampled evenly. */
  readonly maxRings?: number;
}

/**
 * Triangle mesh of a tube of constant `radius` around a centre line.
 *
 * Method: one ring of `radial` vertices per centre-line point, in the plane normal to the tangent,
 * oriented by a frame carried from ring to ring by projection onto the next normal plane (a
 * discrete parallel transport, so the tube does not twist or flip where the Frenet frame would;
 * see Bishop, "There is more than one way to frame a curve", Amer. Math. Monthly 82:246 (1975)).
 * For a closed line the transport's mismatch after one loop (the holonomy angle) is spread evenly
 * over the rings, so the last ring joins the first without a seam; an open line gets flat end caps
 * (one centre vertex each), so the mesh is always closed and consistently oriented (outward).
 * Positions are written relative to the centroid of the centre line (returned as `offset`, in
 * Float64), so that float32 storage keeps its precision far from the origin.
 *
 * Units: any one length unit for `points` and `radius`; the output uses the same.
 * Degenerate input: consecutive coincident points are skipped; fewer than 2 distinct points throws.
 * Cost: O(rings x radial).
 * @throws {ParameterError} a radius that is not positive and finite, or radial < 3.
 * @example tubeMesh(Float64Array.of(0,0,0, 1,0,0), Float64Array.of(1,0,0, 1,0,0), false, 0.1).indices.length / 3 // 64 (32 side + 32 cap triangles)
 */
export function tubeMesh(
  points: Float64Array,
  tangents: Float64Array,
  closed: boolean,
  radius: number,
  options: TubeMeshOptions = {},
): TubeMesh {
  const radial = options.radial ?? 16;
  const maxRings = options.maxRings ?? 4000;
  if (!(Number.isFinite(radius) && radius > 0)) throw new ParameterError("tubeMesh", "radius", `must be a positive length (got ${radius})`);
  if (!(Number.isInteger(radial) && radial >= 3)) throw new ParameterError("tubeMesh", "radial", `must be an integer >= 3 (got ${radial})`);
  const n0 = points.length / 3;
  // keep distinct points, evenly subsampled to at most maxRings
  const stride = Math.max(1, Math.ceil(n0 / maxRings));
  const keep: number[] = [];
  for (let i = 0; i < n0; i += stride) keep.push(i);
  if (!closed && keep[keep.length - 1] !== n0 - 1) keep.push(n0 - 1);
  const idx: number[] = [];
  for (const i of keep) {
    const j = idx[idx.length - 1];
    if (j !== undefined && Math.hypot(points[3 * i] - points[3 * j], points[3 * i + 1] - points[3 * j + 1], points[3 * i + 2] - points[3 * j + 2]) === 0) continue;
    idx.push(i);
  }
  if (closed && idx.length > 2) {
    const a = idx[0], b = idx[idx.length - 1];
    if (Math.hypot(points[3 * a] - points[3 * b], points[3 * a + 1] - points[3 * b + 1], points[3 * a + 2] - points[3 * b + 2]) === 0) idx.pop();
  }
  const rings = idx.length;
  if (rings < 2) throw new ParameterError("tubeMesh", "points", `need at least 2 distinct centre-line points (got ${rings})`);
  const isClosed = closed && rings >= 3;

  let cx = 0, cy = 0, cz = 0;
  for (let i = 0; i < n0; ++i) { cx += points[3 * i]; cy += points[3 * i + 1]; cz += points[3 * i + 2]; }
  cx /= n0; cy /= n0; cz /= n0;

  // unit tangents at the rings
  const T = new Float64Array(3 * rings);
  for (let r = 0; r < rings; ++r) {
    const i = idx[r];
    let tx = tangents[3 * i], ty = tangents[3 * i + 1], tz = tangents[3 * i + 2];
    let tn = Math.hypot(tx, ty, tz);
    if (!(tn > 0) || !Number.isFinite(tn)) {
      // fall back to the chord direction
      const a = idx[Math.max(0, r - 1)], b = idx[Math.min(rings - 1, r + 1)];
      tx = points[3 * b] - points[3 * a]; ty = points[3 * b + 1] - points[3 * a + 1]; tz = points[3 * b + 2] - points[3 * a + 2];
      tn = Math.hypot(tx, ty, tz) || 1;
    }
    T[3 * r] = tx / tn; T[3 * r + 1] = ty / tn; T[3 * r + 2] = tz / tn;
  }
  // transported reference vector U (perpendicular to T) per ring
  const U = new Float64Array(3 * rings);
  const perp = (r: number, vx: number, vy: number, vz: number): void => {
    const tx = T[3 * r], ty = T[3 * r + 1], tz = T[3 * r + 2];
    const d = vx * tx + vy * ty + vz * tz;
    let ux = vx - d * tx, uy = vy - d * ty, uz = vz - d * tz;
    let un = Math.hypot(ux, uy, uz);
    if (!(un > 1e-6)) {
      // the carried vector is (nearly) along T: restart from the lab axis least aligned with T
      const ax = Math.abs(tx) <= Math.abs(ty) && Math.abs(tx) <= Math.abs(tz) ? 1 : 0;
      const ay = ax === 0 && Math.abs(ty) <= Math.abs(tz) ? 1 : 0;
      const az = ax === 0 && ay === 0 ? 1 : 0;
      const e = ax * tx + ay * ty + az * tz;
      ux = ax - e * tx; uy = ay - e * ty; uz = az - e * tz;
      un = Math.hypot(ux, uy, uz);
    }
    U[3 * r] = ux / un; U[3 * r + 1] = uy / un; U[3 * r + 2] = uz / un;
  };
  perp(0, 0, 0, 1);
  for (let r = 1; r < rings; ++r) perp(r, U[3 * r - 3], U[3 * r - 2], U[3 * r - 1]);
  const twist = new Float64Array(rings);
  if (isClosed) {
    // carry the last ring's vector to the first ring and measure the angle to the first ring's vector
    const lx = U[3 * rings - 3], ly = U[3 * rings - 2], lz = U[3 * rings - 1];
    const tx = T[0], ty = T[1], tz = T[2];
    const d = lx * tx + ly * ty + lz * tz;
    const px = lx - d * tx, py = ly - d * ty, pz = lz - d * tz;
    const ux = U[0], uy = U[1], uz = U[2];
    const cross = (py * uz - pz * uy) * tx + (pz * ux - px * uz) * ty + (px * uy - py * ux) * tz;
    const dot = px * ux + py * uy + pz * uz;
    const phi = Math.atan2(cross, dot); // rotation about T taking the carried vector onto U[0]
    for (let r = 0; r < rings; ++r) twist[r] = (phi * r) / rings;
  }

  const caps = isClosed ? 0 : 2;
  const positions = new Float32Array(3 * (rings * radial + caps));
  for (let r = 0; r < rings; ++r) {
    const i = idx[r];
    const tx = T[3 * r], ty = T[3 * r + 1], tz = T[3 * r + 2];
    let ux = U[3 * r], uy = U[3 * r + 1], uz = U[3 * r + 2];
    let vx = ty * uz - tz * uy, vy = tz * ux - tx * uz, vz = tx * uy - ty * ux;
    if (twist[r] !== 0) {
      const c = Math.cos(twist[r]), s = Math.sin(twist[r]);
      const rx = c * ux + s * vx, ry = c * uy + s * vy, rz = c * uz + s * vz;
      vx = c * vx - s * ux; vy = c * vy - s * uy; vz = c * vz - s * uz;
      ux = rx; uy = ry; uz = rz;
    }
    const px = points[3 * i] - cx, py = points[3 * i + 1] - cy, pz = points[3 * i + 2] - cz;
    for (let j = 0; j < radial; ++j) {
      const a = (2 * Math.PI * j) / radial;
      const c = radius * Math.cos(a), s = radius * Math.sin(a);
      const o = 3 * (r * radial + j);
      positions[o] = px + c * ux + s * vx;
      positions[o + 1] = py + c * uy + s * vy;
      positions[o + 2] = pz + c * uz + s * vz;
    }
  }
  const bands = isClosed ? rings : rings - 1;
  const indices = new Uint32Array(3 * (2 * bands * radial + caps * radial));
  let q = 0;
  for (let r = 0; r < bands; ++r) {
    const r1 = (r + 1) % rings;
    for (let j = 0; j < radial; ++j) {
      const j1 = (j + 1) % radial;
      const a = r * radial + j, b = r1 * radial + j, c = r * radial + j1, d = r1 * radial + j1;
      // (a, c, b) has normal (c - a) x (b - a) along the outward radius (see the doc comment)
      indices[q++] = a; indices[q++] = c; indices[q++] = b;
      indices[q++] = c; indices[q++] = d; indices[q++] = b;
    }
  }
  if (!isClosed) {
    const first = rings * radial, last = first + 1;
    const i0 = idx[0], i1 = idx[rings - 1];
    positions.set([points[3 * i0] - cx, points[3 * i0 + 1] - cy, points[3 * i0 + 2] - cz], 3 * first);
    positions.set([points[3 * i1] - cx, points[3 * i1 + 1] - cy, points[3 * i1 + 2] - cz], 3 * last);
    const e = (rings - 1) * radial;
    for (let j = 0; j < radial; ++j) {
      const j1 = (j + 1) % radial;
      indices[q++] = first; indices[q++] = j1; indices[q++] = j; // start cap faces -T
      indices[q++] = last; indices[q++] = e + j; indices[q++] = e + j1; // end cap faces +T
    }
  }
  return { positions, indices, offset: [cx, cy, cz], radius, rings, radial, closed: isClosed };
}
