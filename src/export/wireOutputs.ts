import { median } from "d3-array";
import { interactions } from "../physics/interactions.js";
import { reducedSystem } from "../physics/reducedSystem.js";
import { buildReport } from "../report/buildReport.js";
import { PER_METRE, type LengthUnit } from "../types.js";
import type { Analysis } from "./analyzeTrace.js";
import { CHAIN_GEOMETRY_COLUMNS, CHAIN_MODEL_COLUMNS, CHAIN_TEXTURE_COLUMNS, chainCsvChunks, type ChainModel } from "./chainToCsv.js";
import { brief } from "./brief.js";
import { meshToBytes, type MeshFormat } from "./meshToBytes.js";
import { buildModelDocument, modelToJson, type ModelDocument } from "./modelDocument.js";
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

/** Warnings of the export stage: what the resolution and the spacing mean for the model, and features merged into stretches. */
function exportWarnings(a: Analysis, spacing: number, unit: LengthUnit): string[] {
  const w: string[] = [];
  const k = PER_METRE[unit];
  const p = a.profile;
  const l = a.material?.magneticLength;
  if (l !== undefined && p.resolution > l) {
    w.push(
      `resolution: the fit resolves the geometry down to ${brief(p.resolution * k)} ${unit}, more than the magnetic length l = ${brief(l * k)} ${unit}; ` +
        "curvature that varies on shorter scales is smoothed out, so sharp bends (and their pinning depths) can be underestimated",
    );
  }
  if (l !== undefined && spacing > l / 2) {
    w.push(`chain spacing ${brief(spacing * k)} ${unit} is coarser than half the magnetic length (${brief((l / 2) * k)} ${unit}): too coarse for a solver`);
  }
  if (p.planarProjection) w.push("planar projection: torsion is not measurable from this trace; the model takes torsion 0");
  // a short sharp feature merged into a stretch (shorter than the resolution): its model uses the stretch mean
  a.segments.forEach((g, idx) => {
    let peak = -Infinity, at = -1;
    for (let i = g.i0; i < g.i1; ++i) if (p.kappa[i] > peak) { peak = p.kappa[i]; at = i; }
    if (at >= 0 && Number.isFinite(g.kappaHi) && p.kappaLo[at] > 2 * Math.max(g.kappaHi, 0)) {
      w.push(
        `stretch ${idx + 1} (${g.kind}) contains curvature up to ${brief(peak / k)} 1/${unit} at s = ${brief(p.s[at] * k)} ${unit}, ` +
          `well above its mean ${brief(g.kappa / k)} 1/${unit}: a feature shorter than the stretches the fit can separate; its model uses the stretch mean (see the pinning sites)`,
      );
    }
  });
  return w;
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
  const pts = Float64Array.from(chain.xyz, (v) => v * k);
  const mesh = tubeMesh(pts, chain.T, chain.closed, radius * k);
  const meshBytes = await meshToBytes(mesh, format, { unit, radiusNote, sourceFile: a.profile.source.file });

  const document = buildModelDocument(a, {
    unit,
    materialFile: options.materialFile ?? null,
    extraWarnings: exportWarnings(a, chain.spacing, unit),
    outputs: {
      profile: OUTPUT_NAMES.profile,
      report: OUTPUT_NAMES.report,
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
  ];
  return { files, document, chain, mesh, spacingNote, radiusNote };
}
