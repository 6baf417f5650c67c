import { describe, expect, it } from "vitest";
import { ParameterError } from "../../src/errors.js";
import { tubeMesh, type TubeMesh } from "../../src/export/tubeMesh.js";

/** Straight line along x from 0 to len, or a circle of radius R in the xy plane, with tangents. */
function line(n: number, len: number, shift = 0): [Float64Array, Float64Array] {
  const p = new Float64Array(3 * n), t = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) { p[3 * i] = shift + (len * i) / (n - 1); p[3 * i + 1] = shift; p[3 * i + 2] = shift; t[3 * i] = 1; }
  return [p, t];
}
function circle(n: number, R: number, shift = 0): [Float64Array, Float64Array] {
  const p = new Float64Array(3 * n), t = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    const a = (2 * Math.PI * i) / n;
    p.set([shift + R * Math.cos(a), shift + R * Math.sin(a), shift], 3 * i);
    t.set([-Math.sin(a), Math.cos(a), 0], 3 * i);
  }
  return [p, t];
}

/** Signed volume by the divergence theorem (sum of tetrahedra to the origin); > 0 for outward triangles. */
function signedVolume(m: TubeMesh): number {
  const P = m.positions, I = m.indices;
  let v = 0;
  for (let f = 0; f < I.length; f += 3) {
    const a = 3 * I[f], b = 3 * I[f + 1], c = 3 * I[f + 2];
    v += P[a] * (P[b + 1] * P[c + 2] - P[b + 2] * P[c + 1]) - P[a + 1] * (P[b] * P[c + 2] - P[b + 2] * P[c]) + P[a + 2] * (P[b] * P[c + 1] - P[b + 1] * P[c]);
  }
  return v / 6;
}

/** Every undirected edge is used by exactly two triangles, once in each direction (closed, consistently oriented). */
function isClosedOriented(m: TubeMesh): boolean {
  const seen = new Map<string, number>();
  const I = m.indices;
  for (let f = 0; f < I.length; f += 3) {
    for (let e = 0; e < 3; ++e) {
      const a = I[f + e], b = I[f + ((e + 1) % 3)];
      const key = `${a},${b}`;
      seen.set(key, (seen.get(key) ?? 0) + 1);
    }
  }
  for (const [key, count] of seen) {
    const [a, b] = key.split(",");
    if (count !== 1 || seen.get(`${b},${a}`) !== 1) return false;
  }
  return true;
}

describe("tubeMesh(points, tangents, closed, radius)", () => {
  it("a straight tube is a closed prism whose volume is the regular polygon's area times the length", () => {
    // Area of a regular n-gon of circumradius r: (n/2) r^2 sin(2 pi / n) (textbook formula,
    // https://en.wikipedia.org/wiki/Regular_polygon#Area); the caps are flat, so the prism volume is exact.
    const [p, t] = line(11, 100);
    const m = tubeMesh(p, t, false, 2, { radial: 16 });
    expect(isClosedOriented(m)).toBe(true);
    const area = (16 / 2) * 4 * Math.sin((2 * Math.PI) / 16);
    expect(Math.abs(signedVolume(m) / (area * 100) - 1)).toBeLessThan(1e-6); // measured 3.7e-8 (float32 rounding)
  });

  it("a closed ring is a closed torus with no seam, its volume by Pappus within 0.1%", () => {
    // Pappus's centroid theorem: V = (cross-section area) x 2 pi R (https://en.wikipedia.org/wiki/Pappus%27s_centroid_theorem);
    // the polygonal ring of 400 rings differs from the smooth torus by O((2 pi / 400)^2).
    const [p, t] = circle(400, 50);
    const m = tubeMesh(p, t, true, 1, { radial: 12 });
    expect(m.closed).toBe(true);
    expect(m.positions.length / 3).toBe(400 * 12);
    expect(isClosedOriented(m)).toBe(true);
    const area = 6 * Math.sin((2 * Math.PI) / 12);
    expect(Math.abs(signedVolume(m) / (area * 2 * Math.PI * 50) - 1)).toBeLessThan(1e-3); // measured 4.1e-5
  });

  it("subtracts the centroid of the centre line, so float32 keeps the radius far from the origin", () => {
    const shift = 1e4; // 10 um in nm: float32 spacing there is ~1e-3, larger than a 0.05 nm detail
    const [p, t] = circle(200, 30, shift);
    const m = tubeMesh(p, t, true, 0.5);
    expect(m.offset[0]).toBeCloseTo(shift, 6);
    expect(m.offset[2]).toBeCloseTo(shift, 6);
    // every vertex lies at the radius from its ring's centre (the centred centre line)
    for (let r = 0; r < m.rings; r += 7) {
      const cx = p[3 * r] - m.offset[0], cy = p[3 * r + 1] - m.offset[1], cz = p[3 * r + 2] - m.offset[2];
      for (let j = 0; j < m.radial; ++j) {
        const o = 3 * (r * m.radial + j);
        const d = Math.hypot(m.positions[o] - cx, m.positions[o + 1] - cy, m.positions[o + 2] - cz);
        expect(Math.abs(d / 0.5 - 1)).toBeLessThan(1e-4); // float32 of coordinates ~30: 2e-6 absolute
      }
    }
  });

  it("does not twist where the curve turns: neighbouring rings keep their vertices in step", () => {
    // a planar S-bend whose Frenet normal flips at the inflection; the transported frame does not
    const n = 300, p = new Float64Array(3 * n), t = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) {
      const x = -3 + (6 * i) / (n - 1), y = Math.sin(x), dy = Math.cos(x), d = Math.hypot(1, dy);
      p.set([x, y, 0], 3 * i);
      t.set([1 / d, dy / d, 0], 3 * i);
    }
    const m = tubeMesh(p, t, false, 0.05, { radial: 8 });
    let worst = 0;
    for (let r = 0; r + 1 < m.rings; ++r) {
      for (let j = 0; j < 8; ++j) {
        const a = 3 * (r * 8 + j), b = 3 * ((r + 1) * 8 + j);
        worst = Math.max(worst, Math.hypot(m.positions[a] - m.positions[b], m.positions[a + 1] - m.positions[b + 1], m.positions[a + 2] - m.positions[b + 2]));
      }
    }
    const step = 6 / (n - 1) * Math.hypot(1, 1);
    expect(worst).toBeLessThan(1.5 * step); // a flipped ring would give ~2 x radius + step
  });

  it("skips repeated points, subsamples long lines to maxRings, and refuses a bad radius or too few points", () => {
    const [p, t] = line(5, 4);
    const dup = Float64Array.from([...p.subarray(0, 3), ...p]);
    const dupT = Float64Array.from([...t.subarray(0, 3), ...t]);
    expect(tubeMesh(dup, dupT, false, 0.1).rings).toBe(5);
    const [lp, lt] = line(10_001, 1000);
    expect(tubeMesh(lp, lt, false, 0.1, { maxRings: 1000 }).rings).toBeLessThanOrEqual(1001);
    expect(() => tubeMesh(p, t, false, 0)).toThrow(new ParameterError("tubeMesh", "radius", "must be a positive length (got 0)"));
    expect(() => tubeMesh(p, t, false, 1, { radial: 2 })).toThrow(/radial: must be an integer >= 3/);
    expect(() => tubeMesh(Float64Array.of(1, 1, 1, 1, 1, 1), Float64Array.of(1, 0, 0, 1, 0, 0), false, 1)).toThrow(/at least 2 distinct/);
  });
});
