/** Small helpers on interleaved xyz polylines (internal). Lengths in m. */

/** Total length; for a closed polyline including the closing segment. */
export function polylineLength(p: Readonly<Float64Array>, closed: boolean): number {
  const n = p.length / 3;
  let L = 0;
  for (let i = 1; i < n + (closed ? 1 : 0); i++) {
    const a = 3 * (i - 1), b = 3 * (i % n);
    L += Math.hypot(p[b] - p[a], p[b + 1] - p[a + 1], p[b + 2] - p[a + 2]);
  }
  return L;
}

/** Uniform arc-length resampling at about `step` (the step is adjusted to divide the length). */
export function resample(p: Readonly<Float64Array>, closed: boolean, step: number): Float64Array {
  const n = p.length / 3;
  if (n < 2) return Float64Array.from(p);
  const L = polylineLength(p, closed);
  const m = closed ? Math.max(8, Math.round(L / step)) : Math.max(2, Math.round(L / step) + 1);
  const h = closed ? L / m : L / (m - 1);
  const out = new Float64Array(3 * m);
  let seg = 0, segStart = 0;
  let segLen = Math.hypot(p[3] - p[0], p[4] - p[1], p[5] - p[2]);
  const segs = closed ? n : n - 1;
  for (let i = 0; i < m; i++) {
    const s = i * h;
    while (seg < segs - 1 && segStart + segLen < s) {
      segStart += segLen;
      seg++;
      const a = 3 * seg, b = 3 * ((seg + 1) % n);
      segLen = Math.hypot(p[b] - p[a], p[b + 1] - p[a + 1], p[b + 2] - p[a + 2]);
    }
    const a = 3 * seg, b = 3 * ((seg + 1) % n);
    const f = segLen > 0 ? Math.min(1, Math.max(0, (s - segStart) / segLen)) : 0;
    for (let c = 0; c < 3; c++) out[3 * i + c] = p[a + c] + f * (p[b + c] - p[a + c]);
  }
  return out;
}

/** Running mean over 2 half + 1 points (windows shrink symmetrically at open ends, wrap when closed). */
export function runningMean(p: Readonly<Float64Array>, closed: boolean, half: number): Float64Array {
  const n = p.length / 3;
  const out = new Float64Array(p.length);
  for (let i = 0; i < n; i++) {
    const w = closed ? half : Math.min(half, i, n - 1 - i);
    for (let c = 0; c < 3; c++) {
      let s = 0;
      for (let k = -w; k <= w; k++) s += p[3 * ((((i + k) % n) + n) % n) + c];
      out[3 * i + c] = s / (2 * w + 1);
    }
  }
  return out;
}

/** Unit chord tangents P[i+m] - P[i-m] (one-sided, clamped, at open ends; wrapped when closed). */
export function chordTangents(p: Readonly<Float64Array>, closed: boolean, m: number): Float64Array {
  const n = p.length / 3;
  const out = new Float64Array(p.length);
  for (let i = 0; i < n; i++) {
    const a = closed ? (((i - m) % n) + n) % n : Math.max(0, i - m);
    const b = closed ? (i + m) % n : Math.min(n - 1, i + m);
    const dx = p[3 * b] - p[3 * a], dy = p[3 * b + 1] - p[3 * a + 1], dz = p[3 * b + 2] - p[3 * a + 2];
    const l = Math.hypot(dx, dy, dz) || 1;
    out[3 * i] = dx / l;
    out[3 * i + 1] = dy / l;
    out[3 * i + 2] = dz / l;
  }
  return out;
}
