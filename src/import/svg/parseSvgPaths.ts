import { InputError, ParameterError } from "../../errors.js";
import type { Trace } from "../../types.js";
import { asText } from "../mesh/bytes.js";
import { calibrate } from "./calibration.js";
import { flattenPathData } from "./pathData.js";
import { IDENTITY, multiply, parseTransform, type Affine } from "./transform.js";
import type { SvgOptions } from "./types.js";
import { tokenizeXml } from "./xml.js";

/** Containers whose content is not drawn directly. */
const HIDDEN = new Set(["defs", "symbol", "clipPath", "mask", "marker", "pattern", "metadata", "title", "desc", "style", "script"]);
/** Shapes that are not read (only path data is), reported in the diagnostics. */
const IGNORED = new Set(["rect", "circle", "ellipse", "text", "image", "use"]);

/**
 * Reads the wires traced on a micrograph from an SVG file: each `<path>` (and `<polyline>`,
 * `<polygon>`, `<line>`, which are path data in another spelling) is one wire; a path with several
 * drawn subpaths gives one wire per subpath (with a diagnostic).
 *
 * Path data: every command of SVG 1.1 section 8.3 (see `flattenPathData`), arcs by SVG 1.1
 * Appendix F.6. Transforms: the `transform` attributes of the element and all its ancestor groups
 * (SVG 1.1 section 7.5: CTM = parent CTM x own transform). Calibration: `pixelSize` or the root's
 * physical width/height over its viewBox (see `calibrate`); the viewBox origin is subtracted.
 * Coordinates keep the image's orientation (x right, y down).
 *
 * Output: planar projections (dims 2, z = 0, planarProjection true): curvature from them is the
 * curvature of the projection, and torsion is not measurable. Closed when the subpath ends in Z.
 * `source.unit` is "px" with `pixelSize` = metres per user unit.
 * Cost: O(size + samples).
 * @throws {InputError} for malformed XML or path data (naming the line and the element), for a
 *   missing calibration, or when the file has no path.
 * @example parseSvgPaths('<svg width="10um" viewBox="0 0 100 100"><path d="M10 50 A40 40 0 0 1 90 50"/></svg>', "a.svg")
 *   // one trace: points on a circle of radius 4e-6 m
 */
export function parseSvgPaths(data: Uint8Array | string, file: string, options: SvgOptions = {}): Trace[] {
  if (options.pixelSize !== undefined && !(options.pixelSize > 0 && Number.isFinite(options.pixelSize))) {
    throw new ParameterError("parseSvgPaths", "pixelSize", `must be a positive number of metres (got ${options.pixelSize})`);
  }
  if (options.maxStep !== undefined && !(options.maxStep > 0)) {
    throw new ParameterError("parseSvgPaths", "maxStep", `must be positive (got ${options.maxStep})`);
  }
  const tokens = tokenizeXml(asText(data), file);
  const root = tokens.find((t) => t.kind === "start");
  if (root === undefined || root.kind !== "start" || root.name.replace(/^.*:/, "") !== "svg") {
    throw new InputError(file, root?.line ?? null, "svg", `the root element must be <svg>, got ${root ? `<${root.name}>` : "nothing"}`);
  }
  const cal = calibrate(root.attrs, file, root.line, options.pixelSize);
  const diagnostics: string[] = [`calibration ${cal.how}`];
  const stack: { ctm: Affine; hidden: boolean }[] = [];
  const ignored = new Map<string, number>();
  const traces: Trace[] = [];
  let pathNo = 0;
  for (const tok of tokens) {
    if (tok.kind === "end") {
      stack.pop();
      continue;
    }
    const name = tok.name.replace(/^.*:/, "");
    const parent = stack[stack.length - 1] ?? { ctm: IDENTITY, hidden: false };
    const own = tok.attrs.has("transform") ? parseTransform(tok.attrs.get("transform") as string, file, tok.line) : IDENTITY;
    let ctm = multiply(parent.ctm, own);
    if (name === "svg" && tok !== root) {
      ctm = multiply(ctm, [1, 0, 0, 1, Number(tok.attrs.get("x") ?? 0) || 0, Number(tok.attrs.get("y") ?? 0) || 0]);
      if (tok.attrs.has("viewBox")) diagnostics.push(`line ${tok.line}: the viewBox of a nested <svg> is ignored (only its x, y offset is applied)`);
    }
    const hidden = parent.hidden || HIDDEN.has(name);
    if (!tok.empty) stack.push({ ctm, hidden });
    if (hidden) continue;
    let d: string | undefined;
    if (name === "path") d = tok.attrs.get("d") ?? "";
    else if (name === "polyline" || name === "polygon") {
      const pts = (tok.attrs.get("points") ?? "").trim();
      d = pts === "" ? "" : `M ${pts}${name === "polygon" ? " Z" : ""}`;
    } else if (name === "line") {
      const g = (k: string) => tok.attrs.get(k) ?? "0";
      d = `M ${g("x1")} ${g("y1")} L ${g("x2")} ${g("y2")}`;
    } else {
      if (IGNORED.has(name)) ignored.set(name, (ignored.get(name) ?? 0) + 1);
      continue;
    }
    pathNo++;
    const id = tok.attrs.get("id");
    const label = `${name}${id !== undefined ? `#${id}` : ` ${pathNo}`}`;
    if (d.trim() === "") {
      diagnostics.push(`line ${tok.line}: ${label} has no path data; skipped`);
      continue;
    }
    const subs = flattenPathData(d, file, tok.line, `${label} ${name === "path" ? "d" : "points"}`, options.maxStep);
    if (subs.length === 0) {
      diagnostics.push(`line ${tok.line}: ${label} draws nothing (moveto only); skipped`);
      continue;
    }
    subs.forEach((sp, k) => {
      const m = sp.points.length / 2;
      const xyz = new Float64Array(3 * m);
      const [a, b, c, dd, e, f] = ctm;
      for (let i = 0; i < m; i++) {
        const x = sp.points[2 * i], y = sp.points[2 * i + 1];
        xyz[3 * i] = (a * x + c * y + e - cal.x0) * cal.sx;
        xyz[3 * i + 1] = (b * x + dd * y + f - cal.y0) * cal.sy;
      }
      const notes = [`${label} (line ${tok.line})${subs.length > 1 ? `: subpath ${k + 1} of ${subs.length}, taken as a separate wire` : ""}`];
      traces.push({
        xyz,
        closed: sp.closed,
        dims: 2,
        planarProjection: true,
        source: { file, unit: "px", pixelSize: cal.sx },
        diagnostics: traces.length === 0 ? [...diagnostics, ...notes] : notes,
      });
    });
  }
  if (ignored.size > 0 && traces.length > 0) {
    (traces[0].diagnostics as string[]).push(`ignored ${[...ignored].map(([k, v]) => `${v} <${k}>`).join(", ")}: only path data is read`);
  }
  if (traces.length === 0) throw new InputError(file, null, "svg", "no <path> with path data");
  return traces;
}
