import { InputError } from "../../errors.js";
import { unitToMetres } from "../mesh/units.js";
import type { InputUnit } from "../../types.js";

/**
 * Reads unordered points from text: one point per line, "x y z" or "x,y,z" (also ";" or tabs),
 * or two columns for a 2D cloud (z = 0). '#' starts a comment; a first line whose cells are all
 * non-numeric is a header and is skipped. Values are in `unit` and are converted to metres.
 * Numbers are read with Number(), so "1.2e" and "3nm" are rejected. Cost O(size).
 * @throws {InputError} "file:41: z: not a finite number: \"1.2e\"", "file:7: point: expected 3 values, got 4".
 */
export function parseCloudText(
  text: string,
  file: string,
  options: { readonly unit: InputUnit; readonly pixelSize?: number },
): { xyz: Float64Array; dims: 2 | 3 } {
  const toMetres = unitToMetres(options.unit, options.pixelSize, "parseCloudText");
  const lines = text.split(/\r\n|\r|\n/);
  const out: number[] = [];
  let cols = 0, seenData = false;
  for (let i = 0; i < lines.length; i++) {
    const body = lines[i].replace(/#.*$/, "").trim();
    if (body === "") continue;
    const cells = body.split(/[\s,;]+/);
    if (!seenData && cells.every((c) => Number.isNaN(Number(c)))) {
      seenData = true;
      continue; // header
    }
    seenData = true;
    if (cols === 0) {
      if (cells.length !== 2 && cells.length !== 3) throw new InputError(file, i + 1, "point", `expected 2 or 3 values, got ${cells.length}`);
      cols = cells.length;
    } else if (cells.length !== cols) {
      throw new InputError(file, i + 1, "point", `expected ${cols} values like the first point, got ${cells.length}`);
    }
    for (let k = 0; k < cols; k++) {
      const v = Number(cells[k]);
      if (!Number.isFinite(v)) throw new InputError(file, i + 1, "xyz"[k], `not a finite number: ${JSON.stringify(cells[k])}`);
      out.push(toMetres(v));
    }
    if (cols === 2) out.push(0);
  }
  if (out.length === 0) throw new InputError(file, null, "points", "none");
  return { xyz: Float64Array.from(out), dims: cols === 2 ? 2 : 3 };
}
