import { InputError } from "../../errors.js";

/**
 * Checks that every coordinate of a decoded vertex array is finite. With `perTriangle` (a triangle
 * soup such as STL) the message names the triangle and its corner, else the vertex (1-based).
 * @throws {InputError} "file: triangle 3: vertex 2: y: not a finite number (NaN)" or "file: vertex 12: z: ...".
 */
export function checkSoup(p: ArrayLike<number>, file: string, perTriangle = false): void {
  for (let i = 0; i < p.length; i++) {
    if (!Number.isFinite(p[i])) {
      const v = Math.floor(i / 3);
      const field = perTriangle ? `triangle ${Math.floor(v / 3) + 1}` : `vertex ${v + 1}`;
      const corner = perTriangle ? `vertex ${(v % 3) + 1}: ` : "";
      throw new InputError(file, null, field, `${corner}${"xyz"[i % 3]}: not a finite number (${p[i]})`);
    }
  }
}
