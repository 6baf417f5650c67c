import { InputError } from "../../errors.js";

/** 2D affine map [a, b, c, d, e, f]: (x, y) -> (a x + c y + e, b x + d y + f), as in SVG's matrix(). */
export type Affine = readonly [number, number, number, number, number, number];

export const IDENTITY: Affine = [1, 0, 0, 1, 0, 0];

/** The product m1 * m2: apply m2 first, then m1 (so transform="m1 m2" is multiply(m1, m2)). */
export function multiply(m1: Affine, m2: Affine): Affine {
  const [a, b, c, d, e, f] = m1, [A, B, C, D, E, F] = m2;
  return [a * A + c * B, b * A + d * B, a * C + c * D, b * C + d * D, a * E + c * F + e, b * E + d * F + f];
}

const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/;

/**
 * Parses an SVG transform list (SVG 1.1 section 7.6, "The 'transform' attribute"): matrix,
 * translate, scale, rotate (with optional centre), skewX, skewY; angles in degrees. The list
 * "A B" composes as A * B (B applied first).
 * @throws {InputError} "file:8: transform: expected a number in translate(...), got \"x\"".
 */
export function parseTransform(text: string, file: string, line: number): Affine {
  let m: Affine = IDENTITY;
  let s = text.trim();
  while (s.length > 0) {
    const head = /^([A-Za-z]+)\s*\(([^)]*)\)\s*,?\s*/.exec(s);
    if (head === null) throw new InputError(file, line, "transform", `expected name(numbers), got ${JSON.stringify(s.slice(0, 24))}`);
    const name = head[1];
    const args: number[] = [];
    let rest = head[2].trim();
    while (rest.length > 0) {
      const n = NUMBER.exec(rest);
      if (n === null) throw new InputError(file, line, "transform", `expected a number in ${name}(...), got ${JSON.stringify(rest.slice(0, 12))}`);
      args.push(Number(n[0]));
      rest = rest.slice(n[0].length).replace(/^[\s,]+/, "");
    }
    const need = (...counts: number[]) => {
      if (!counts.includes(args.length)) throw new InputError(file, line, "transform", `${name}() takes ${counts.join(" or ")} numbers, got ${args.length}`);
    };
    const rad = (deg: number) => (deg * Math.PI) / 180;
    let t: Affine;
    switch (name) {
      case "matrix":
        need(6);
        t = [args[0], args[1], args[2], args[3], args[4], args[5]];
        break;
      case "translate":
        need(1, 2);
        t = [1, 0, 0, 1, args[0], args[1] ?? 0];
        break;
      case "scale":
        need(1, 2);
        t = [args[0], 0, 0, args[1] ?? args[0], 0, 0];
        break;
      case "rotate": {
        need(1, 3);
        const c = Math.cos(rad(args[0])), sn = Math.sin(rad(args[0]));
        const r: Affine = [c, sn, -sn, c, 0, 0];
        t = args.length === 3 ? multiply(multiply([1, 0, 0, 1, args[1], args[2]], r), [1, 0, 0, 1, -args[1], -args[2]]) : r;
        break;
      }
      case "skewX":
        need(1);
        t = [1, 0, Math.tan(rad(args[0])), 1, 0, 0];
        break;
      case "skewY":
        need(1);
        t = [1, Math.tan(rad(args[0])), 0, 1, 0, 0];
        break;
      default:
        throw new InputError(file, line, "transform", `unknown transform ${JSON.stringify(name)}`);
    }
    m = multiply(m, t);
    s = s.slice(head[0].length);
  }
  return m;
}
