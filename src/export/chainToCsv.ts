import { PER_METRE, type LengthUnit, type Source } from "../types.js";
import type { SampleInteractions } from "../physics/types.js";
import { formatNumber } from "./formatNumber.js";
import { FLAG_MEANINGS, oneLine } from "./profileTable.js";
import { chunksToText, rereadable, RowBuffer, rowBytes, type Chunks } from "./tableChunks.js";
import type { ResampledWire } from "./resampleWire.js";
import { TOOL_NAME, TOOL_VERSION } from "./version.js";

/** Geometry columns of chain.csv, always present. */
export const CHAIN_GEOMETRY_COLUMNS = [
  "i", "s", "x", "y", "z", "tx", "ty", "tz", "nx", "ny", "nz", "bx", "by", "bz",
  "kappa", "kappa_lo", "kappa_hi", "tau", "tau_lo", "tau_hi", "flags",
] as const;

/** Model columns of chain.csv, present when a material was given. */
export const CHAIN_MODEL_COLUMNS = [
  "kappa_l", "tau_l", "dmi_x", "dmi_y", "dmi_z",
  "k1", "a1x", "a1y", "a1z", "k2", "a2x", "a2y", "a2z", "k3", "a3x", "a3y", "a3z",
] as const;

/** Relaxed-texture columns, present when the model has a texture. */
export const CHAIN_TEXTURE_COLUMNS = ["mx", "my", "mz"] as const;

/** The model part of a chain export: interactions (and optionally the relaxed texture) at the chain sites. */
export interface ChainModel {
  readonly interactions: SampleInteractions;
  /** Relaxed texture at the sites, lab components, 3 per site (unit vectors), or null. */
  readonly texture: Float64Array | null;
  /** "ferro" (the vector is the magnetisation m) or "antiferro" (the Neel vector n). */
  readonly order: "ferro" | "antiferro";
  /** Magnetic length (m), stated in the header. */
  readonly magneticLength: number;
}

/** Options of {@link chainToCsv}. */
export interface ChainCsvOptions {
  readonly unit: LengthUnit;
  readonly source: Source;
  /** How the spacing was chosen (one line, e.g. "default: resolution / 4"). */
  readonly spacingNote: string;
  /** Requested spacing (m). */
  readonly requestedSpacing: number;
}

/**
 * Writes a resampled wire as chain.csv, a site list another solver can read directly.
 *
 * Layout: `#` comment lines (tool, what the file is, units, spacing and how it was chosen, one line
 * per column with its meaning and unit, flag meanings), the header row, one row per site.
 * Columns: {@link CHAIN_GEOMETRY_COLUMNS}; with a material also {@link CHAIN_MODEL_COLUMNS}
 * (reduced kappa l and tau l; the geometric DMI vector 2 A (tau T + kappa B) in lab components;
 * the three principal constants of the total effective anisotropy, ascending, each with its lab
 * axis) and, when the model has one, {@link CHAIN_TEXTURE_COLUMNS}. Lengths in `options.unit`,
 * kappa and tau in 1/unit, DMI in J/m^2, anisotropy constants in J/m^3 (or the reduced units the
 * interactions name when A or K is unknown). Numbers carry 12 significant digits; NaN marks
 * undefined torsion.
 *
 * Cost: O(m) for m sites.
 * @throws {Error} when the model columns do not have one entry per site (a bug upstream).
 */
export function chainToCsv(wire: ResampledWire, model: ChainModel | null, options: ChainCsvOptions): string {
  return chunksToText(chainCsvChunks(wire, model, options));
}

/**
 * {@link chainToCsv} as a re-readable sequence of byte chunks (UTF-8): the same bytes, never one
 * string, so a chain of millions of sites is written chunk by chunk.
 * @throws {Error} when the model columns do not have one entry per site (a bug upstream).
 */
export function chainCsvChunks(wire: ResampledWire, model: ChainModel | null, options: ChainCsvOptions): Chunks {
  const u = options.unit;
  const k = PER_METRE[u];
  const m = wire.n;
  const lines: string[] = [];
  lines.push(`# ${TOOL_NAME} ${TOOL_VERSION}: wire resampled as a chain of sites for other solvers`);
  lines.push("# note: model estimates from a smoothing-spline fit of a traced centre line (and, with a material, the curvilinear-magnet model), not measurements");
  lines.push(`# source: ${oneLine(options.source.file)} (unit ${options.source.unit})`);
  lines.push(`# unit: ${u} (s x y z in ${u}; kappa tau in 1/${u}; t n b unit vectors, lab frame)`);
  lines.push(`# sites: ${m}; closed: ${wire.closed}${wire.closed ? " (the last site bonds back to the first)" : ""}`);
  lines.push(`# spacing: ${formatNumber(wire.spacing * k)} ${u} (requested ${formatNumber(options.requestedSpacing * k)} ${u}, ${oneLine(options.spacingNote)}; adjusted to span the wire exactly)`);
  lines.push("# interpolation: positions cubic Hermite with the fitted tangents; kappa, tau, bands linear; frames blended and re-orthonormalised");
  const doc: [string, string][] = [
    ["i", "site index from 0"],
    ["s", `arc length from the start of the fitted curve (${u})`],
    ["x,y,z", `site position (${u})`],
    ["tx,ty,tz", "unit tangent T"],
    ["nx,ny,nz", "unit normal N (Frenet where curvature is resolved, else twist-free transported)"],
    ["bx,by,bz", "unit binormal B = T x N"],
    ["kappa,kappa_lo,kappa_hi", `curvature and its 95% bootstrap band (1/${u})`],
    ["tau,tau_lo,tau_hi", `torsion (B' = -tau N; right-handed helix > 0) and its 95% band (1/${u}); NaN where undefined`],
    ["flags", "bit set, see the flag lines"],
  ];
  if (model !== null) {
    const it = model.interactions;
    const dmiUnit = it.unit.dmi === "J/m^2" ? "J/m^2" : "reduced: 2 D l, in units of K l (A unknown)";
    const anisUnit = it.unit.anisotropy === "J/m^3" ? "J/m^3" : "reduced: units of K (K unknown)";
    lines.push(`# model: ${model.order === "ferro" ? "ferromagnet, vector = magnetisation m" : "antiferromagnet, vector = Neel vector n"}; magnetic length l = ${formatNumber(model.magneticLength * k)} ${u}`);
    lines.push("# model use: the dmi and anisotropy columns are the effective interactions of the curvilinear frame, for a solver that writes the vector in the local (T, N, B) frame");
    lines.push("#   and treats the wire as straight; a solver that already models the real 3D geometry with lab-frame exchange must not add them (the geometry would count twice)");
    lines.push("#   energy density: A |du/ds|^2 (local components) + dmi . (u x du/ds) + sum_a k_a (u . a_a)^2 + constant");
    doc.push(
      ["kappa_l,tau_l", "reduced curvature and torsion: kappa and tau times the magnetic length l (dimensionless; NaN torsion taken as 0 below)"],
      ["dmi_x,dmi_y,dmi_z", `geometric DMI vector 2 A (tau T + kappa B), lab components (${dmiUnit})`],
      ["k1,a1x,a1y,a1z", `lowest principal constant of the total effective anisotropy (easy axis) and its unit axis, lab components (${anisUnit})`],
      ["k2,a2x,a2y,a2z", `middle principal constant and axis (${anisUnit})`],
      ["k3,a3x,a3y,a3z", `highest principal constant (hard axis) and axis (${anisUnit})`],
    );
    if (model.texture !== null) {
      doc.push(["mx,my,mz", `relaxed ${model.order === "ferro" ? "magnetisation" : "Neel vector"} along the wire, lab components (unit vector; a model estimate, a starting state for a solver)`]);
    }
  }
  for (const [cols, meaning] of doc) lines.push(`# column ${cols}: ${meaning}`);
  for (const [bit, meaning] of FLAG_MEANINGS) lines.push(`# flag ${bit}: ${meaning}`);

  const header: string[] = [...CHAIN_GEOMETRY_COLUMNS];
  if (model !== null) header.push(...CHAIN_MODEL_COLUMNS);
  if (model?.texture) header.push(...CHAIN_TEXTURE_COLUMNS);
  lines.push(header.join(","));

  if (model !== null) {
    const it = model.interactions;
    const check = (name: string, len: number, per: number): void => {
      if (len !== per * m) throw new Error(`chain model column ${name} has ${len} entries, expected ${per * m} (${m} sites)`);
    };
    check("kappaReduced", it.kappaReduced.length, 1);
    check("dmiLab", it.dmiLab.length, 3);
    check("anisotropyConstants", it.anisotropyConstants.length, 3);
    check("anisotropyAxesLab", it.anisotropyAxesLab.length, 9);
    if (model.texture !== null) check("texture", model.texture.length, 3);
  }
  const head = new TextEncoder().encode(`${lines.join("\n")}\n`);
  return rereadable(function* rows() {
    yield head;
    const out = new RowBuffer(rowBytes(header.length), "NaN");
    const it = model?.interactions;
    const texture = model?.texture ?? null;
    for (let i = 0; i < m; ++i) {
      out.num(i, 44); out.num(wire.s[i] * k, 44);
      out.num(wire.xyz[3 * i] * k, 44); out.num(wire.xyz[3 * i + 1] * k, 44); out.num(wire.xyz[3 * i + 2] * k, 44);
      out.num(wire.T[3 * i], 44); out.num(wire.T[3 * i + 1], 44); out.num(wire.T[3 * i + 2], 44);
      out.num(wire.N[3 * i], 44); out.num(wire.N[3 * i + 1], 44); out.num(wire.N[3 * i + 2], 44);
      out.num(wire.B[3 * i], 44); out.num(wire.B[3 * i + 1], 44); out.num(wire.B[3 * i + 2], 44);
      out.num(wire.kappa[i] / k, 44); out.num(wire.kappaLo[i] / k, 44); out.num(wire.kappaHi[i] / k, 44);
      out.num(wire.tau[i] / k, 44); out.num(wire.tauLo[i] / k, 44); out.num(wire.tauHi[i] / k, 44);
      out.num(wire.flags[i], 0);
      if (it !== undefined) {
        out.byte(44);
        out.num(it.kappaReduced[i], 44); out.num(it.tauReduced[i], 44);
        out.num(it.dmiLab[3 * i], 44); out.num(it.dmiLab[3 * i + 1], 44); out.num(it.dmiLab[3 * i + 2], 0);
        for (let e = 0; e < 3; ++e) {
          out.byte(44);
          out.num(it.anisotropyConstants[3 * i + e], 0);
          for (let c = 0; c < 3; ++c) { out.byte(44); out.num(it.anisotropyAxesLab[9 * i + 3 * e + c], 0); }
        }
        if (texture !== null) { out.byte(44); out.num(texture[3 * i], 44); out.num(texture[3 * i + 1], 44); out.num(texture[3 * i + 2], 0); }
      }
      out.byte(10);
      if (out.full()) yield out.take();
    }
    if (out.size > 0) yield out.take();
  });
}
