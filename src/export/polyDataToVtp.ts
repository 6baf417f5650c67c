import { formatNumber } from "./formatNumber.js";

/** A per-point array of a VTK PolyData file. */
export interface VtpArray {
  readonly name: string;
  readonly type: "Float64" | "Int32" | "UInt8";
  /** Components per point (1 for scalars, 3 for vectors, 9 for a 3x3 tensor). */
  readonly components: number;
  /** `components` values per point, point-major. Non-finite values are refused: write a separate defined-flag array. */
  readonly values: ArrayLike<number>;
}

/** Geometry and point data of a VTK XML PolyData piece. */
export interface VtpPiece {
  /** Point coordinates, interleaved x, y, z. */
  readonly points: ArrayLike<number>;
  /** Polylines, each a list of point indices (a closed loop repeats its first index at the end). */
  readonly lines?: readonly (readonly number[])[];
  /** Triangles, 3 point indices each. */
  readonly triangles?: ArrayLike<number>;
  readonly pointData: readonly VtpArray[];
  /** Free text written as an XML comment after the declaration (unit, provenance). Must not contain "--". */
  readonly comment: string;
}

function xmlAttr(text: string): string {
  return text.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/"/g, "&quot;");
}

/** Values as ASCII text, 12 significant digits, `perLine` tuples per line. */
function asciiValues(values: ArrayLike<number>, components: number, isFloat: boolean, where: string): string {
  const out: string[] = [];
  const tuplesPerLine = Math.max(1, Math.floor(12 / components));
  let line: string[] = [];
  for (let i = 0; i < values.length; ++i) {
    const v = values[i];
    if (!Number.isFinite(v)) throw new Error(`polyDataToVtp: ${where}: value ${i} is not finite (${v})`);
    line.push(isFloat ? formatNumber(v) : String(Math.round(v)));
    if (line.length === tuplesPerLine * components) { out.push(line.join(" ")); line = []; }
  }
  if (line.length > 0) out.push(line.join(" "));
  return out.join("\n");
}

function dataArray(a: VtpArray, n: number): string {
  if (a.values.length !== n * a.components) {
    throw new Error(`polyDataToVtp: array ${a.name}: ${a.values.length} values for ${n} points x ${a.components} components`);
  }
  const comps = a.components > 1 ? ` NumberOfComponents="${a.components}"` : "";
  return `<DataArray type="${a.type}" Name="${xmlAttr(a.name)}"${comps} format="ascii">\n${asciiValues(a.values, a.components, a.type === "Float64", a.name)}\n</DataArray>`;
}

/**
 * A VTK XML PolyData file (.vtp, "VTKFile" version 1.0, ASCII data arrays): points, polylines
 * and/or triangles, and named point-data arrays. Format: "VTK File Formats", section "XML File
 * Formats" / PolyData (https://docs.vtk.org/en/latest/design_documents/VTKFileFormats.html):
 * `<Points>` holds one 3-component DataArray; `<Lines>` and `<Polys>` hold `connectivity` (point
 * indices of all cells, concatenated) and `offsets` (the end of each cell in connectivity).
 * Numbers are written with 12 significant digits; integer arrays as integers.
 * Cost: O(points x components + cells).
 * @throws {Error} a non-finite value or an array whose length does not match the points (a bug upstream).
 * @example polyDataToVtp({ points: [0,0,0, 1,0,0], lines: [[0, 1]], pointData: [], comment: "unit: nm" }).startsWith("<?xml") // true
 */
export function polyDataToVtp(piece: VtpPiece): string {
  const n = piece.points.length / 3;
  const lines = piece.lines ?? [];
  const tri = piece.triangles ?? [];
  if (piece.comment.includes("--")) throw new Error("polyDataToVtp: the comment must not contain \"--\"");
  const out: string[] = [
    `<?xml version="1.0"?>`,
    `<!-- ${piece.comment} -->`,
    `<VTKFile type="PolyData" version="1.0" byte_order="LittleEndian" header_type="UInt64">`,
    `<PolyData>`,
    `<Piece NumberOfPoints="${n}" NumberOfVerts="0" NumberOfLines="${lines.length}" NumberOfStrips="0" NumberOfPolys="${tri.length / 3}">`,
  ];
  const scalars = piece.pointData.find((a) => a.components === 1)?.name;
  const vectors = piece.pointData.find((a) => a.components === 3)?.name;
  out.push(`<PointData${scalars !== undefined ? ` Scalars="${xmlAttr(scalars)}"` : ""}${vectors !== undefined ? ` Vectors="${xmlAttr(vectors)}"` : ""}>`);
  for (const a of piece.pointData) out.push(dataArray(a, n));
  out.push(`</PointData>`);
  out.push(`<Points>`, dataArray({ name: "Points", type: "Float64", components: 3, values: piece.points }, n), `</Points>`);
  const cells = (tag: string, conn: number[], offsets: number[]): void => {
    out.push(`<${tag}>`,
      `<DataArray type="Int64" Name="connectivity" format="ascii">\n${asciiValues(conn, 1, false, `${tag} connectivity`)}\n</DataArray>`,
      `<DataArray type="Int64" Name="offsets" format="ascii">\n${asciiValues(offsets, 1, false, `${tag} offsets`)}\n</DataArray>`,
      `</${tag}>`);
  };
  if (lines.length > 0) {
    const conn: number[] = [], offsets: number[] = [];
    for (const l of lines) { conn.push(...l); offsets.push(conn.length); }
    cells("Lines", conn, offsets);
  }
  if (tri.length > 0) {
    const offsets: number[] = [];
    for (let i = 3; i <= tri.length; i += 3) offsets.push(i);
    cells("Polys", Array.from(tri), offsets);
  }
  out.push(`</Piece>`, `</PolyData>`, `</VTKFile>`, ``);
  return out.join("\n");
}
