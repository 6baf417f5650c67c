import { ParameterError } from "../errors.js";
import { formatNumber } from "./formatNumber.js";

/** A regular grid of cells holding a vector per cell (zero outside the wire) and the wire mask. */
export interface TextureGrid {
  readonly nx: number;
  readonly ny: number;
  readonly nz: number;
  /** Cell edge (m), the same along x, y and z. */
  readonly cell: number;
  /** Lower corner of the grid (m). */
  readonly min: readonly [number, number, number];
  /** 3 values per cell, x index fastest, then y, then z; unit vectors inside the tube, 0 outside. */
  readonly values: Float64Array;
  /** 1 inside the tube, 0 outside, same cell order. */
  readonly mask: Uint8Array;
}

/** Most cells a grid may have (guards against a cell size given in the wrong unit: 3 x 8 bytes each). */
export const MAX_GRID_CELLS = 20_000_000;

/**
 * Samples a texture given at the sites of a centre line onto a regular grid: a cell belongs to the
 * wire when its centre lies within `radius` of the centre-line polyline; it takes the texture at the
 * nearest point of the polyline (linear blend of the two sites of that segment, normalised), else 0.
 * The grid covers the line's bounding box grown by the radius and one cell, centred on it.
 * Method: each segment visits only the cells of its own bounding box (grown by the radius), and a
 * cell keeps its nearest segment, so the cost is O(sites x (radius / cell)^2 x segment / cell) plus O(cells).
 * Units: metres in and out. `texture` holds 3 values per site.
 * @throws {ParameterError} a cell or radius that is not a positive length, or more than MAX_GRID_CELLS cells.
 * @example textureGrid(Float64Array.of(0,0,0, 1e-8,0,0), Float64Array.of(1,0,0, 1,0,0), false, 2e-9, 1e-9).mask.some((v) => v === 1) // true
 */
export function textureGrid(xyz: Float64Array, texture: Float64Array, closed: boolean, radius: number, cell: number): TextureGrid {
  if (!(Number.isFinite(cell) && cell > 0)) throw new ParameterError("textureGrid", "cell", `must be a positive length (got ${cell})`);
  if (!(Number.isFinite(radius) && radius > 0)) throw new ParameterError("textureGrid", "radius", `must be a positive length (got ${radius})`);
  const n = xyz.length / 3;
  const lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity];
  for (let i = 0; i < n; ++i) for (let d = 0; d < 3; ++d) { lo[d] = Math.min(lo[d], xyz[3 * i + d]); hi[d] = Math.max(hi[d], xyz[3 * i + d]); }
  const counts = [0, 0, 0], min: [number, number, number] = [0, 0, 0];
  for (let d = 0; d < 3; ++d) {
    const span = hi[d] - lo[d] + 2 * radius + 2 * cell;
    counts[d] = Math.max(1, Math.ceil(span / cell));
    min[d] = (lo[d] + hi[d]) / 2 - (counts[d] * cell) / 2;
  }
  const [nx, ny, nz] = counts;
  const cells = nx * ny * nz;
  if (cells > MAX_GRID_CELLS) {
    throw new ParameterError("textureGrid", "cell", `${nx} x ${ny} x ${nz} = ${cells} cells is more than ${MAX_GRID_CELLS}: use a larger cell (got ${cell} m)`);
  }
  const values = new Float64Array(3 * cells);
  const mask = new Uint8Array(cells);
  const best = new Float64Array(cells).fill(Infinity);
  const segs = closed && n > 2 ? n : n - 1;
  const r2 = radius * radius;
  for (let a = 0; a < Math.max(segs, n === 1 ? 1 : 0); ++a) {
    const b = n === 1 ? 0 : (a + 1) % n;
    const ax = xyz[3 * a], ay = xyz[3 * a + 1], az = xyz[3 * a + 2];
    const ex = xyz[3 * b] - ax, ey = xyz[3 * b + 1] - ay, ez = xyz[3 * b + 2] - az;
    const ee = ex * ex + ey * ey + ez * ez;
    const range = (d: number, p: number, q: number): [number, number] => [
      Math.max(0, Math.floor((Math.min(p, q) - radius - min[d]) / cell - 0.5)),
      Math.min(counts[d] - 1, Math.ceil((Math.max(p, q) + radius - min[d]) / cell - 0.5)),
    ];
    const [i0, i1] = range(0, ax, ax + ex), [j0, j1] = range(1, ay, ay + ey), [k0, k1] = range(2, az, az + ez);
    for (let kz = k0; kz <= k1; ++kz) {
      const cz = min[2] + (kz + 0.5) * cell - az;
      for (let jy = j0; jy <= j1; ++jy) {
        const cy = min[1] + (jy + 0.5) * cell - ay;
        for (let ix = i0; ix <= i1; ++ix) {
          const cx = min[0] + (ix + 0.5) * cell - ax;
          const t = ee > 0 ? Math.min(1, Math.max(0, (cx * ex + cy * ey + cz * ez) / ee)) : 0;
          const dx = cx - t * ex, dy = cy - t * ey, dz = cz - t * ez;
          const dd = dx * dx + dy * dy + dz * dz;
          const c = ix + nx * (jy + ny * kz);
          if (dd > r2 || dd >= best[c]) continue;
          best[c] = dd;
          mask[c] = 1;
          let vx = texture[3 * a] + t * (texture[3 * b] - texture[3 * a]);
          let vy = texture[3 * a + 1] + t * (texture[3 * b + 1] - texture[3 * a + 1]);
          let vz = texture[3 * a + 2] + t * (texture[3 * b + 2] - texture[3 * a + 2]);
          let norm = Math.hypot(vx, vy, vz);
          // opposite vectors at the two sites blend to ~0: take the nearer site's instead
          if (!(norm > 1e-6)) { const s = t < 0.5 ? a : b; vx = texture[3 * s]; vy = texture[3 * s + 1]; vz = texture[3 * s + 2]; norm = Math.hypot(vx, vy, vz) || 1; }
          values[3 * c] = vx / norm; values[3 * c + 1] = vy / norm; values[3 * c + 2] = vz / norm;
        }
      }
    }
  }
  return { nx, ny, nz, cell, min, values, mask };
}

/** The check value that opens an 8-byte binary data block of OVF 2.0. */
export const OVF_CHECK_8 = 123456789012345.0;

/** Options of {@link gridToOvf}. */
export interface OvfOptions {
  readonly title: string;
  /** Description lines (each written as a "Desc:" header line). */
  readonly desc: readonly string[];
  /** "text" (decimal numbers) or "binary8" (little-endian IEEE float64). */
  readonly data: "text" | "binary8";
  /** What to write: the vector field (3 components) or the mask (1 component). */
  readonly field: "vector" | "mask";
  /** Labels of the vector's components (e.g. m_x m_y m_z, or n_x n_y n_z for a Neel vector). */
  readonly labels?: readonly [string, string, string];
}

/**
 * A grid as an OVF 2.0 file (the trade's open vector-field format for finite-difference solvers):
 * header lines starting with "#" (mesh unit m, rectangular mesh, base = centre of the first cell,
 * node counts, step sizes, bounds, valuedim 3 or 1, labels, units), then one data block, x index
 * fastest, then y, then z. Text data: one cell per line. Binary 8: little-endian float64, opened by
 * the check value 123456789012345.0. Format: the OVF 2.0 description in the NIST OOMMF user guide
 * ("OVF 2.0 format"), from memory; the check value also as documented by public OVF readers.
 * Cost O(cells).
 */
export function gridToOvf(g: TextureGrid, o: OvfOptions): Uint8Array {
  const dim = o.field === "vector" ? 3 : 1;
  const labels = o.field === "vector" ? (o.labels ?? ["m_x", "m_y", "m_z"]).join(" ") : "inside";
  const units = o.field === "vector" ? "1 1 1" : "1";
  const max = [g.min[0] + g.nx * g.cell, g.min[1] + g.ny * g.cell, g.min[2] + g.nz * g.cell];
  const f = formatNumber;
  const head = [
    "# OOMMF OVF 2.0",
    "#",
    "# Segment count: 1",
    "#",
    "# Begin: Segment",
    "# Begin: Header",
    "#",
    `# Title: ${o.title.replace(/[\r\n]+/g, " ")}`,
    ...o.desc.map((d) => `# Desc: ${d.replace(/[\r\n]+/g, " ")}`),
    "#",
    "# meshtype: rectangular",
    "# meshunit: m",
    "#",
    `# xmin: ${f(g.min[0])}`, `# ymin: ${f(g.min[1])}`, `# zmin: ${f(g.min[2])}`,
    `# xmax: ${f(max[0])}`, `# ymax: ${f(max[1])}`, `# zmax: ${f(max[2])}`,
    "#",
    `# valuedim: ${dim}`,
    `# valuelabels: ${labels}`,
    `# valueunits: ${units}`,
    "#",
    `# xbase: ${f(g.min[0] + g.cell / 2)}`, `# ybase: ${f(g.min[1] + g.cell / 2)}`, `# zbase: ${f(g.min[2] + g.cell / 2)}`,
    `# xnodes: ${g.nx}`, `# ynodes: ${g.ny}`, `# znodes: ${g.nz}`,
    `# xstepsize: ${f(g.cell)}`, `# ystepsize: ${f(g.cell)}`, `# zstepsize: ${f(g.cell)}`,
    "#",
    "# End: Header",
    "#",
  ];
  const cells = g.nx * g.ny * g.nz;
  const enc = new TextEncoder();
  if (o.data === "text") {
    const rows: string[] = [];
    for (let c = 0; c < cells; ++c) {
      rows.push(dim === 3 ? `${f(g.values[3 * c])} ${f(g.values[3 * c + 1])} ${f(g.values[3 * c + 2])}` : String(g.mask[c]));
    }
    return enc.encode(`${[...head, "# Begin: Data Text", ...rows, "# End: Data Text", "# End: Segment"].join("\n")}\n`);
  }
  const top = enc.encode(`${[...head, "# Begin: Data Binary 8"].join("\n")}\n`);
  const tail = enc.encode("\n# End: Data Binary 8\n# End: Segment\n");
  const body = new DataView(new ArrayBuffer(8 * (1 + dim * cells)));
  body.setFloat64(0, OVF_CHECK_8, true);
  for (let c = 0; c < cells; ++c) {
    if (dim === 3) for (let d = 0; d < 3; ++d) body.setFloat64(8 * (1 + 3 * c + d), g.values[3 * c + d], true);
    else body.setFloat64(8 * (1 + c), g.mask[c], true);
  }
  const out = new Uint8Array(top.length + body.byteLength + tail.length);
  out.set(top, 0);
  out.set(new Uint8Array(body.buffer), top.length);
  out.set(tail, top.length + body.byteLength);
  return out;
}
