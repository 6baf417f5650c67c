/**
 * Tube meshes with a known centre line, for the mesh-import tests and the benchmark.
 * Curves are given as functions of t in [0, 1] returning [x, y, z] in file units (arbitrary).
 * - `threeTube`: three's TubeGeometry around the curve (open or closed; arc-length rings).
 * - `cappedTube`: our own tube with parallel-transport rings and hemispherical end caps (or none).
 * - `implicitTube`: marching tetrahedra on the distance field of a polyline skeleton (rounded ends,
 *   junctions, and the irregular triangles of a tomogram's isosurface).
 * - exporters: three's STLExporter / OBJExporter / PLYExporter, as bytes or text.
 */
import * as THREE from "three";
import { OBJExporter } from "three/examples/jsm/exporters/OBJExporter.js";
import { PLYExporter } from "three/examples/jsm/exporters/PLYExporter.js";
import { STLExporter } from "three/examples/jsm/exporters/STLExporter.js";
import { normalStream } from "./rng.js";

export type Vec3 = [number, number, number];
export type CurveFn = (t: number) => Vec3;

/** Helix (r cos 2 pi n t, r sin 2 pi n t, p n t): n turns of radius r and pitch p. */
export const helixCurve = (r: number, pitch: number, turns: number): CurveFn => (t) => {
  const a = 2 * Math.PI * turns * t;
  return [r * Math.cos(a), r * Math.sin(a), pitch * turns * t];
};

/** Circle of radius R in the xy plane (the centre line of a torus). */
export const circleCurve = (R: number): CurveFn => (t) => [R * Math.cos(2 * Math.PI * t), R * Math.sin(2 * Math.PI * t), 0];

/**
 * Bent wire: straight leg of length `leg` along +x, a 90 degree arc of radius `bend` turning to +y,
 * then another straight leg. Parametrised by arc length (t = s / total).
 */
export const bentWireCurve = (leg: number, bend: number): CurveFn => {
  const arc = (Math.PI / 2) * bend, total = 2 * leg + arc;
  return (t) => {
    const s = t * total;
    if (s <= leg) return [s, 0, 0];
    if (s <= leg + arc) {
      const a = (s - leg) / bend;
      return [leg + bend * Math.sin(a), bend * (1 - Math.cos(a)), 0];
    }
    return [leg + bend, bend + (s - leg - arc), 0];
  };
};

class FnCurve extends THREE.Curve<THREE.Vector3> {
  constructor(private readonly fn: CurveFn) {
    super();
    this.arcLengthDivisions = 4000;
  }
  override getPoint(t: number, target = new THREE.Vector3()): THREE.Vector3 {
    const [x, y, z] = this.fn(t);
    return target.set(x, y, z);
  }
}

/** three's TubeGeometry (indexed, with duplicated seam vertices that the reader must weld). */
export function threeTube(curve: CurveFn, radius: number, tubular: number, radial: number, closed: boolean): THREE.BufferGeometry {
  return new THREE.TubeGeometry(new FnCurve(curve), tubular, radius, radial, closed);
}

/**
 * Open tube of radius `radius` around `curve`, rings from parallel transport (double reflection,
 * Wang, Juttler, Zheng & Liu 2008, ACM TOG 27:2), hemispherical caps of `capRings` rings (0: no caps,
 * open ends). Optional radial noise of relative size `noiseRel` (seeded). Indexed, no duplicates.
 */
export function cappedTube(
  curve: CurveFn,
  radius: number,
  opts: { tubular: number; radial: number; capRings: number; noiseRel?: number; seed?: number },
): THREE.BufferGeometry {
  const { tubular, radial, capRings } = opts;
  const P: THREE.Vector3[] = [], T: THREE.Vector3[] = [];
  for (let i = 0; i <= tubular; i++) {
    const t = i / tubular;
    P.push(new THREE.Vector3(...curve(t)));
    const a = new THREE.Vector3(...curve(Math.max(0, t - 1e-5))), b = new THREE.Vector3(...curve(Math.min(1, t + 1e-5)));
    T.push(b.sub(a).normalize());
  }
  const N: THREE.Vector3[] = [];
  const t0 = T[0];
  const helper = Math.abs(t0.x) < 0.9 ? new THREE.Vector3(1, 0, 0) : new THREE.Vector3(0, 1, 0);
  N.push(helper.clone().sub(t0.clone().multiplyScalar(helper.dot(t0))).normalize());
  for (let i = 1; i <= tubular; i++) {
    // double reflection
    const v1 = P[i].clone().sub(P[i - 1]);
    const c1 = v1.dot(v1);
    const rL = N[i - 1].clone().sub(v1.clone().multiplyScalar((2 / c1) * v1.dot(N[i - 1])));
    const tL = T[i - 1].clone().sub(v1.clone().multiplyScalar((2 / c1) * v1.dot(T[i - 1])));
    const v2 = T[i].clone().sub(tL);
    const c2 = v2.dot(v2);
    N.push(c2 > 0 ? rL.sub(v2.clone().multiplyScalar((2 / c2) * v2.dot(rL))).normalize() : rL.normalize());
  }
  const pos: number[] = [];
  const idx: number[] = [];
  const noise = normalStream(opts.seed ?? 7);
  const rel = opts.noiseRel ?? 0;
  const ring = (c: THREE.Vector3, t: THREE.Vector3, n: THREE.Vector3, r: number) => {
    const b = t.clone().cross(n);
    const first = pos.length / 3;
    for (let k = 0; k < radial; k++) {
      const a = (2 * Math.PI * k) / radial;
      const rr = r * (1 + rel * noise());
      const d = n.clone().multiplyScalar(Math.cos(a)).add(b.clone().multiplyScalar(Math.sin(a)));
      pos.push(c.x + rr * d.x, c.y + rr * d.y, c.z + rr * d.z);
    }
    return first;
  };
  const rings: number[] = [];
  const tip = (c: THREE.Vector3, t: THREE.Vector3) => {
    pos.push(c.x + radius * t.x, c.y + radius * t.y, c.z + radius * t.z);
    return pos.length / 3 - 1;
  };
  let startTip = -1, endTip = -1;
  if (capRings > 0) {
    startTip = tip(P[0], T[0].clone().negate());
    for (let j = 1; j < capRings; j++) {
      const phi = (Math.PI / 2) * (j / capRings);
      rings.push(ring(P[0].clone().sub(T[0].clone().multiplyScalar(radius * Math.cos(phi))), T[0], N[0], radius * Math.sin(phi)));
    }
  }
  for (let i = 0; i <= tubular; i++) rings.push(ring(P[i], T[i], N[i], radius));
  if (capRings > 0) {
    for (let j = capRings - 1; j >= 1; j--) {
      const phi = (Math.PI / 2) * (j / capRings);
      rings.push(ring(P[tubular].clone().add(T[tubular].clone().multiplyScalar(radius * Math.cos(phi))), T[tubular], N[tubular], radius * Math.sin(phi)));
    }
    endTip = tip(P[tubular], T[tubular]);
  }
  for (let r = 0; r + 1 < rings.length; r++) {
    const a = rings[r], b = rings[r + 1];
    for (let k = 0; k < radial; k++) {
      const k2 = (k + 1) % radial;
      idx.push(a + k, b + k, b + k2, a + k, b + k2, a + k2);
    }
  }
  if (capRings > 0) {
    const a = rings[0], b = rings[rings.length - 1];
    for (let k = 0; k < radial; k++) {
      const k2 = (k + 1) % radial;
      idx.push(startTip, a + k2, a + k);
      idx.push(endTip, b + k, b + k2);
    }
  }
  const geo = new THREE.BufferGeometry();
  geo.setAttribute("position", new THREE.Float32BufferAttribute(pos, 3));
  geo.setIndex(idx);
  return geo;
}

/** Distance from p to the polyline skeleton (segments between consecutive points of each chain). */
function distToChains(p: Vec3, chains: readonly (readonly Vec3[])[]): number {
  let best = Infinity;
  for (const c of chains) {
    for (let i = 0; i + 1 < c.length; i++) best = Math.min(best, distToSegment(p, c[i], c[i + 1]));
  }
  return best;
}

export function distToSegment(p: Readonly<Vec3>, a: Readonly<Vec3>, b: Readonly<Vec3>): number {
  const dx = b[0] - a[0], dy = b[1] - a[1], dz = b[2] - a[2];
  const l2 = dx * dx + dy * dy + dz * dz;
  let f = l2 > 0 ? ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy + (p[2] - a[2]) * dz) / l2 : 0;
  f = Math.max(0, Math.min(1, f));
  return Math.hypot(p[0] - a[0] - f * dx, p[1] - a[1] - f * dy, p[2] - a[2] - f * dz);
}

/**
 * Isosurface {dist(x, skeleton) = radius} by marching tetrahedra (six tetrahedra per cube around the
 * main diagonal; Doi & Koide 1991, IEICE Trans. E74:214). Vertices on shared grid edges are shared,
 * so the mesh is watertight and indexed. Oriented outward.
 */
export function implicitTube(chains: readonly (readonly Vec3[])[], radius: number, cell: number): THREE.BufferGeometry {
  let lo: Vec3 = [Infinity, Infinity, Infinity], hi: Vec3 = [-Infinity, -Infinity, -Infinity];
  for (const c of chains) for (const p of c) for (let k = 0; k < 3; k++) {
    lo[k] = Math.min(lo[k], p[k] - radius - 2 * cell);
    hi[k] = Math.max(hi[k], p[k] + radius + 2 * cell);
  }
  lo = lo.map((v) => v + 0.123 * cell) as Vec3; // avoid grid points exactly on the surface
  const n = [0, 1, 2].map((k) => Math.ceil((hi[k] - lo[k]) / cell) + 1);
  const id = (i: number, j: number, k: number) => i + n[0] * (j + n[1] * k);
  const f = new Float64Array(n[0] * n[1] * n[2]);
  const at = (i: number, j: number, k: number): Vec3 => [lo[0] + i * cell, lo[1] + j * cell, lo[2] + k * cell];
  for (let k = 0; k < n[2]; k++) for (let j = 0; j < n[1]; j++) for (let i = 0; i < n[0]; i++) f[id(i, j, k)] = distToChains(at(i, j, k), chains) - radius;
  const corner = [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0], [0, 0, 1], [1, 0, 1], [1, 1, 1], [0, 1, 1]];
  const tets = [[0, 5, 1, 6], [0, 1, 2, 6], [0, 2, 3, 6], [0, 3, 7, 6], [0, 7, 4, 6], [0, 4, 5, 6]];
  const pos: number[] = [], idx: number[] = [];
  const vert = new Map<number, number>();
  const gp = (g: number): Vec3 => {
    const i = g % n[0], j = Math.floor(g / n[0]) % n[1], k = Math.floor(g / (n[0] * n[1]));
    return at(i, j, k);
  };
  const edgeVertex = (a: number, b: number) => {
    const key = Math.min(a, b) * f.length + Math.max(a, b);
    let v = vert.get(key);
    if (v === undefined) {
      const pa = gp(a), pb = gp(b), s = f[a] / (f[a] - f[b]);
      v = pos.length / 3;
      pos.push(pa[0] + s * (pb[0] - pa[0]), pa[1] + s * (pb[1] - pa[1]), pa[2] + s * (pb[2] - pa[2]));
      vert.set(key, v);
    }
    return v;
  };
  const emit = (a: number, b: number, c: number, outward: Vec3) => {
    const A = pos.slice(3 * a, 3 * a + 3), B = pos.slice(3 * b, 3 * b + 3), C = pos.slice(3 * c, 3 * c + 3);
    const u = [B[0] - A[0], B[1] - A[1], B[2] - A[2]], w = [C[0] - A[0], C[1] - A[1], C[2] - A[2]];
    const nn = [u[1] * w[2] - u[2] * w[1], u[2] * w[0] - u[0] * w[2], u[0] * w[1] - u[1] * w[0]];
    if (nn[0] * outward[0] + nn[1] * outward[1] + nn[2] * outward[2] >= 0) idx.push(a, b, c);
    else idx.push(a, c, b);
  };
  for (let k = 0; k + 1 < n[2]; k++) for (let j = 0; j + 1 < n[1]; j++) for (let i = 0; i + 1 < n[0]; i++) {
    const g = corner.map(([a, b, c]) => id(i + a, j + b, k + c));
    for (const tet of tets) {
      const v = tet.map((q) => g[q]);
      const ins = v.filter((q) => f[q] < 0), out = v.filter((q) => f[q] >= 0);
      if (ins.length === 0 || out.length === 0) continue;
      const ci = ins.map(gp), co = out.map(gp);
      const mean = (ps: Vec3[]) => [0, 1, 2].map((d) => ps.reduce((s, p) => s + p[d], 0) / ps.length) as Vec3;
      const mi = mean(ci), mo = mean(co);
      const outward: Vec3 = [mo[0] - mi[0], mo[1] - mi[1], mo[2] - mi[2]];
      if (ins.length === 1 || out.length === 1) {
        const s = ins.length === 1 ? ins[0] : out[0], rest = ins.length === 1 ? out : ins;
        emit(edgeVertex(s, rest[0]), edgeVertex(s, rest[1]), edgeVertex(s, rest[2]), outward);
      } else {
        const [i0, i1] = ins, [o0, o1] = out;
        const a = edgeVertex(i0, o0), b = edgeVertex(i0, o1), c = edgeVertex(i1, o1), d = edgeVertex(i1, o0);
        emit(a, b, c, outward);
        emit(a, c, d, outward);
      }
    }
  }
  const geo = new THREE.BufferGeometry();
  geo.setAttribute("position", new THREE.Float32BufferAttribute(pos, 3));
  geo.setIndex(idx);
  return geo;
}

const asMesh = (geo: THREE.BufferGeometry) => new THREE.Mesh(geo);

export function toStlBinary(geo: THREE.BufferGeometry): Uint8Array {
  const dv = new STLExporter().parse(asMesh(geo), { binary: true }) as unknown as DataView;
  return new Uint8Array(dv.buffer, dv.byteOffset, dv.byteLength);
}
export function toStlAscii(geo: THREE.BufferGeometry): string {
  return new STLExporter().parse(asMesh(geo)) as unknown as string;
}
export function toObj(geo: THREE.BufferGeometry): string {
  return new OBJExporter().parse(asMesh(geo));
}
export function toPlyBinary(geo: THREE.BufferGeometry, littleEndian = true): Uint8Array {
  const ab = new PLYExporter().parse(asMesh(geo), undefined as never, { binary: true, littleEndian }) as ArrayBuffer;
  return new Uint8Array(ab);
}
export function toPlyAscii(geo: THREE.BufferGeometry): string {
  return new PLYExporter().parse(asMesh(geo), undefined as never, {}) as unknown as string;
}

/** Dense truth polyline of a curve, interleaved, scaled by `scale` (e.g. 1e-9 for nm to m). */
export function truthPolyline(curve: CurveFn, n: number, scale: number): Float64Array {
  const out = new Float64Array(3 * (n + 1));
  for (let i = 0; i <= n; i++) {
    const p = curve(i / n);
    out[3 * i] = p[0] * scale;
    out[3 * i + 1] = p[1] * scale;
    out[3 * i + 2] = p[2] * scale;
  }
  return out;
}

/** Distance from each sample of `xyz` to the polyline `truth`, and the truth fraction (0..1) of its foot point. */
export function distancesToTruth(xyz: Readonly<Float64Array>, truth: Readonly<Float64Array>): { dist: Float64Array; foot: Float64Array } {
  const n = xyz.length / 3, m = truth.length / 3;
  const dist = new Float64Array(n), foot = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const p: Vec3 = [xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2]];
    let best = Infinity, bf = 0;
    for (let j = 0; j + 1 < m; j++) {
      const a: Vec3 = [truth[3 * j], truth[3 * j + 1], truth[3 * j + 2]];
      const b: Vec3 = [truth[3 * j + 3], truth[3 * j + 4], truth[3 * j + 5]];
      const d = distToSegment(p, a, b);
      if (d < best) {
        best = d;
        bf = j / (m - 1);
      }
    }
    dist[i] = best;
    foot[i] = bf;
  }
  return { dist, foot };
}
