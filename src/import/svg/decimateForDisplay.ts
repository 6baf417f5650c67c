import simplify from "simplify-js";
import { ParameterError } from "../../errors.js";
import type { Trace } from "../../types.js";

/**
 * Decimates a dense 2D trace for display with simplify-js (radial distance, then Ramer-Douglas-
 * Peucker; Douglas & Peucker 1973, Cartographica 10:112). Only for plots: the analysis should use
 * every point. 2D only, since simplify-js ignores z: a 3D trace raises ParameterError.
 *
 * Units: `tolerance` in metres (required: no length has a bare default). Keeps both end points.
 * Returns a new trace; the input is not modified. Cost O(n log n) typical, O(n^2) worst case.
 * @example decimateForDisplay(svgTrace, 1e-8).xyz.length // fewer points, none further than 10 nm off
 */
export function decimateForDisplay(trace: Trace, tolerance: number): Trace {
  if (trace.dims !== 2) throw new ParameterError("decimateForDisplay", "trace", "simplify-js is 2D only; got a 3D trace");
  if (!(tolerance > 0)) throw new ParameterError("decimateForDisplay", "tolerance", `must be a positive length in metres (got ${tolerance})`);
  const n = trace.xyz.length / 3;
  const pts = Array.from({ length: n }, (_, i) => ({ x: trace.xyz[3 * i], y: trace.xyz[3 * i + 1] }));
  const kept = simplify(pts, tolerance, false);
  const xyz = new Float64Array(3 * kept.length);
  kept.forEach((p, i) => {
    xyz[3 * i] = p.x;
    xyz[3 * i + 1] = p.y;
  });
  const { radius: _r, radiusSpread: _s, ...rest } = trace;
  return { ...rest, xyz, diagnostics: [...trace.diagnostics, `decimated for display: ${n} -> ${kept.length} points (tolerance ${tolerance} m)`] };
}
