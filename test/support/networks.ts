/**
 * Invented wire networks with a known skeleton, for the network tests and benchmarks:
 * - `tripodSkeleton`: three arms leaving one point at 120 degrees, each a circular arc of known
 *   curvature (a pinwheel), optionally tilted out of the plane;
 * - `ladderSkeleton`: two straight rails joined by two rungs (one loop, four T junctions);
 * - `tubeUnionMesh`: the surface of the union of round tubes around the skeleton (exact distance
 *   field, marching tetrahedra on a fine grid: clean, CAD-like, rounded caps and sharp creases at
 *   the junctions);
 * - `voxelNetworkMesh`: a tomography-like surface: the skeleton rotated at random, voxelised with
 *   spatially correlated noise on the distance field (a segmented noisy volume), and the binary
 *   volume triangulated by marching tetrahedra with vertices at edge midpoints (staircase surfaces,
 *   uneven triangles);
 * - `stlBinary`: a Mesh as binary STL bytes.
 * Marching tetrahedra: six tetrahedra per cube around the main diagonal (Doi & Koide 1991, IEICE
 * Trans. E74:214). Lengths in arbitrary file units (nm in the tests).
 */
import type { Mesh } from "../../src/import/mesh/types.js";
import { mulberry32, normalStream } from "./rng.js";

export type Vec3 = [number, number, number];

/** A skeleton: polylines (chains), the junction points and per-arm truths. */
export interface NetworkSkeleton {
  readonly chains: Vec3[][];
  readonly junctions: Vec3[];
  /** Free end points (the skeleton's; the mesh caps reach one radius beyond). */
  readonly ends: Vec3[];
  readonly branches: number;
  readonly cycles: number;
  /** Curvature of each tripod arm (1/unit); 0 for straight pieces. */
  readonly armKappa: number;
}

/**
 * Three arms of length `arm` leaving the origin at 0, 120 and 240 degrees in the xy plane, each a
 * circular arc of radius `bend` turning left (curvature 1/bend); `lift` tilts each arm's plane about
 * its start tangent (radians) so the tripod is not planar.
 */
export function tripodSkeleton(arm: number, bend: number, lift = 0, perArm = 120): NetworkSkeleton {
  const chains: Vec3[][] = [];
  const ends: Vec3[] = [];
  for (let k = 0; k < 3; k++) {
    const th = (2 * Math.PI * k) / 3;
    const u: Vec3 = [Math.cos(th), Math.sin(th), 0];
    const v0: Vec3 = [-Math.sin(th), Math.cos(th), 0];
    const v: Vec3 = [v0[0] * Math.cos(lift), v0[1] * Math.cos(lift), Math.sin(lift)];
    const c: Vec3[] = [];
    for (let i = 0; i <= perArm; i++) {
      const s = (arm * i) / perArm;
      const a = Math.sin(s / bend) * bend, b = (1 - Math.cos(s / bend)) * bend;
      c.push([a * u[0] + b * v[0], a * u[1] + b * v[1], a * u[2] + b * v[2]]);
    }
    chains.push(c);
    ends.push(c[c.length - 1]);
  }
  return { chains, junctions: [[0, 0, 0]], ends, branches: 3, cycles: 0, armKappa: 1 / bend };
}

/** Rails along x from -length/2 to length/2 at y = -+width/2, rungs along y at x = -+rungGap/2. */
export function ladderSkeleton(length: number, width: number, rungGap: number, per = 2): NetworkSkeleton {
  const line = (a: Vec3, b: Vec3): Vec3[] => {
    const n = Math.max(2, Math.ceil(Math.hypot(b[0] - a[0], b[1] - a[1], b[2] - a[2]) / per));
    return Array.from({ length: n + 1 }, (_, i) => [a[0] + ((b[0] - a[0]) * i) / n, a[1] + ((b[1] - a[1]) * i) / n, a[2] + ((b[2] - a[2]) * i) / n] as Vec3);
  };
  const L = length / 2, W = width / 2, G = rungGap / 2;
  const chains = [line([-L, -W, 0], [L, -W, 0]), line([-L, W, 0], [L, W, 0]), line([-G, -W, 0], [-G, W, 0]), line([G, -W, 0], [G, W, 0])];
  return {
    chains,
    junctions: [[-G, -W, 0], [G, -W, 0], [-G, W, 0], [G, W, 0]],
    ends: [[-L, -W, 0], [L, -W, 0], [-L, W, 0], [L, W, 0]],
    branches: 8,
    cycles: 1,
    armKappa: 0,
  };
}

/**
 * A square lattice of nx by ny nodes `spacing` apart in the xy plane, joined by straight wires:
 * junctions of four at the interior nodes and of three on the edges; the corners are bends (no junction).
 */
export function latticeSkeleton(nx: number, ny: number, spacing: number, per = 2): NetworkSkeleton {
  const chains: Vec3[][] = [];
  const line = (a: Vec3, b: Vec3): Vec3[] => {
    const n = Math.max(2, Math.ceil(Math.hypot(b[0] - a[0], b[1] - a[1]) / per));
    return Array.from({ length: n + 1 }, (_, i) => [a[0] + ((b[0] - a[0]) * i) / n, a[1] + ((b[1] - a[1]) * i) / n, 0] as Vec3);
  };
  for (let j = 0; j < ny; j++) chains.push(line([0, j * spacing, 0], [(nx - 1) * spacing, j * spacing, 0]));
  for (let i = 0; i < nx; i++) chains.push(line([i * spacing, 0, 0], [i * spacing, (ny - 1) * spacing, 0]));
  const junctions: Vec3[] = [];
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    const corner = (i === 0 || i === nx - 1) && (j === 0 || j === ny - 1);
    if (!corner) junctions.push([i * spacing, j * spacing, 0]);
  }
  // edges between neighbouring nodes, less the corners' bends joining two edges into one branch
  const edges = 2 * nx * ny - nx - ny;
  return { chains, junctions, ends: [], branches: edges - 4, cycles: (nx - 1) * (ny - 1), armKappa: 0 };
}

/** Rotation matrix (row-major) from a seeded random unit quaternion. */
export function randomRotation(seed: number): number[] {
  const n = normalStream(seed);
  let q = [n(), n(), n(), n()];
  const l = Math.hypot(...q);
  q = q.map((x) => x / l);
  const [w, x, y, z] = q;
  return [
    1 - 2 * (y * y + z * z), 2 * (x * y - w * z), 2 * (x * z + w * y),
    2 * (x * y + w * z), 1 - 2 * (x * x + z * z), 2 * (y * z - w * x),
    2 * (x * z - w * y), 2 * (y * z + w * x), 1 - 2 * (x * x + y * y),
  ];
}

/** The skeleton moved by x -> R x + t. */
export function moveSkeleton(sk: NetworkSkeleton, R: readonly number[], t: Vec3 = [0, 0, 0]): NetworkSkeleton {
  const f = (p: Vec3): Vec3 => [
    R[0] * p[0] + R[1] * p[1] + R[2] * p[2] + t[0],
    R[3] * p[0] + R[4] * p[1] + R[5] * p[2] + t[1],
    R[6] * p[0] + R[7] * p[1] + R[8] * p[2] + t[2],
  ];
  return { ...sk, chains: sk.chains.map((c) => c.map(f)), junctions: sk.junctions.map(f), ends: sk.ends.map(f) };
}

/** Distance from every grid point to the skeleton, computed only within `band` of it (Infinity beyond). */
function distanceGrid(chains: readonly Vec3[][], lo: Vec3, cell: number, dims: number[], band: number): Float64Array {
  const f = new Float64Array(dims[0] * dims[1] * dims[2]).fill(Infinity);
  for (const c of chains) {
    for (let s = 0; s + 1 < c.length; s++) {
      const a = c[s], b = c[s + 1];
      const i0 = [0, 1, 2].map((k) => Math.max(0, Math.floor((Math.min(a[k], b[k]) - band - lo[k]) / cell)));
      const i1 = [0, 1, 2].map((k) => Math.min(dims[k] - 1, Math.ceil((Math.max(a[k], b[k]) + band - lo[k]) / cell)));
      const dx = b[0] - a[0], dy = b[1] - a[1], dz = b[2] - a[2];
      const l2 = dx * dx + dy * dy + dz * dz;
      for (let k = i0[2]; k <= i1[2]; k++) {
        for (let j = i0[1]; j <= i1[1]; j++) {
          for (let i = i0[0]; i <= i1[0]; i++) {
            const px = lo[0] + i * cell - a[0], py = lo[1] + j * cell - a[1], pz = lo[2] + k * cell - a[2];
            let u = l2 > 0 ? (px * dx + py * dy + pz * dz) / l2 : 0;
            u = u < 0 ? 0 : u > 1 ? 1 : u;
            const d = Math.hypot(px - u * dx, py - u * dy, pz - u * dz);
            const g = i + dims[0] * (j + dims[1] * k);
            if (d < f[g]) f[g] = d;
          }
        }
      }
    }
  }
  return f;
}

/**
 * Marching tetrahedra of the field `f` (inside where f < 0) on a grid; `midpoint`: vertices at edge
 * midpoints (a binary volume) instead of linear interpolation. Welded through the grid edges.
 */
function marchingTets(f: Float64Array, lo: Vec3, cell: number, dims: number[], midpoint: boolean): Mesh {
  const [nx, ny, nz] = dims;
  const corner = [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0], [0, 0, 1], [1, 0, 1], [1, 1, 1], [0, 1, 1]];
  const tets = [[0, 5, 1, 6], [0, 1, 2, 6], [0, 2, 3, 6], [0, 3, 7, 6], [0, 7, 4, 6], [0, 4, 5, 6]];
  const off = corner.map(([a, b, c]) => a + nx * (b + ny * c));
  const pos: number[] = [], idx: number[] = [];
  const vert = new Map<number, number>();
  const gp = (g: number): Vec3 => [lo[0] + (g % nx) * cell, lo[1] + (Math.floor(g / nx) % ny) * cell, lo[2] + Math.floor(g / (nx * ny)) * cell];
  const N = f.length;
  const edgeVertex = (a: number, b: number) => {
    const key = Math.min(a, b) * N + Math.max(a, b);
    let v = vert.get(key);
    if (v === undefined) {
      const pa = gp(a), pb = gp(b);
      const s = midpoint ? 0.5 : f[a] / (f[a] - f[b]);
      v = pos.length / 3;
      pos.push(pa[0] + s * (pb[0] - pa[0]), pa[1] + s * (pb[1] - pa[1]), pa[2] + s * (pb[2] - pa[2]));
      vert.set(key, v);
    }
    return v;
  };
  const g = new Array<number>(8), ins: number[] = [], out: number[] = [];
  for (let k = 0; k + 1 < nz; k++) for (let j = 0; j + 1 < ny; j++) for (let i = 0; i + 1 < nx; i++) {
    const base = i + nx * (j + ny * k);
    let any = 0;
    for (let c = 0; c < 8; c++) {
      g[c] = base + off[c];
      any += f[g[c]] < 0 ? 1 : 0;
    }
    if (any === 0 || any === 8) continue;
    for (const tet of tets) {
      ins.length = 0;
      out.length = 0;
      for (const q of tet) (f[g[q]] < 0 ? ins : out).push(g[q]);
      if (ins.length === 0 || out.length === 0) continue;
      if (ins.length === 1 || out.length === 1) {
        const s = ins.length === 1 ? ins[0] : out[0], rest = ins.length === 1 ? out : ins;
        idx.push(edgeVertex(s, rest[0]), edgeVertex(s, rest[1]), edgeVertex(s, rest[2]));
      } else {
        const a = edgeVertex(ins[0], out[0]), b = edgeVertex(ins[0], out[1]), c = edgeVertex(ins[1], out[1]), d = edgeVertex(ins[1], out[0]);
        idx.push(a, b, c, a, c, d);
      }
    }
  }
  return { positions: Float64Array.from(pos), index: Uint32Array.from(idx), diagnostics: [] };
}

function gridOf(sk: NetworkSkeleton, radius: number, cell: number): { lo: Vec3; dims: number[] } {
  const lo: Vec3 = [Infinity, Infinity, Infinity], hi: Vec3 = [-Infinity, -Infinity, -Infinity];
  for (const c of sk.chains) for (const p of c) for (let k = 0; k < 3; k++) {
    lo[k] = Math.min(lo[k], p[k] - radius - 3 * cell);
    hi[k] = Math.max(hi[k], p[k] + radius + 3 * cell);
  }
  for (let k = 0; k < 3; k++) lo[k] += 0.123 * cell; // no grid point exactly on the surface
  return { lo, dims: [0, 1, 2].map((k) => Math.ceil((hi[k] - lo[k]) / cell) + 1) };
}

/** Surface of the union of tubes of `radius` around the skeleton (exact distance field, grid `cell`). */
export function tubeUnionMesh(sk: NetworkSkeleton, radius: number, cell: number): Mesh {
  const { lo, dims } = gridOf(sk, radius, cell);
  const f = distanceGrid(sk.chains, lo, cell, dims, radius + 2 * cell);
  for (let i = 0; i < f.length; i++) f[i] = Number.isFinite(f[i]) ? f[i] - radius : 1;
  return marchingTets(f, lo, cell, dims, false);
}

/**
 * A segmented noisy tomogram of the skeleton's tubes: voxel size `voxel`, noise of SD `noise`
 * voxels on the distance field, correlated over about one voxel (3x3x3 box mean of white noise,
 * rescaled), thresholded to a binary volume and triangulated at edge midpoints.
 */
export function voxelNetworkMesh(sk: NetworkSkeleton, radius: number, voxel: number, noise: number, seed: number): Mesh {
  const { lo, dims } = gridOf(sk, radius, voxel);
  const f = distanceGrid(sk.chains, lo, voxel, dims, radius + 3 * voxel);
  const [nx, ny, nz] = dims;
  const white = new Float64Array(f.length);
  const rnd = normalStream(seed);
  for (let i = 0; i < white.length; i++) white[i] = rnd();
  const rng = mulberry32(seed + 1);
  void rng;
  for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    const g = i + nx * (j + ny * k);
    if (!Number.isFinite(f[g])) {
      f[g] = 1;
      continue;
    }
    let s = 0, m = 0;
    for (let c = -1; c <= 1; c++) for (let b = -1; b <= 1; b++) for (let a = -1; a <= 1; a++) {
      const ii = i + a, jj = j + b, kk = k + c;
      if (ii < 0 || jj < 0 || kk < 0 || ii >= nx || jj >= ny || kk >= nz) continue;
      s += white[ii + nx * (jj + ny * kk)];
      m++;
    }
    const corr = s / Math.sqrt(m); // unit SD
    f[g] = f[g] - radius + noise * voxel * corr < 0 ? -1 : 1;
  }
  return marchingTets(f, lo, voxel, dims, true);
}

/** Binary STL bytes of a mesh (normals left zero; readers recompute nothing from them). */
export function stlBinary(mesh: Mesh): Uint8Array {
  const nT = mesh.index.length / 3;
  const out = new Uint8Array(84 + 50 * nT);
  const dv = new DataView(out.buffer);
  dv.setUint32(80, nT, true);
  for (let t = 0; t < nT; t++) {
    const o = 84 + 50 * t + 12;
    for (let c = 0; c < 3; c++) {
      const v = mesh.index[3 * t + c];
      for (let k = 0; k < 3; k++) dv.setFloat32(o + 12 * c + 4 * k, mesh.positions[3 * v + k], true);
    }
  }
  return out;
}

/** Distance from each point to the skeleton's polylines. */
export function distanceToSkeleton(xyz: ArrayLike<number>, sk: NetworkSkeleton): Float64Array {
  const n = xyz.length / 3;
  const out = new Float64Array(n).fill(Infinity);
  for (let i = 0; i < n; i++) {
    const px = xyz[3 * i], py = xyz[3 * i + 1], pz = xyz[3 * i + 2];
    for (const c of sk.chains) {
      for (let s = 0; s + 1 < c.length; s++) {
        const a = c[s], b = c[s + 1];
        const dx = b[0] - a[0], dy = b[1] - a[1], dz = b[2] - a[2];
        const l2 = dx * dx + dy * dy + dz * dz;
        let u = l2 > 0 ? ((px - a[0]) * dx + (py - a[1]) * dy + (pz - a[2]) * dz) / l2 : 0;
        u = u < 0 ? 0 : u > 1 ? 1 : u;
        const d = Math.hypot(px - a[0] - u * dx, py - a[1] - u * dy, pz - a[2] - u * dz);
        if (d < out[i]) out[i] = d;
      }
    }
  }
  return out;
}

/** A noisy unordered cloud of points along the skeleton (spacing `step`, Gaussian noise of SD `sigma` per coordinate), shuffled. */
export function skeletonCloud(sk: NetworkSkeleton, step: number, sigma: number, seed: number): Float64Array {
  const n = normalStream(seed);
  const pts: number[] = [];
  for (const c of sk.chains) {
    for (let s = 0; s + 1 < c.length; s++) {
      const a = c[s], b = c[s + 1];
      const l = Math.hypot(b[0] - a[0], b[1] - a[1], b[2] - a[2]);
      const m = Math.max(1, Math.round(l / step));
      for (let i = 0; i < m; i++) {
        const u = i / m;
        pts.push(a[0] + u * (b[0] - a[0]) + sigma * n(), a[1] + u * (b[1] - a[1]) + sigma * n(), a[2] + u * (b[2] - a[2]) + sigma * n());
      }
    }
  }
  const rnd = mulberry32(seed + 7);
  const m = pts.length / 3;
  for (let i = m - 1; i > 0; i--) {
    const j = Math.floor(rnd() * (i + 1));
    for (let k = 0; k < 3; k++) [pts[3 * i + k], pts[3 * j + k]] = [pts[3 * j + k], pts[3 * i + k]];
  }
  return Float64Array.from(pts);
}
