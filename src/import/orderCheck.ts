/**
 * Is an "ordered" trace really in order along the wire? Two scale-free statistics separate ordered
 * traces from shuffled ones by an order of magnitude (NUMERICS.md sec. 7 item 3: ordered, noisy or
 * with outliers, 1.0-5.1; shuffled 42-305):
 *   polyline length / Euclidean minimum spanning tree length, and
 *   median step / median nearest-neighbour distance.
 * Computed on at most 2000 points (every k-th in file order: a subsample of an ordered trace is
 * ordered, of a shuffled one shuffled; the subsample also keeps dense noisy traces, whose steps are
 * mostly noise, from looking shuffled). Pure; lengths in any unit.
 */
import { median } from "./median.js";

/** The two order statistics of a trace. */
export interface OrderStats {
  /** Polyline length over the Euclidean minimum-spanning-tree length. */
  readonly polylineOverTree: number;
  /** Median step over the median nearest-neighbour distance. */
  readonly stepOverNeighbour: number;
  /** The ratio above which a trace counts as out of order (smaller for short traces). */
  readonly limit: number;
  /** Points the statistics were computed on. */
  readonly used: number;
}

const MAX_POINTS = 2000;


/**
 * Order statistics of interleaved xyz points in file order. The EMST by Prim's algorithm on the
 * complete graph (Prim 1957, Bell Syst. Tech. J. 36:1389): O(m^2) for the m <= 2000 points used.
 * The limit is 10 (the measured gap) for long traces and n / 8 (at least 2.5) for short ones: a
 * shuffled trace of n points has a polyline about n / 3 times its tree (random jumps of a third of
 * the wire), so short shuffled traces cannot reach 10.
 */
export function orderStats(xyz: Float64Array): OrderStats {
  const n = xyz.length / 3;
  const stride = Math.max(1, Math.ceil(n / MAX_POINTS));
  const m = Math.floor((n - 1) / stride) + 1;
  const p = new Float64Array(3 * m);
  for (let k = 0; k < m; ++k) p.set(xyz.subarray(3 * k * stride, 3 * k * stride + 3), 3 * k);
  const d = (a: number, b: number) => Math.hypot(p[3 * a] - p[3 * b], p[3 * a + 1] - p[3 * b + 1], p[3 * a + 2] - p[3 * b + 2]);
  let poly = 0;
  const steps = new Float64Array(m - 1);
  for (let k = 1; k < m; ++k) { steps[k - 1] = d(k - 1, k); poly += steps[k - 1]; }
  // Prim: best[j] = distance of j to the tree; also the nearest neighbour of every point.
  const best = new Float64Array(m).fill(Infinity), nn = new Float64Array(m).fill(Infinity);
  const inTree = new Uint8Array(m);
  let tree = 0, cur = 0;
  inTree[0] = 1;
  for (let added = 1; added < m; ++added) {
    let next = -1, nb = Infinity;
    for (let j = 0; j < m; ++j) {
      if (inTree[j]) continue;
      const dj = d(cur, j);
      if (dj < best[j]) best[j] = dj;
      if (best[j] < nb) { nb = best[j]; next = j; }
    }
    inTree[next] = 1;
    tree += nb;
    cur = next;
  }
  for (let a = 0; a < m; ++a) for (let b = a + 1; b < m; ++b) { const v = d(a, b); if (v < nn[a]) nn[a] = v; if (v < nn[b]) nn[b] = v; }
  const nnPos = nn.filter((v) => v > 0 && Number.isFinite(v));
  const medNn = median(nnPos), medStep = median(steps.filter((v) => v > 0));
  return {
    polylineOverTree: tree > 0 ? poly / tree : 1,
    stepOverNeighbour: medNn > 0 ? medStep / medNn : 1,
    limit: Math.min(10, Math.max(2.5, m / 8)),
    used: m,
  };
}

/** Both statistics above the limit: the points are not in order along the wire. */
export function outOfOrder(s: OrderStats): boolean {
  return s.polylineOverTree > s.limit && s.stepOverNeighbour > s.limit;
}

/**
 * Whether consecutive points turn by nearly the same angle all along (interquartile range of the
 * angles between consecutive steps under 0.3 rad, median under 2.5 rad: not reversing; on at most
 * 2000 points taken as in `orderStats`):
 * a coarse trace in file order whose neighbouring turns lie closer than its step (a spiral or a
 * coil traced at a few points per turn) looks out of order by distance, yet its turning is regular;
 * a shuffled trace turns by random angles (interquartile range about 1 rad in 3D, pi/2 in 2D). A
 * spiral traced at 5 points per turn, turns 3 nm apart on 15 nm steps, had been "reordered" across
 * its turns and then refused with a misleading message. Pure; any unit.
 */
export function regularTurning(xyz: Float64Array): boolean {
  const n = xyz.length / 3;
  const stride = Math.max(1, Math.ceil(n / MAX_POINTS));
  const m = Math.floor((n - 1) / stride) + 1;
  if (m < 6) return false;
  const at = (k: number, c: number) => xyz[3 * k * stride + c];
  const angles: number[] = [];
  for (let k = 1; k + 1 < m; ++k) {
    const a = [0, 1, 2].map((c) => at(k, c) - at(k - 1, c)), b = [0, 1, 2].map((c) => at(k + 1, c) - at(k, c));
    const na = Math.hypot(a[0], a[1], a[2]), nb = Math.hypot(b[0], b[1], b[2]);
    if (!(na > 0 && nb > 0)) continue;
    const cos = (a[0] * b[0] + a[1] * b[1] + a[2] * b[2]) / (na * nb);
    angles.push(Math.acos(Math.max(-1, Math.min(1, cos))));
  }
  if (angles.length < 4) return false;
  angles.sort((x, y) => x - y);
  const q = (p: number) => angles[Math.floor(p * (angles.length - 1))];
  // Not turning back on itself (a shuffled near-straight trace reverses at almost every point: pi).
  return q(0.5) < 2.5 && q(0.75) - q(0.25) < 0.3;
}
