import { describe, expect, it } from "vitest";
import { InputError, ParameterError } from "../../../src/errors.js";
import { decimateForDisplay } from "../../../src/import/svg/decimateForDisplay.js";
import { flattenPathData } from "../../../src/import/svg/pathData.js";
import { parseSvgPaths } from "../../../src/import/svg/parseSvgPaths.js";
import { parseTransform } from "../../../src/import/svg/transform.js";
import type { Trace } from "../../../src/types.js";

// Invented drawings. Calibration 1 nm per user unit unless a test says otherwise.
const svg = (body: string, root = 'viewBox="0 0 1000 1000"') => `<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg" ${root}>\n${body}\n</svg>\n`;
const read = (body: string, pixelSize = 1e-9) => parseSvgPaths(svg(body), "t.svg", { pixelSize });
const pts = (t: Trace) => Array.from({ length: t.xyz.length / 3 }, (_, i) => [t.xyz[3 * i] / 1e-9, t.xyz[3 * i + 1] / 1e-9]);

/** Circumradius of three points: abc / (4 area) (textbook triangle geometry; independent of any centre). */
const circumradius = (p: number[], q: number[], r: number[]) => {
  const a = Math.hypot(q[0] - r[0], q[1] - r[1]), b = Math.hypot(p[0] - r[0], p[1] - r[1]), c = Math.hypot(p[0] - q[0], p[1] - q[1]);
  const area2 = Math.abs((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]));
  return (a * b * c) / (2 * area2);
};

function inputError(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return (e as Error).message;
  }
  return "no error";
}

describe("SVG arcs (SVG 1.1 Appendix F.6.5 endpoint-to-centre conversion, F.6.6 radius correction)", () => {
  it("puts every point of an arc of radius R on a circle of radius R", () => {
    // large-arc and sweep flag combinations on a chord shorter than the diameter
    for (const flags of ["0 0", "0 1", "1 0", "1 1"]) {
      const [t] = read(`<path d="M 100 100 A 25 25 0 ${flags} 130 110"/>`);
      const p = pts(t);
      expect(p.length).toBeGreaterThan(8);
      for (let i = 1; i + 1 < p.length; i++) expect(circumradius(p[i - 1], p[i], p[i + 1])).toBeCloseTo(25, 6); // measured: relative error 1e-10 at worst (rounding, amplified for near-collinear triples)
      expect(p[p.length - 1]).toEqual([130, 110]);
    }
  });

  it("takes the large arc for flag 1 and the small one for flag 0 (F.6.5 sign rule)", () => {
    const len = (flags: string) => {
      const p = pts(read(`<path d="M 100 100 A 25 25 0 ${flags} 130 110"/>`)[0]);
      let L = 0;
      for (let i = 1; i < p.length; i++) L += Math.hypot(p[i][0] - p[i - 1][0], p[i][1] - p[i - 1][1]);
      return L;
    };
    // chord 31.6 on a circle of radius 25: small arc 2R asin(c/2R) = 34.2, large 2 pi R - 34.2 = 122.9
    expect(len("0 1")).toBeCloseTo(50 * Math.asin(Math.hypot(30, 10) / 50), 2);
    expect(len("1 1")).toBeCloseTo(2 * Math.PI * 25 - 50 * Math.asin(Math.hypot(30, 10) / 50), 1);
  });

  it("scales radii that are too small up to a half circle through the endpoints (F.6.6)", () => {
    const p = pts(read(`<path d="M 0 500 A 1 1 0 0 1 100 500"/>`)[0]);
    for (const q of p) expect(Math.hypot(q[0] - 50, q[1] - 500)).toBeCloseTo(50, 9);
    // sweep 1 from left to right passes over the top, y = 450 (y down); the samples come within 0.1
    expect(Math.min(...p.map((q) => q[1]))).toBeGreaterThan(450 - 1e-9);
    expect(Math.min(...p.map((q) => q[1]))).toBeLessThan(450.1);
  });

  it("draws a straight line for a zero radius and omits an arc to the same point (F.6.2)", () => {
    expect(pts(read(`<path d="M 0 0 A 0 10 0 0 1 10 10"/>`)[0])).toEqual([[0, 0], [10, 10]]);
    expect(pts(read(`<path d="M 0 0 L 5 0 A 10 10 0 0 1 5 0"/>`)[0])).toEqual([[0, 0], [5, 0]]);
  });
});

describe("flattenPathData(d, ...) (SVG 1.1 section 8.3 path data)", () => {
  const flat = (d: string) => flattenPathData(d, "t.svg", 1, "path d", 1);
  it("gives the same points for relative and absolute commands (M L H V C S Q T A Z)", () => {
    const rel = flat("m10 10 l20 0 h10 v10 c5 0 10 5 10 10 s5 10 10 10 q5 5 10 0 t10 0 a5 5 0 0 1 10 0 z");
    const abs = flat("M10 10 L30 10 H40 V20 C45 20 50 25 50 30 S55 40 60 40 Q65 45 70 40 T80 40 A5 5 0 0 1 90 40 Z");
    expect(rel).toHaveLength(1);
    expect(rel[0].closed).toBe(true);
    expect(rel[0].points.length).toBe(abs[0].points.length);
    rel[0].points.forEach((v, i) => expect(v).toBeCloseTo(abs[0].points[i], 9));
  });

  it("reads compact numbers and arc flags without separators", () => {
    expect(flat("M0,0L10-5.5.5.5")[0].points).toEqual([0, 0, 10, -5.5, 0.5, 0.5]);
    const a = flat("M0 0a25,25 0 1050 50")[0].points, b = flat("M0 0 a 25 25 0 1 0 50 50")[0].points;
    expect(a).toEqual(b);
    expect(flat("M 1e1 2E-1 l 1e+1 0")[0].points).toEqual([10, 0.2, 20, 0.2]);
  });

  it("samples cubic Beziers exactly on the curve (checked against de Casteljau's construction)", () => {
    const P = [[0, 0], [10, 40], [60, 40], [80, 0]];
    const deCasteljau = (t: number) => {
      let q = P.map((p) => [...p]);
      while (q.length > 1) q = q.slice(1).map((p, i) => [q[i][0] + t * (p[0] - q[i][0]), q[i][1] + t * (p[1] - q[i][1])]);
      return q[0];
    };
    const p = flattenPathData("M0 0 C10 40 60 40 80 0", "t.svg", 1, "d", 1000)[0].points; // 8 segments
    expect(p.length / 2).toBe(9);
    for (let j = 0; j <= 8; j++) {
      const [x, y] = deCasteljau(j / 8);
      expect(p[2 * j]).toBeCloseTo(x, 12);
      expect(p[2 * j + 1]).toBeCloseTo(y, 12);
    }
  });

  it("reflects the control point for S and T, and falls back to the current point without a previous curve", () => {
    // S after C reflects (60,40) about (80,0) to (100,-40): same as C with that control point
    const s = flat("M0 0 C10 40 60 40 80 0 S150 -40 160 0")[0].points, c = flat("M0 0 C10 40 60 40 80 0 C100 -40 150 -40 160 0")[0].points;
    s.forEach((v, i) => expect(v).toBeCloseTo(c[i], 12));
    const t = flat("M0 0 T10 0")[0].points;
    expect(t[t.length - 2]).toBe(10);
    expect(t.every((v, i) => i % 2 === 0 || v === 0)).toBe(true); // a straight quadratic along y = 0
  });

  it("starts a new subpath after Z at the closed subpath's start", () => {
    const s = flat("M0 0 L10 0 L10 10 Z L 0 10");
    expect(s.map((x) => x.closed)).toEqual([true, false]);
    expect(s[1].points).toEqual([0, 0, 0, 10]);
  });
});

describe("parseSvgPaths(data, file, options)", () => {
  it("returns one planar-projection wire per path, z = 0, closed when the path ends in Z", () => {
    const traces = read(`<path d="M0 0 L10 0 L10 10 Z"/><g><polyline points="0,0 5,5 10,0"/></g><defs><path d="M0 0 L1 1"/></defs>`);
    expect(traces).toHaveLength(2);
    for (const t of traces) {
      expect(t.dims).toBe(2);
      expect(t.planarProjection).toBe(true);
      for (let i = 2; i < t.xyz.length; i += 3) expect(t.xyz[i]).toBe(0);
      expect(t.source).toEqual({ file: "t.svg", unit: "px", pixelSize: 1e-9 });
    }
    expect(traces.map((t) => t.closed)).toEqual([true, false]);
    expect(pts(traces[0])).toEqual([[0, 0], [10, 0], [10, 10]]);
  });

  it("applies the transforms of the path and all its groups (CTM = parent x own, SVG 1.1 section 7.5)", () => {
    const [t] = read(`<g transform="translate(10,20) rotate(90)"><g transform="matrix(1 0 0 1 0 0)"><path transform="scale(2)" d="M1 0 L2 0"/></g></g>`);
    const p = pts(t);
    // (1,0) -> scale 2 -> (2,0) -> rotate 90 deg -> (0,2) -> translate -> (10,22)
    expect(p[0][0]).toBeCloseTo(10, 12);
    expect(p[0][1]).toBeCloseTo(22, 12);
    expect(p[1][0]).toBeCloseTo(10, 12);
    expect(p[1][1]).toBeCloseTo(24, 12);
    // rotate about a centre equals translate(c) rotate translate(-c) (SVG 1.1 section 7.6)
    const a = parseTransform("rotate(30 5 7)", "t.svg", 1), b = parseTransform("translate(5 7) rotate(30) translate(-5 -7)", "t.svg", 1);
    a.forEach((v, i) => expect(v).toBeCloseTo(b[i], 12));
    expect(parseTransform("skewX(45)", "t.svg", 1)[2]).toBeCloseTo(1, 12);
  });

  it("calibrates from a physical width/height over the viewBox, or from the pixel size", () => {
    const text = `<svg xmlns="http://www.w3.org/2000/svg" width="10mm" height="10mm" viewBox="0 0 100 100"><path d="M0 0 L50 0"/></svg>`;
    const [t] = parseSvgPaths(text, "m.svg");
    expect(t.xyz[3]).toBeCloseTo(5e-3, 15); // 50 units of 0.1 mm
    expect(t.source.pixelSize).toBeCloseTo(1e-4, 18);
    const [u] = parseSvgPaths(text.replace(/10mm/g, "2um"), "u.svg");
    expect(u.xyz[3]).toBeCloseTo(1e-6, 18);
    const [v] = parseSvgPaths(text, "m.svg", { pixelSize: 2e-9 }); // the pixel size wins
    expect(v.xyz[3]).toBeCloseTo(1e-7, 20);
    const [w] = parseSvgPaths(text.replace('height="10mm"', 'height="20mm" preserveAspectRatio="none"').replace('d="M0 0 L50 0"', 'd="M0 0 L50 50"'), "n.svg");
    expect(w.xyz[3] / w.xyz[4]).toBeCloseTo(0.5, 12);
    expect(inputError(() => parseSvgPaths(`<svg viewBox="0 0 10 10"><path d="M0 0 L1 1"/></svg>`, "p.svg"))).toBe(
      "p.svg:1: svg: no pixel calibration: give --pixel-size, the size of one user unit (e.g. --pixel-size 2.5nm; `pixelSize` in metres from the library), or give the root <svg> a width or height in a physical unit (mm, cm, in, pt, pc, or m, um, nm) with a viewBox",
    );
  });

  it("splits a path with several drawn subpaths into wires, with a diagnostic", () => {
    const traces = read(`<path id="two" d="M0 0 L10 0 M20 0 L30 0"/>`);
    expect(traces).toHaveLength(2);
    expect(traces[1].diagnostics).toEqual(["path#two (line 3): subpath 2 of 2, taken as a separate wire"]);
  });

  it("fails clearly on malformed path data, XML and files without paths, naming the line", () => {
    expect(inputError(() => read(`<path id="w1" d="M 0 0 L 10 x"/>`))).toBe('t.svg:3: path#w1 d: expected a number at character 12, got "x"');
    expect(inputError(() => read(`<path d="L 0 0"/>`))).toBe('t.svg:3: path 1 d: path data must start with M or m at character 1, got "L 0 0"');
    expect(inputError(() => read(`<path d="M 0 0 A 5 5 0 2 0 9 9"/>`))).toBe('t.svg:3: path 1 d: expected an arc flag 0 or 1 at character 15, got "2 0 9 9"');
    expect(inputError(() => read(`<path d="M 0 0 L 1 1"/>\n<path d="M 0 0 C 1 1 2"/>`))).toBe("t.svg:4: path 2 d: expected a number at character 14, got the end");
    expect(inputError(() => parseSvgPaths(svg(`<g>\n<path d="M0 0 L1 1"/>`).replace("</svg>\n", ""), "cut.svg", { pixelSize: 1e-9 }))).toBe(
      "cut.svg:3: xml: <g> is never closed (truncated file?)",
    );
    expect(inputError(() => parseSvgPaths(`<svg viewBox="0 0 1 1">\n<path d="M0 0 L1`, "cut.svg", { pixelSize: 1e-9 }))).toBe(
      "cut.svg:2: xml: unterminated value of attribute d in <path>",
    );
    expect(inputError(() => read(`<rect width="5" height="5"/>`))).toBe("t.svg: svg: no <path> with path data");
    expect(inputError(() => read(`<g transform="translate(1,x)"><path d="M0 0 L1 1"/></g>`))).toBe('t.svg:3: transform: expected a number in translate(...), got "x"');
  });
});

describe("decimateForDisplay(trace, tolerance)", () => {
  it("thins a dense 2D trace with simplify-js, keeping the ends, and refuses 3D traces", () => {
    const [t] = read(`<path d="M 0 500 A 200 200 0 0 1 400 500"/>`, 1e-9);
    const d = decimateForDisplay(t, 0.5e-9);
    expect(d.xyz.length).toBeLessThan(t.xyz.length);
    expect([...d.xyz.subarray(0, 3)]).toEqual([...t.xyz.subarray(0, 3)]);
    expect([...d.xyz.subarray(-3)]).toEqual([...t.xyz.subarray(-3)]);
    // every dropped point is within the tolerance of the kept polyline (Douglas-Peucker guarantee)
    expect(() => decimateForDisplay({ ...t, dims: 3 }, 1e-9)).toThrow(ParameterError);
    expect(t.xyz.length).toBe(3 * pts(t).length); // the input is not modified
  });
});
