import { InputError } from "../../errors.js";
import { arcCentre, arcPoint } from "./arc.js";

/** One subpath flattened to points (user units, before transforms). */
export interface Subpath {
  /** x, y interleaved; consecutive duplicates removed. */
  readonly points: number[];
  /** Ended with Z/z. */
  readonly closed: boolean;
}

type Seg =
  | { t: "M"; x: number; y: number }
  | { t: "L"; x: number; y: number }
  | { t: "C"; x1: number; y1: number; x2: number; y2: number; x: number; y: number }
  | { t: "Q"; x1: number; y1: number; x: number; y: number }
  | { t: "A"; rx: number; ry: number; rot: number; large: boolean; sweep: boolean; x: number; y: number }
  | { t: "Z" };


/**
 * Parses SVG path data (SVG 1.1 section 8.3, grammar 8.3.9: M L H V C S Q T A Z in absolute and
 * relative forms, implicit repetition, a moveto followed by implicit linetos, numbers such as
 * "1.5.5" = 1.5 .5 and "1-2" = 1 -2, arc flags without separators) into absolute segments, with the
 * reflected control points of S and T (8.3.6, 8.3.7). `where` names the element in errors.
 * @throws {InputError} "file:12: path#w1 d: expected a number at character 14, got \"x\"".
 */
function parseSegments(d: string, file: string, line: number, field: string): Seg[] {
  const segs: Seg[] = [];
  let i = 0;
  const n = d.length;
  const skip = () => {
    while (i < n && (d[i] === " " || d[i] === "\t" || d[i] === "\n" || d[i] === "\r" || d[i] === "\f" || d[i] === ",")) i++;
  };
  const fail = (what: string): never => {
    throw new InputError(file, line, field, `${what} at character ${i + 1}, got ${i < n ? JSON.stringify(d.slice(i, i + 8)) : "the end"}`);
  };
  const number = (): number => {
    skip();
    const m = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/.exec(d.slice(i, i + 64));
    if (m === null) return fail("expected a number");
    i += m[0].length;
    return Number(m[0]);
  };
  const flag = (): boolean => {
    skip();
    if (d[i] === "0" || d[i] === "1") return d[i++] === "1";
    return fail("expected an arc flag 0 or 1");
  };
  let cx = 0, cy = 0, sx = 0, sy = 0;
  let lastC: [number, number] | null = null, lastQ: [number, number] | null = null;
  let cmd = "";
  let started = false;
  skip();
  while (i < n) {
    skip();
    if (i >= n) break;
    const ch = d[i];
    if (/[MmLlHhVvCcSsQqTtAaZz]/.test(ch)) {
      if (!started && ch !== "M" && ch !== "m") fail("path data must start with M or m");
      cmd = ch;
      i++;
    } else if (cmd === "" || cmd === "Z" || cmd === "z") {
      fail(cmd === "" ? "path data must start with M or m" : "expected a command after Z");
    } else if (cmd === "M") cmd = "L";
    else if (cmd === "m") cmd = "l";
    const up = cmd.toUpperCase();
    if (!started && up !== "M") fail("path data must start with M or m");
    started = true;
    const rel = cmd !== up;
    const ox = rel ? cx : 0, oy = rel ? cy : 0;
    let nextC: [number, number] | null = null, nextQ: [number, number] | null = null;
    switch (up) {
      case "M": {
        const x = number() + ox, y = number() + oy;
        segs.push({ t: "M", x, y });
        cx = sx = x;
        cy = sy = y;
        break;
      }
      case "L": {
        const x = number() + ox, y = number() + oy;
        segs.push({ t: "L", x, y });
        cx = x;
        cy = y;
        break;
      }
      case "H": {
        const x = number() + ox;
        segs.push({ t: "L", x, y: cy });
        cx = x;
        break;
      }
      case "V": {
        const y = number() + (rel ? cy : 0);
        segs.push({ t: "L", x: cx, y });
        cy = y;
        break;
      }
      case "C":
      case "S": {
        let x1: number, y1: number;
        if (up === "C") {
          x1 = number() + ox;
          y1 = number() + oy;
        } else {
          x1 = lastC ? 2 * cx - lastC[0] : cx;
          y1 = lastC ? 2 * cy - lastC[1] : cy;
        }
        const x2 = number() + ox, y2 = number() + oy, x = number() + ox, y = number() + oy;
        segs.push({ t: "C", x1, y1, x2, y2, x, y });
        nextC = [x2, y2];
        cx = x;
        cy = y;
        break;
      }
      case "Q":
      case "T": {
        let x1: number, y1: number;
        if (up === "Q") {
          x1 = number() + ox;
          y1 = number() + oy;
        } else {
          x1 = lastQ ? 2 * cx - lastQ[0] : cx;
          y1 = lastQ ? 2 * cy - lastQ[1] : cy;
        }
        const x = number() + ox, y = number() + oy;
        segs.push({ t: "Q", x1, y1, x, y });
        nextQ = [x1, y1];
        cx = x;
        cy = y;
        break;
      }
      case "A": {
        const rx = number(), ry = number(), rot = number(), large = flag(), sweep = flag();
        const x = number() + ox, y = number() + oy;
        segs.push({ t: "A", rx, ry, rot, large, sweep, x, y });
        cx = x;
        cy = y;
        break;
      }
      case "Z":
        segs.push({ t: "Z" });
        cx = sx;
        cy = sy;
        break;
    }
    lastC = nextC;
    lastQ = nextQ;
  }
  if (!started) throw new InputError(file, line, field, "empty path data");
  return segs;
}

/**
 * Flattens SVG path data into subpaths of points: lines keep their vertices; Bezier curves are
 * sampled uniformly in their parameter and arcs uniformly in angle, each with about one point per
 * `maxStep` of its control-polygon (or arc) length and at least 8 segments. Points lie exactly on
 * the curves (Bernstein form of the Bezier; F.6.3 for arcs), so the result is only coarser, never
 * biased. Default `maxStep`: 1/1000 of the path's total control-polygon length.
 * A drawing command after Z starts a new subpath at the closed subpath's start (8.3.3).
 */
export function flattenPathData(d: string, file: string, line: number, field: string, maxStep?: number): Subpath[] {
  const segs = parseSegments(d, file, line, field);
  // rough length, for the default sampling step
  let total = 0, px = 0, py = 0, sx = 0, sy = 0;
  for (const s of segs) {
    if (s.t === "M") {
      px = sx = s.x;
      py = sy = s.y;
      continue;
    }
    if (s.t === "Z") {
      total += Math.hypot(sx - px, sy - py);
      px = sx;
      py = sy;
      continue;
    }
    if (s.t === "C") total += Math.hypot(s.x1 - px, s.y1 - py) + Math.hypot(s.x2 - s.x1, s.y2 - s.y1) + Math.hypot(s.x - s.x2, s.y - s.y2);
    else if (s.t === "Q") total += Math.hypot(s.x1 - px, s.y1 - py) + Math.hypot(s.x - s.x1, s.y - s.y1);
    else if (s.t === "A") total += (Math.PI / 2) * Math.hypot(s.x - px, s.y - py) + Math.PI * Math.max(Math.abs(s.rx), Math.abs(s.ry));
    else total += Math.hypot(s.x - px, s.y - py);
    px = s.x;
    py = s.y;
  }
  const step = maxStep ?? (total > 0 ? total / 1000 : 1);
  const out: Subpath[] = [];
  let cur: number[] = [];
  let closed = false;
  const finish = () => {
    if (cur.length >= 2) out.push({ points: cur, closed });
    cur = [];
    closed = false;
  };
  const add = (x: number, y: number) => {
    const m = cur.length;
    if (m >= 2 && cur[m - 2] === x && cur[m - 1] === y) return;
    cur.push(x, y);
  };
  const count = (len: number) => Math.max(8, Math.ceil(len / step));
  px = py = sx = sy = 0;
  for (const s of segs) {
    if (s.t === "M") {
      finish();
      px = sx = s.x;
      py = sy = s.y;
      add(px, py);
      continue;
    }
    if (cur.length === 0) add(px, py); // a drawing command after Z starts a new subpath here
    switch (s.t) {
      case "L":
        add(s.x, s.y);
        break;
      case "C": {
        const k = count(Math.hypot(s.x1 - px, s.y1 - py) + Math.hypot(s.x2 - s.x1, s.y2 - s.y1) + Math.hypot(s.x - s.x2, s.y - s.y2));
        for (let j = 1; j < k; j++) {
          const t = j / k, u = 1 - t;
          const b0 = u * u * u, b1 = 3 * u * u * t, b2 = 3 * u * t * t, b3 = t * t * t;
          add(b0 * px + b1 * s.x1 + b2 * s.x2 + b3 * s.x, b0 * py + b1 * s.y1 + b2 * s.y2 + b3 * s.y);
        }
        add(s.x, s.y);
        break;
      }
      case "Q": {
        const k = count(Math.hypot(s.x1 - px, s.y1 - py) + Math.hypot(s.x - s.x1, s.y - s.y1));
        for (let j = 1; j < k; j++) {
          const t = j / k, u = 1 - t;
          add(u * u * px + 2 * u * t * s.x1 + t * t * s.x, u * u * py + 2 * u * t * s.y1 + t * t * s.y);
        }
        add(s.x, s.y);
        break;
      }
      case "A": {
        const a = arcCentre(px, py, s.rx, s.ry, s.rot, s.large, s.sweep, s.x, s.y);
        if (a !== null) {
          const k = count(Math.abs(a.dtheta) * Math.max(a.rx, a.ry));
          for (let j = 1; j < k; j++) {
            const [x, y] = arcPoint(a, a.theta1 + (a.dtheta * j) / k);
            add(x, y);
          }
        }
        add(s.x, s.y);
        break;
      }
      case "Z":
        closed = true;
        // the closing point is the start point: drop a repeated start
        if (cur.length >= 4 && cur[cur.length - 2] === sx && cur[cur.length - 1] === sy) cur.length -= 2;
        finish();
        px = sx;
        py = sy;
        continue;
    }
    px = s.x;
    py = s.y;
  }
  finish();
  return out;
}
