import { median } from "d3-array";
import { interactions } from "../physics/interactions.js";
import { reducedSystem } from "../physics/reducedSystem.js";
import { buildReport } from "../report/buildReport.js";
import { FLAG_END, FLAG_JUNCTION_ZONE, PER_METRE, type LengthUnit } from "../types.js";
import { COARSE_STEP_NOTE, type Analysis } from "./analyzeTrace.js";
import { CHAIN_GEOMETRY_COLUMNS, CHAIN_MODEL_COLUMNS, CHAIN_TEXTURE_COLUMNS, chainCsvChunks, type ChainModel } from "./chainToCsv.js";
import { brief } from "./brief.js";
import { jsonNumber } from "./formatNumber.js";
import { meshToBytes, type MeshFormat } from "./meshToBytes.js";
import { ParameterError } from "../errors.js";
import { buildModelDocument, modelToJson, type ExportEntry, type ModelDocument, type OptionValue } from "./modelDocument.js";
import { gridToOvf, textureGrid } from "./textureToOvf.js";
import { TOOL_NAME, TOOL_VERSION } from "./version.js";
import { wireVtpFiles } from "./wireToVtp.js";
import { profileCsvChunks } from "./profileToCsv.js";
import type { Chunks } from "./tableChunks.js";
import { resampleWire, type ResampledWire } from "./resampleWire.js";
import { tubeMesh, type TubeMesh } from "./tubeMesh.js";

/** File names inside an analysis folder. */
export const OUTPUT_NAMES = {
  profile: "profile.csv",
  model: "model.json",
  chain: "chain.csv",
  report: "report.html",
  mesh: (format: MeshFormat): string => `wire.${format}`,
  centerlineVtp: "centerline.vtp",
  tubeVtp: "tube.vtp",
  textureOvfText: "texture.ovf",
  textureOvfBinary: "texture-binary8.ovf",
  maskOvf: "mask.ovf",
} as const;

/** Options of {@link buildWireOutputs}. Lengths in metres. */
export interface WireOutputOptions {
  /** Length unit of every output. */
  readonly unit: LengthUnit;
  /** Chain spacing (m); default: resolution / 4, and at most l / 4 with a material. */
  readonly spacing?: number;
  /** Mesh format (default "ply"). */
  readonly mesh?: MeshFormat;
  /** Tube radius (m); overrides the imported radius and the defaults. */
  readonly radius?: number;
  /** The material file as given, for model.json and the report. */
  readonly materialFile?: string | null;
  /** The bundled report viewer (see src/report/viewerScript.ts). */
  readonly viewerScript: string;
  /** Write centerline.vtp and tube.vtp (VTK XML PolyData) too. */
  readonly vtp?: boolean;
  /**
   * Grid cell (m) of the OVF 2.0 exports: the relaxed texture on a regular grid (text and binary-8)
   * and the wire mask; needs a material. Not written when absent.
   */
  readonly grid?: number;
  /** The material file's note (provenance), for model.json and the report. */
  readonly materialNote?: string | null;
  /**
   * The command line (arguments after the program name, as given; null when not from the command line)
   * and the caller's option values (input, bootstrap, seed, ...); the values decided here (output unit,
   * spacing, mesh, radius) are added to them.
   */
  readonly run?: { readonly argv: readonly string[] | null; readonly options: Readonly<Record<string, OptionValue>> };
}

/** One file of an analysis folder. */
export interface OutputFile {
  readonly name: string;
  /** The bytes; the long tables (profile, chain) as a re-readable chunk sequence (see tableChunks.ts). */
  readonly data: string | Uint8Array | Chunks;
}

/** Everything an analysis folder holds, in memory, plus what was decided on the way. */
export interface WireOutputs {
  readonly files: readonly OutputFile[];
  readonly document: ModelDocument;
  readonly chain: ResampledWire;
  readonly mesh: TubeMesh;
  readonly spacingNote: string;
  readonly radiusNote: string;
}

/** The default chain spacing (m) and the sentence that explains it. */
export function defaultSpacing(a: Analysis): { spacing: number; note: string } {
  const p = a.profile;
  const res = p.resolution > 0 && Number.isFinite(p.resolution) ? p.resolution : p.length / 1000;
  const l = a.material?.magneticLength;
  if (l !== undefined && l / 4 < res / 4) return { spacing: l / 4, note: "default: a quarter of the magnetic length (finer than a quarter of the resolution length)" };
  return { spacing: res / 4, note: "default: a quarter of the resolution length of the fit" };
}

/** The tube radius (m) and where it came from. */
export function chooseRadius(a: Analysis, explicit: number | undefined, unit: LengthUnit): { radius: number; note: string } {
  if (explicit !== undefined) return { radius: explicit, note: "--radius" };
  const r = a.trace.radius;
  if (r !== undefined && r.length > 0) {
    const m = median(r);
    if (m !== undefined && m > 0) return { radius: m, note: "median of the tube radius measured at import" };
  }
  const t = a.material?.thickness;
  if (t !== undefined && t !== null) return { radius: t / 2, note: "half the material thickness" };
  const p = a.profile;
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity, z0 = Infinity, z1 = -Infinity;
  for (let i = 0; i < p.n; ++i) {
    x0 = Math.min(x0, p.x[i]); x1 = Math.max(x1, p.x[i]);
    y0 = Math.min(y0, p.y[i]); y1 = Math.max(y1, p.y[i]);
    z0 = Math.min(z0, p.z[i]); z1 = Math.max(z1, p.z[i]);
  }
  const diag = Math.hypot(x1 - x0, y1 - y0, z1 - z0);
  const radius = diag > 0 ? diag / 100 : p.length / 100;
  return { radius, note: `default: 1% of the bounding-box diagonal (${brief(radius * PER_METRE[unit])} ${unit}); no radius was imported or given, and no material thickness` };
}

/** Interactions and relaxed texture of the model, evaluated at the chain sites. */
function chainModel(a: Analysis, chain: ResampledWire): ChainModel | null {
  if (a.material === null || a.model === null) return null;
  const it = interactions(chain, a.material, reducedSystem(a.material));
  const lab = a.model.texture.lab;
  const n = a.profile.n;
  let texture: Float64Array | null = null;
  if (lab.length === 3 * n) {
    texture = new Float64Array(3 * chain.n);
    for (let k = 0; k < chain.n; ++k) {
      const i = chain.index[k], j = chain.closed && i === n - 1 ? 0 : Math.min(n - 1, i + 1), t = chain.frac[k];
      let x = lab[3 * i] + t * (lab[3 * j] - lab[3 * i]);
      let y = lab[3 * i + 1] + t * (lab[3 * j + 1] - lab[3 * i + 1]);
      let z = lab[3 * i + 2] + t * (lab[3 * j + 2] - lab[3 * i + 2]);
      let r = Math.hypot(x, y, z);
      if (!(r > 1e-9)) { x = lab[3 * i]; y = lab[3 * i + 1]; z = lab[3 * i + 2]; r = Math.hypot(x, y, z) || 1; }
      texture[3 * k] = x / r; texture[3 * k + 1] = y / r; texture[3 * k + 2] = z / r;
    }
  }
  return { interactions: it, texture, order: a.material.order, magneticLength: a.material.magneticLength };
}

/** The model needs radii of curvature and torsion at least this many times the wire thickness (thin-wire limit; common practice, a rule of thumb). */
export const THIN_WIRE_RATIO = 5;

/**
 * Specific warnings of the export stage, most serious first: the thin-wire limit broken (radius of
 * curvature or torsion below THIN_WIRE_RATIO times the thickness, or below the lattice spacing),
 * sharp bends merged into a stretch, torsion not resolved from zero on curved stretches, then what
 * the resolution and the spacing mean for the model.
 */
export function exportWarnings(a: Analysis, spacing: number, unit: LengthUnit): string[] {
  const w: string[] = [];
  const k = PER_METRE[unit];
  const p = a.profile;
  const l = a.material?.magneticLength;
  // thin-wire limit: the tightest radius (of curvature, then of torsion) against the thickness and the lattice spacing
  const t = a.material?.thickness ?? null, d = a.material?.latticeSpacing ?? null;
  const limit = Math.max(t !== null ? THIN_WIRE_RATIO * t : 0, d ?? 0);
  if (limit > 0) {
    for (const [name, arr] of [["curvature", p.kappa], ["torsion", p.tau]] as const) {
      let peak = 0, at = -1;
      // samples near an open end are skipped: the fit's bias is larger there (FLAG_END); so are
      // those next to a junction of a network (FLAG_JUNCTION_ZONE): their geometry is the junction's
      for (let i = 0; i < p.n; ++i) if ((p.flags[i] & (FLAG_END | FLAG_JUNCTION_ZONE)) === 0 && Number.isFinite(arr[i]) && Math.abs(arr[i]) > peak) { peak = Math.abs(arr[i]); at = i; }
      if (at >= 0 && 1 / peak < limit) {
        const what = t !== null && 1 / peak < THIN_WIRE_RATIO * t ? `${THIN_WIRE_RATIO} times the thickness (${brief(t * k)} ${unit})` : `the lattice spacing (${brief((d ?? 0) * k)} ${unit})`;
        w.push(
          `thin-wire limit: the radius of ${name} 1/${name === "curvature" ? "\u03ba" : "|\u03c4|"} = ${brief(k / peak)} ${unit} at s = ${brief(p.s[at] * k)} ${unit} is below ${what}; ` +
            "the curvilinear model is not valid there",
        );
      }
    }
  }
  // a --step coarser than the fit resolves (analyzeTrace's diagnostic): the stretches see less
  const coarse = p.diagnostics.find((d) => d.startsWith(COARSE_STEP_NOTE));
  if (coarse !== undefined) w.push(coarse);
  const later: string[] = [];
  if (l !== undefined && p.resolution > l) {
    later.push(
      `resolution: the fit resolves the geometry down to ${brief(p.resolution * k)} ${unit}, more than the magnetic length l = ${brief(l * k)} ${unit}; ` +
        "curvature that varies on shorter scales is smoothed out, so sharp bends (and their pinning depths) can be underestimated",
    );
  }
  if (l !== undefined && spacing > l / 2) {
    later.push(`chain spacing ${brief(spacing * k)} ${unit} is coarser than half the magnetic length (${brief((l / 2) * k)} ${unit}): too coarse for a solver`);
  }
  if (p.planarProjection) later.push("planar projection: torsion is not measurable from this trace; the model takes torsion 0");
  // a short sharp feature merged into a stretch (shorter than the resolution): its model uses the stretch mean
  a.segments.forEach((g, idx) => {
    let peak = -Infinity, at = -1;
    for (let i = g.i0; i < g.i1; ++i) if ((p.flags[i] & FLAG_JUNCTION_ZONE) === 0 && p.kappa[i] > peak) { peak = p.kappa[i]; at = i; }
    if (at >= 0 && Number.isFinite(g.kappaHi) && p.kappaLo[at] > 2 * Math.max(g.kappaHi, 0)) {
      w.push(
        `sharp bend: stretch ${idx + 1} (${g.kind}) contains curvature up to ${brief(peak / k)} 1/${unit} at s = ${brief(p.s[at] * k)} ${unit}, ` +
          `well above its mean ${brief(g.kappa / k)} 1/${unit}: a feature shorter than the stretches the fit can separate; its model uses the stretch mean (see the pinning sites)`,
      );
    }
  });
  // torsion of a curved stretch whose band includes 0: its handedness is not known
  const unresolved = a.segments.flatMap((g, idx) => (g.kind !== "straight" && g.tau !== 0 && g.tauLo < 0 && g.tauHi > 0 ? [idx + 1] : []));
  if (unresolved.length > 0) {
    w.push(`unresolved torsion: the 95% band of \u03c4 includes 0 on stretch${unresolved.length > 1 ? "es" : ""} ${unresolved.join(", ")}, so the handedness there is not known and the model's torsion terms are uncertain`);
  }
  return [...w, ...later];
}

/**
 * Builds, in memory, every file of an analysis folder: profile.csv, model.json, chain.csv (the wire
 * resampled at the chain spacing, with the model's interactions and relaxed texture at each site
 * when a material is given), the tube mesh (wire.<format>) and report.html. Nothing is written
 * here; the caller writes the files atomically (see writeOutputDir).
 *
 * Radius: `options.radius`, else the median imported tube radius, else half the material
 * thickness, else 1% of the bounding-box diagonal. Spacing: see {@link defaultSpacing}.
 * Cost: O(n + sites) plus the mesh encoding; the glb encoder is asynchronous.
 */
export async function buildWireOutputs(a: Analysis, options: WireOutputOptions): Promise<WireOutputs> {
  const unit = options.unit;
  const k = PER_METRE[unit];
  const format = options.mesh ?? "ply";
  const def = defaultSpacing(a);
  const spacing = options.spacing ?? def.spacing;
  const spacingNote = options.spacing !== undefined ? "--spacing" : def.note;
  const chain = resampleWire(a.profile, spacing);
  const cm = chainModel(a, chain);
  const chainCsv = chainCsvChunks(chain, cm, { unit, source: a.profile.source, spacingNote, requestedSpacing: spacing });
  const columns = [...CHAIN_GEOMETRY_COLUMNS, ...(cm !== null ? CHAIN_MODEL_COLUMNS : []), ...(cm?.texture ? CHAIN_TEXTURE_COLUMNS : [])];

  const { radius, note: radiusNote } = chooseRadius(a, options.radius, unit);
  // Tube rings: every chain site, subdivided so that rings are at most a twelfth of the resolution
  // length apart (at most 20000 rings): a tube with rings a quarter resolution apart is a polygon
  // whose chords a reader of the mesh would take for a tighter curve (2% in curvature).
  const perSite = chain.n > 1 ? Math.max(1, Math.min(Math.ceil((12 * chain.spacing) / a.profile.resolution), Math.floor(20_000 / chain.n))) : 1;
  const rings = perSite > 1 ? resampleWire(a.profile, chain.spacing / perSite) : chain;
  const pts = Float64Array.from(rings.xyz, (v) => v * k);
  const mesh = tubeMesh(pts, rings.T, rings.closed, radius * k);
  const meshBytes = await meshToBytes(mesh, format, { unit, radiusNote, sourceFile: a.profile.source.file });

  // files for other tools
  const extra: OutputFile[] = [];
  const exportsInfo: ExportEntry[] = [];
  if (options.vtp === true) {
    const stretches = a.segments.map((g) => ({ s0: g.s0, s1: g.s1 }));
    const v = wireVtpFiles({ chain, model: cm, stretches, unit, mesh, ringsPerSite: perSite, sourceFile: a.profile.source.file });
    extra.push({ name: OUTPUT_NAMES.centerlineVtp, data: v.centerline }, { name: OUTPUT_NAMES.tubeVtp, data: v.tube });
    exportsInfo.push(
      { file: OUTPUT_NAMES.centerlineVtp, format: "vtp", content: "centre line (chain sites) with kappa, tau, bands, frame, flags, stretch number and, with a material, DMI, anisotropy axes and texture" },
      { file: OUTPUT_NAMES.tubeVtp, format: "vtp", content: "tube mesh with the arrays of the chain site nearest each ring" },
    );
  }
  if (options.grid !== undefined) {
    if (cm === null || cm.texture === null) {
      throw new ParameterError("buildWireOutputs", "grid", "the OVF texture needs a material (the relaxed texture comes from the model): add --material");
    }
    const grid = textureGrid(chain.xyz, cm.texture, chain.closed, radius, options.grid);
    const labels: [string, string, string] = cm.order === "ferro" ? ["m_x", "m_y", "m_z"] : ["n_x", "n_y", "n_z"];
    const what = cm.order === "ferro" ? "magnetisation direction m" : "Neel vector n";
    const desc = [
      `${TOOL_NAME} ${TOOL_VERSION}: relaxed ${what} of the curvilinear-magnet model, unit vectors inside the tube (radius ${brief(radius * k)} ${unit}), 0 outside`,
      `source ${a.profile.source.file}; model estimates, not measurements (a starting state for a solver)`,
    ];
    const title = `${TOOL_NAME} relaxed texture`;
    extra.push(
      { name: OUTPUT_NAMES.textureOvfText, data: gridToOvf(grid, { title, desc, data: "text", field: "vector", labels }) },
      { name: OUTPUT_NAMES.textureOvfBinary, data: gridToOvf(grid, { title, desc, data: "binary8", field: "vector", labels }) },
      { name: OUTPUT_NAMES.maskOvf, data: gridToOvf(grid, { title: `${TOOL_NAME} wire mask`, desc: [`1 inside the tube (radius ${brief(radius * k)} ${unit}), 0 outside`], data: "text", field: "mask" }) },
    );
    const cells = [grid.nx, grid.ny, grid.nz];
    const cell = jsonNumber(grid.cell * k) ?? 0;
    exportsInfo.push(
      { file: OUTPUT_NAMES.textureOvfText, format: "ovf-text", content: `relaxed texture (${labels.join(" ")}) on a regular grid, OVF 2.0 text`, cell, cells },
      { file: OUTPUT_NAMES.textureOvfBinary, format: "ovf-binary8", content: `the same, OVF 2.0 binary 8 (little-endian float64)`, cell, cells },
      { file: OUTPUT_NAMES.maskOvf, format: "ovf-text", content: "geometry mask: 1 inside the tube, 0 outside", cell, cells },
    );
  }

  const document = buildModelDocument(a, {
    unit,
    materialFile: options.materialFile ?? null,
    materialNote: options.materialNote ?? null,
    run: {
      argv: options.run?.argv ?? null,
      options: {
        ...(options.run?.options ?? {}),
        material: options.materialFile ?? null,
        closed: a.profile.closed,
        seed: a.seed,
        bootstrap: a.profile.replicates,
        outUnit: unit,
        spacing: jsonNumber(chain.spacing * k),
        spacingSource: spacingNote,
        mesh: format,
        radius: jsonNumber(radius * k),
        radiusSource: radiusNote,
        vtp: options.vtp === true,
        grid: options.grid !== undefined ? jsonNumber(options.grid * k) : null,
      },
    },
    extraWarnings: exportWarnings(a, chain.spacing, unit),
    outputs: {
      profile: OUTPUT_NAMES.profile,
      report: OUTPUT_NAMES.report,
      exports: exportsInfo,
      chain: { file: OUTPUT_NAMES.chain, sites: chain.n, spacing: chain.spacing * k, spacingNote, columns },
      mesh: {
        file: OUTPUT_NAMES.mesh(format), format, offset: [...mesh.offset], radius: mesh.radius, radiusSource: radiusNote,
        vertices: mesh.positions.length / 3, triangles: mesh.indices.length / 3,
      },
    },
  });
  const report = buildReport({ analysis: a, document, chain, viewerScript: options.viewerScript });
  const files: OutputFile[] = [
    { name: OUTPUT_NAMES.profile, data: profileCsvChunks(a.profile, { unit, seed: a.seed }) },
    { name: OUTPUT_NAMES.model, data: modelToJson(document) },
    { name: OUTPUT_NAMES.chain, data: chainCsv },
    { name: OUTPUT_NAMES.mesh(format), data: meshBytes },
    { name: OUTPUT_NAMES.report, data: report },
    ...extra,
  ];
  return { files, document, chain, mesh, spacingNote, radiusNote };
}
