import type { Material, StretchModel, WireModel } from "../physics/types.js";
import { PER_METRE, type Feature, type Interval, type LengthUnit, type StretchShape } from "../types.js";
import type { Analysis } from "./analyzeTrace.js";
import { jsonNumber } from "./formatNumber.js";
import type { MeshFormat } from "./meshToBytes.js";
import { TOOL_NAME, TOOL_VERSION } from "./version.js";

/** `$id` of src/export/schemas/model.schema.json, written as the document's `$schema`. */
export const MODEL_SCHEMA_ID = "https://twistline.example/schemas/model.schema.json";
export const MODEL_FORMAT = "twistline-model";
export const MODEL_FORMAT_VERSION = 1;

/** The line every model output carries. */
export const MODEL_NOTE =
  "model estimates, not measurements: a smoothing-spline fit of a traced centre line (95% bootstrap bands) and, with a material, the curvilinear-magnet model of each stretch";

/** Where the model stops being valid (shown in the report too). */
export const MODEL_VALIDITY =
  "valid for a thin wire whose curvature and torsion radii are much larger than the lattice spacing and the wire thickness, " +
  "for stretches several magnetic lengths long, with no applied field and no damping; the geometry is only known down to the fit's resolution length, " +
  "so curvature varying on shorter scales is smoothed out";

type Num = number | null;

/** Material as written in model.json: lengths in `unit`, area in unit^2. */
export interface MaterialEntry {
  file: string | null;
  order: "ferro" | "antiferro";
  exchange: Num;
  anisotropy: Num;
  magneticLength: number;
  intrinsic: { constant: number; axis: "tangent" | "normal" | "binormal" } | null;
  latticeSpacing: Num;
  thickness: Num;
  crossSection: Num;
  temperature: number;
  magnonSpeed: Num;
}

/** One stretch in model.json. Physics fields are null for a geometry-only run. */
export interface SegmentEntry {
  index: number;
  s0: number; s1: number; length: number;
  kind: "straight" | "arc" | "helix" | "irregular";
  kappa: Num; kappaLo: Num; kappaHi: Num; tau: Num; tauLo: Num; tauHi: Num;
  kappaReduced: Num; tauReduced: Num;
  state: "homogeneous" | "periodic" | null;
  homogeneousStability: "stable" | "metastable" | "unstable" | null;
  tiltDeg: Num;
  probabilities: { homogeneous: Num; periodic: Num; stable: Num; metastable: Num; unstable: Num } | null;
  uncertain: boolean | null;
  dmi: Num; dmiReduced: Num;
  anisotropyConstants: Num[] | null;
  anisotropyConstantsUnit: "J/m^3" | "K" | null;
  anisotropyAxesLocal: Num[] | null;
  energyReduced: Num; periodicEnergyReduced: Num; period: Num;
  magnons: {
    lower0: Num; upper0: Num; kMin: Num; lowerMin: Num; depth: Num; unstable: boolean; note: string | null; omega0: Num;
  } | null;
  flags: string[];
  /** The primitive refitted to the stretch's input points (lengths in unit, curvatures in 1/unit), or null. */
  shape: ShapeEntry | null;
  /** Why the stretch was demoted to irregular (its primitive missed the points), or null. */
  demoted: string | null;
  /** The stretch is the whole of a closed wire (no seam). */
  wholeRing: boolean;
}

/** A value with its 95% interval, in model.json. */
export interface IntervalEntry { value: Num; lo: Num; hi: Num }

/** A stretch's primitive in model.json (lengths in unit, kappa and tau in 1/unit). */
export interface ShapeEntry {
  primitive: "line" | "circle" | "helix";
  points: number;
  radius: IntervalEntry; pitch: IntervalEntry; handedness: -1 | 0 | 1;
  kappa: IntervalEntry; tau: IntervalEntry;
  axis: Num[]; centre: Num[]; rms: Num;
  verdict: "confirmed" | "rejected" | "untested"; reason: string;
}

/** A named feature in model.json (lengths in unit, angles in rad). */
export interface FeatureEntry {
  kind: Feature["kind"];
  s: Num; s0: Num; s1: Num;
  before: number; after: number; within: number;
  turningAngle: Num; minRadius: Num; radius: IntervalEntry | null; lowerBound: boolean;
  ratio: Num; note: string;
}

/** The model.json document (see src/export/schemas/model.schema.json). */
export interface ModelDocument {
  $schema: string;
  format: string;
  formatVersion: number;
  tool: { name: string; version: string };
  note: string;
  validity: string;
  unit: LengthUnit;
  units: Record<string, string>;
  source: { file: string; unit: string; pixelSize?: Num };
  seed: number;
  geometry: {
    length: Num; closed: boolean; samples: number; resolution: Num; sigma: Num; replicates: number;
    planarProjection: boolean; diagnostics: string[];
  };
  material: MaterialEntry | null;
  segments: SegmentEntry[];
  features: FeatureEntry[];
  pinning: { rank: number; s: number; depthJ: Num; depthKT: Num; depthReduced: Num }[];
  texture: { energyReduced: Num; energyJ: Num; iterations: number; converged: boolean } | null;
  ringLevels: { j: number; lower: Num; upper: Num }[] | null;
  warnings: string[];
  outputs: {
    profile: string;
    report: string;
    chain: { file: string; sites: number; spacing: Num; spacingNote: string; columns: string[] };
    mesh: {
      file: string; format: MeshFormat; unit: LengthUnit; offset: number[]; radius: number; radiusSource: string;
      vertices: number; triangles: number;
    };
  };
}

/** What the document says about the files written next to it (lengths in `unit`). */
export interface OutputsInfo {
  readonly profile: string;
  readonly report: string;
  readonly chain: { readonly file: string; readonly sites: number; readonly spacing: number; readonly spacingNote: string; readonly columns: readonly string[] };
  readonly mesh: {
    readonly file: string; readonly format: MeshFormat; readonly offset: readonly number[]; readonly radius: number;
    readonly radiusSource: string; readonly vertices: number; readonly triangles: number;
  };
}

/** Options of {@link buildModelDocument}. */
export interface ModelDocumentOptions {
  readonly unit: LengthUnit;
  /** Output files, lengths already in `unit`. */
  readonly outputs: OutputsInfo;
  /** The material file as given (null when the material came from code). */
  readonly materialFile?: string | null;
  /** Warnings of the export stage (resolution, spacing), appended after the model's. */
  readonly extraWarnings?: readonly string[];
}

/** Material entry in `unit`. */
export function materialEntry(m: Material, unit: LengthUnit, file: string | null): MaterialEntry {
  const k = PER_METRE[unit];
  const len = (v: number | null): Num => (v === null ? null : jsonNumber(v * k));
  return {
    file,
    order: m.order,
    exchange: m.exchange === null ? null : jsonNumber(m.exchange),
    anisotropy: m.anisotropy === null ? null : jsonNumber(m.anisotropy),
    magneticLength: jsonNumber(m.magneticLength * k) ?? 0,
    intrinsic: m.intrinsic === null ? null : { constant: m.intrinsic.constant, axis: m.intrinsic.axis },
    latticeSpacing: len(m.latticeSpacing),
    thickness: len(m.thickness),
    crossSection: m.crossSection === null ? null : jsonNumber(m.crossSection * k * k),
    temperature: m.temperature,
    magnonSpeed: m.magnonSpeed === null ? null : jsonNumber(m.magnonSpeed),
  };
}

function intervalEntry(v: Interval, f: number): IntervalEntry {
  return { value: jsonNumber(v.value * f), lo: jsonNumber(v.lo * f), hi: jsonNumber(v.hi * f) };
}

function shapeEntry(sh: StretchShape, k: number): ShapeEntry {
  return {
    primitive: sh.primitive, points: sh.points,
    radius: intervalEntry(sh.radius, k), pitch: intervalEntry(sh.pitch, k), handedness: sh.handedness,
    kappa: intervalEntry(sh.kappa, 1 / k), tau: intervalEntry(sh.tau, 1 / k),
    axis: sh.axis.map((v) => jsonNumber(v)), centre: sh.centre.map((v) => jsonNumber(v * k)), rms: jsonNumber(sh.rms * k),
    verdict: sh.verdict, reason: sh.reason,
  };
}

function featureEntry(f: Feature, k: number): FeatureEntry {
  const J = (v: number | undefined, g: number): Num => (v === undefined ? null : jsonNumber(v * g));
  return {
    kind: f.kind, s: jsonNumber(f.s * k), s0: jsonNumber(f.s0 * k), s1: jsonNumber(f.s1 * k),
    before: f.before, after: f.after, within: f.within,
    turningAngle: J(f.turningAngle, 1), minRadius: J(f.minRadius, k), radius: f.radius === undefined ? null : intervalEntry(f.radius, k),
    lowerBound: f.lowerBound === true, ratio: J(f.ratio, 1), note: f.note,
  };
}

function segmentEntry(a: Analysis, index: number, sm: StretchModel | null, unit: LengthUnit): SegmentEntry {
  const g = a.segments[index];
  const k = PER_METRE[unit];
  const J = jsonNumber;
  const base: SegmentEntry = {
    index,
    s0: J(g.s0 * k) ?? 0, s1: J(g.s1 * k) ?? 0, length: J((g.s1 - g.s0) * k) ?? 0,
    kind: g.kind,
    kappa: J(g.kappa / k), kappaLo: J(g.kappaLo / k), kappaHi: J(g.kappaHi / k),
    tau: J(g.tau / k), tauLo: J(g.tauLo / k), tauHi: J(g.tauHi / k),
    kappaReduced: null, tauReduced: null, state: null, homogeneousStability: null, tiltDeg: null,
    probabilities: null, uncertain: null, dmi: null, dmiReduced: null,
    anisotropyConstants: null, anisotropyConstantsUnit: null, anisotropyAxesLocal: null,
    energyReduced: null, periodicEnergyReduced: null, period: null, magnons: null, flags: [],
    shape: g.shape === undefined ? null : shapeEntry(g.shape, k),
    demoted: g.demoted ?? null,
    wholeRing: g.wholeRing === true,
  };
  if (sm === null) return base;
  const p = sm.probabilities;
  return {
    ...base,
    kappaReduced: J(sm.kappaReduced), tauReduced: J(sm.tauReduced),
    state: sm.state, homogeneousStability: sm.homogeneousStability, tiltDeg: J(sm.tiltDeg),
    probabilities: { homogeneous: J(p.homogeneous), periodic: J(p.periodic), stable: J(p.stable), metastable: J(p.metastable), unstable: J(p.unstable) },
    uncertain: sm.uncertain,
    dmi: sm.dmi === null ? null : J(sm.dmi), dmiReduced: J(sm.dmiReduced),
    anisotropyConstants: sm.anisotropyConstants.map(J), anisotropyConstantsUnit: sm.anisotropyConstantsUnit,
    anisotropyAxesLocal: sm.anisotropyAxesLocal.map(J),
    energyReduced: J(sm.energyReduced),
    periodicEnergyReduced: sm.periodicEnergyReduced === null ? null : J(sm.periodicEnergyReduced),
    period: sm.period === null ? null : J(sm.period * k),
    magnons: sm.magnons === null ? null : {
      lower0: J(sm.magnons.lower0), upper0: J(sm.magnons.upper0), kMin: J(sm.magnons.kMin), lowerMin: J(sm.magnons.lowerMin),
      depth: J(sm.magnons.depth), unstable: sm.magnons.unstable, note: sm.magnons.note,
      omega0: sm.magnons.omega0 === null ? null : J(sm.magnons.omega0),
    },
    flags: [...sm.flags],
  };
}

/**
 * Builds the model.json document of one analysed wire: the DESIGN.md keys (`unit`, `material`,
 * `segments` with kind, kappa, tau, reduced values, state, homogeneousStability, tiltDeg and
 * probabilities; `pinning` ranked deepest first; `warnings`) plus the geometry facts, the units of
 * every kind of quantity, the relaxed-texture summary and the files written next to it.
 * Every length is converted to `options.unit` (exact integer factors of PER_METRE), curvature and
 * torsion to 1/unit; NaN becomes null. Without a material the physics fields are null, `pinning`
 * is empty and `warnings` says what a material would add.
 * Cost: O(stretches + sites).
 */
export function buildModelDocument(a: Analysis, options: ModelDocumentOptions): ModelDocument {
  const unit = options.unit;
  const k = PER_METRE[unit];
  const p = a.profile;
  const model: WireModel | null = a.model;
  const source: ModelDocument["source"] = { file: p.source.file, unit: p.source.unit };
  if (p.source.pixelSize !== undefined) source.pixelSize = jsonNumber(p.source.pixelSize * k);
  const warnings: string[] = [];
  if (model === null) {
    warnings.push(
      "geometry only: no material given; with --material (order, exchange and anisotropy, or the magnetic length) each stretch also gets " +
        "its effective DMI and anisotropy, expected state, metastability and the pinning sites",
    );
  } else {
    warnings.push(...model.warnings);
  }
  warnings.push(...(options.extraWarnings ?? []));
  const o = options.outputs;
  return {
    $schema: MODEL_SCHEMA_ID,
    format: MODEL_FORMAT,
    formatVersion: MODEL_FORMAT_VERSION,
    tool: { name: TOOL_NAME, version: TOOL_VERSION },
    note: MODEL_NOTE,
    validity: MODEL_VALIDITY,
    unit,
    units: {
      length: unit,
      curvature: `1/${unit}`,
      torsion: `1/${unit} (B' = -tau N: a right-handed helix has tau > 0)`,
      area: `${unit}^2`,
      reduced: "dimensionless: kappa and tau times the magnetic length l",
      angle: "deg",
      probability: "dimensionless, 0 to 1",
      exchange: "J/m",
      anisotropy: "J/m^3 (or units of K where anisotropyConstantsUnit says K)",
      dmi: "J/m^2",
      energy: "J",
      energyThermal: "k_B T at material.temperature",
      energyReduced: "energy densities in units of K; energies in units of K l area",
      temperature: "K",
    },
    source,
    seed: a.seed,
    geometry: {
      length: jsonNumber(p.length * k),
      closed: p.closed,
      samples: p.n,
      resolution: jsonNumber(p.resolution * k),
      sigma: jsonNumber(p.sigma * k),
      replicates: p.replicates,
      planarProjection: p.planarProjection,
      diagnostics: [...p.diagnostics],
    },
    material: a.material === null ? null : materialEntry(a.material, unit, options.materialFile ?? null),
    segments: a.segments.map((_, i) => segmentEntry(a, i, model?.segments[i] ?? null, unit)),
    features: (a.features ?? []).map((f) => featureEntry(f, k)),
    pinning: (model?.pinning ?? []).map((s, i) => ({
      rank: i + 1,
      s: jsonNumber(s.s * k) ?? 0,
      depthJ: s.depthJ === null ? null : jsonNumber(s.depthJ),
      depthKT: s.depthKT === null ? null : jsonNumber(s.depthKT),
      depthReduced: jsonNumber(s.depthReduced),
    })),
    texture: model === null ? null : {
      energyReduced: jsonNumber(model.texture.energyReduced),
      energyJ: model.texture.energyJ === null ? null : jsonNumber(model.texture.energyJ),
      iterations: model.texture.iterations,
      converged: model.texture.converged,
    },
    ringLevels: model?.ringLevels?.map((r) => ({ j: r.j, lower: jsonNumber(r.lower), upper: jsonNumber(r.upper) })) ?? null,
    warnings,
    outputs: {
      profile: o.profile,
      report: o.report,
      chain: { file: o.chain.file, sites: o.chain.sites, spacing: jsonNumber(o.chain.spacing), spacingNote: o.chain.spacingNote, columns: [...o.chain.columns] },
      mesh: {
        file: o.mesh.file, format: o.mesh.format, unit, offset: o.mesh.offset.map((v) => jsonNumber(v) ?? 0),
        radius: o.mesh.radius, radiusSource: o.mesh.radiusSource, vertices: o.mesh.vertices, triangles: o.mesh.triangles,
      },
    },
  };
}

/**
 * model.json text: 2-space indentation, arrays of numbers kept on one line, `\n` line ends.
 * Cost: O(size).
 */
export function modelToJson(doc: ModelDocument): string {
  const text = JSON.stringify(doc, null, 2);
  // fold arrays whose items are all numbers (or null) onto one line
  return `${text.replace(/\[\n\s+((?:(?:-?[\d.eE+-]+|null),?\n\s*)+)\]/g, (_m, body: string) => `[${body.split(/,?\n\s*/).filter((s) => s !== "").join(", ")}]`)}\n`;
}
