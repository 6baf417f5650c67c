/**
 * Static 3D k-d tree over interleaved points, stored as a permutation of indices with the median of
 * each range at its middle (the implicit layout of mourner's kdbush, extended to 3D and to k
 * nearest neighbours; Friedman, Bentley & Finkel 1977, ACM TOMS 3:209). Build O(n log n), query
 * about O(log n + k). Internal helper of `orderCloud`.
 */
export class KdTree {
  readonly ids: Uint32Array;
  constructor(readonly xyz: Readonly<Float64Array>, subset?: ArrayLike<number>) {
    const n = subset ? subset.length : xyz.length / 3;
    this.ids = new Uint32Array(n);
    for (let i = 0; i < n; i++) this.ids[i] = subset ? subset[i] : i;
    this.build(0, n - 1, 0);
  }

  private build(lo: number, hi: number, axis: number): void {
    if (hi - lo < 1) return;
    const m = (lo + hi) >> 1;
    this.select(m, lo, hi, axis);
    const next = (axis + 1) % 3;
    this.build(lo, m - 1, next);
    this.build(m + 1, hi, next);
  }

  /** Floyd-Rivest-free quickselect (Hoare partition) putting the k-th smallest along `axis` at k. */
  private select(k: number, lo: number, hi: number, axis: number): void {
    const ids = this.ids, p = this.xyz;
    while (hi > lo) {
      const pivot = p[3 * ids[(lo + hi) >> 1] + axis];
      let i = lo, j = hi;
      while (i <= j) {
        while (p[3 * ids[i] + axis] < pivot) i++;
        while (p[3 * ids[j] + axis] > pivot) j--;
        if (i <= j) {
          const t = ids[i];
          ids[i] = ids[j];
          ids[j] = t;
          i++;
          j--;
        }
      }
      if (k <= j) hi = j;
      else if (k >= i) lo = i;
      else return;
    }
  }

  /**
   * The k nearest points to (x, y, z), nearest first, written to outIds / outD2 (squared distances);
   * returns how many were found. `skip` (a point index) is left out, for neighbours of a point.
   */
  knn(x: number, y: number, z: number, k: number, outIds: Uint32Array, outD2: Float64Array, skip = -1): number {
    let count = 0;
    const ids = this.ids, p = this.xyz;
    const visit = (lo: number, hi: number, axis: number): void => {
      if (lo > hi) return;
      const m = (lo + hi) >> 1;
      const id = ids[m];
      const dx = p[3 * id] - x, dy = p[3 * id + 1] - y, dz = p[3 * id + 2] - z;
      const d2 = dx * dx + dy * dy + dz * dz;
      if (id !== skip && (count < k || d2 < outD2[count - 1])) {
        let i = count < k ? count++ : count - 1;
        while (i > 0 && outD2[i - 1] > d2) {
          outD2[i] = outD2[i - 1];
          outIds[i] = outIds[i - 1];
          i--;
        }
        outD2[i] = d2;
        outIds[i] = id;
      }
      const diff = (axis === 0 ? x : axis === 1 ? y : z) - p[3 * id + axis];
      const next = (axis + 1) % 3;
      const near = diff < 0 ? [lo, m - 1] : [m + 1, hi];
      const far = diff < 0 ? [m + 1, hi] : [lo, m - 1];
      visit(near[0], near[1], next);
      if (count < k || diff * diff < outD2[count - 1]) visit(far[0], far[1], next);
    };
    visit(0, ids.length - 1, 0);
    return count;
  }
}
