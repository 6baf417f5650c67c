import { FLAG_TORSION_UNDEFINED, PER_METRE, type LengthUnit } from "../types.js";
import type { ChainModel } from "./chainToCsv.js";
import { polyDataToVtp, type VtpArray } from "./polyDataToVtp.js";
import type { ResampledWire } from "./resampleWire.js";
import type { TubeMesh } from "./tubeMesh.js";
import { TOOL_NAME, TOOL_VERSION } from "./version.js";

/** What {@link wireVtpFiles} needs besides the chain: stretch bounds (m) and the output unit. */
export interface WireVtpInput {
  readonly chain: ResampledWire;
  readonly model: ChainModel | null;
  /** Stretch bounds in metres, in order along the wire. */
  readonly stretches: readonly { readonly s0: number; readonly s1: number }[];
  readonly unit: LengthUnit;
  /** The tube mesh (positions relative to `offset`, in `unit`): its rings subdivide the chain. */
  readonly mesh: TubeMesh;
  /** Tube rings per chain interval (every `ringsPerSite`-th ring sits at a site). */
  readonly ringsPerSite: number;
  readonly sourceFile: string;
}

/** Names of the point-data arrays, in file order (model arrays only with a material). */
export const VTP_GEOMETRY_ARRAYS = ["s", "kappa", "kappa_lo", "kappa_hi", "tau", "tau_lo", "tau_hi", "tau_defined", "T", "N", "B", "flags", "stretch"] as const;
export const VTP_MODEL_ARRAYS = ["dmi", "anisotropy_constants", "anisotropy_axis_1", "anisotropy_axis_2", "anisotropy_axis_3", "texture"] as const;

/** Per-site arrays of the chain (tau and its band 0 where undefined, with tau_defined = 0). */
function siteArrays(v: WireVtpInput): VtpArray[] {
  const { chain, unit } = v;
  const k = PER_METRE[unit];
  const n = chain.n;
  const scaled = (x: Float64Array, f: number): Float64Array => Float64Array.from(x, (t) => (Number.isFinite(t) ? t * f : 0));
  const defined = Uint8Array.from(chain.tau, (t, i) => (Number.isFinite(t) && (chain.flags[i] & FLAG_TORSION_UNDEFINED) === 0 ? 1 : 0));
  const stretch = new Int32Array(n);
  let g = 0;
  for (let i = 0; i < n; ++i) {
    while (g + 1 < v.stretches.length && chain.s[i] >= v.stretches[g].s1) ++g;
    stretch[i] = g + 1;
  }
  const arrays: VtpArray[] = [
    { name: "s", type: "Float64", components: 1, values: scaled(chain.s, k) },
    { name: "kappa", type: "Float64", components: 1, values: scaled(chain.kappa, 1 / k) },
    { name: "kappa_lo", type: "Float64", components: 1, values: scaled(chain.kappaLo, 1 / k) },
    { name: "kappa_hi", type: "Float64", components: 1, values: scaled(chain.kappaHi, 1 / k) },
    { name: "tau", type: "Float64", components: 1, values: scaled(chain.tau, 1 / k) },
    { name: "tau_lo", type: "Float64", components: 1, values: scaled(chain.tauLo, 1 / k) },
    { name: "tau_hi", type: "Float64", components: 1, values: scaled(chain.tauHi, 1 / k) },
    { name: "tau_defined", type: "UInt8", components: 1, values: defined },
    { name: "T", type: "Float64", components: 3, values: scaled(chain.T, 1) },
    { name: "N", type: "Float64", components: 3, values: scaled(chain.N, 1) },
    { name: "B", type: "Float64", components: 3, values: scaled(chain.B, 1) },
    { name: "flags", type: "UInt8", components: 1, values: chain.flags },
    { name: "stretch", type: "Int32", components: 1, values: stretch },
  ];
  const m = v.model;
  if (m !== null) {
    const it = m.interactions;
    const axis = (r: number): Float64Array => {
      const out = new Float64Array(3 * n);
      for (let i = 0; i < n; ++i) for (let d = 0; d < 3; ++d) out[3 * i + d] = it.anisotropyAxesLab[9 * i + 3 * r + d];
      return scaled(out, 1);
    };
    arrays.push(
      { name: "dmi", type: "Float64", components: 3, values: scaled(it.dmiLab, 1) },
      { name: "anisotropy_constants", type: "Float64", components: 3, values: scaled(it.anisotropyConstants, 1) },
      { name: "anisotropy_axis_1", type: "Float64", components: 3, values: axis(0) },
      { name: "anisotropy_axis_2", type: "Float64", components: 3, values: axis(1) },
      { name: "anisotropy_axis_3", type: "Float64", components: 3, values: axis(2) },
    );
    if (m.texture !== null) arrays.push({ name: "texture", type: "Float64", components: 3, values: scaled(m.texture, 1) });
  }
  return arrays;
}

/**
 * The chain site each tube vertex belongs to: the rings subdivide the chain (every `per`-th ring
 * sits at a site), so ring r takes the site nearest in arc length, round(r / per); caps the ends.
 */
export function tubeVertexSites(mesh: TubeMesh, chain: ResampledWire, per: number): Int32Array {
  const { rings, radial } = mesh;
  const site = new Int32Array(mesh.positions.length / 3);
  for (let r = 0; r < rings; ++r) {
    const i = Math.round(r / per);
    site.fill(chain.closed ? i % chain.n : Math.min(i, chain.n - 1), r * radial, (r + 1) * radial);
  }
  if (site.length > rings * radial) { site[rings * radial] = 0; site[rings * radial + 1] = chain.n - 1; }
  return site;
}

function gather(a: VtpArray, site: Int32Array): VtpArray {
  const c = a.components;
  const values = a.type === "Float64" ? new Float64Array(site.length * c) : a.type === "Int32" ? new Int32Array(site.length * c) : new Uint8Array(site.length * c);
  for (let v = 0; v < site.length; ++v) for (let d = 0; d < c; ++d) values[v * c + d] = a.values[site[v] * c + d];
  return { ...a, values };
}

/**
 * The centre line and the tube of a wire as VTK XML PolyData (centerline.vtp, tube.vtp) for
 * VTK-based viewers. Centre line: the chain sites as points joined by one polyline (closed loops
 * repeat the first point index), with point data s (unit), kappa, tau and their 95% bands (1/unit;
 * tau 0 where undefined, marked by tau_defined = 0), the frame T, N, B, the profile flags, the
 * stretch number (1-based) and, with a material, the DMI vector (J/m^2), the anisotropy constants
 * (J/m^3) and principal axes, and the relaxed texture (unit vectors). Tube: the tube mesh's
 * triangles with the same arrays taken from the chain site nearest each ring in arc length (the
 * rings subdivide the chain; caps: the end sites).
 * Coordinates in `unit`, absolute (the mesh offset added back). Cost O(sites + mesh vertices).
 */
export function wireVtpFiles(v: WireVtpInput): { centerline: string; tube: string } {
  const { chain, unit, mesh } = v;
  const k = PER_METRE[unit];
  const arrays = siteArrays(v);
  const comment = `${TOOL_NAME} ${TOOL_VERSION}; source ${v.sourceFile.replace(/-{2,}/g, "-")}; coordinates and s in ${unit}, kappa and tau in 1/${unit}` +
    `${v.model !== null ? ", dmi in J/m^2 (or reduced), anisotropy constants in J/m^3 (or units of K)" : ""}; model estimates, not measurements`;
  const line = Array.from({ length: chain.n }, (_, i) => i);
  if (chain.closed && chain.n > 2) line.push(0);
  const centerline = polyDataToVtp({ points: Float64Array.from(chain.xyz, (t) => t * k), lines: [line], pointData: arrays, comment });
  const site = tubeVertexSites(mesh, chain, v.ringsPerSite);
  const pts = Float64Array.from(mesh.positions, (t, i) => t + mesh.offset[i % 3]);
  const tube = polyDataToVtp({ points: pts, triangles: mesh.indices, pointData: arrays.map((a) => gather(a, site)), comment: `${comment}; tube of radius ${mesh.radius} ${unit}` });
  return { centerline, tube };
}
