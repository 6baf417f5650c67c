import { VALIDITY_BITS, VALIDITY_TEXT } from "../physics/sampleValidity.js";
import type { Material, PinningSite, StretchModel, TextureState, WireModel } from "../physics/types.js";
import { PER_METRE, type Feature, type Interval, type LengthUnit, type StretchShape } from "../types.js";
import type { Analysis } from "./analyzeTrace.js";
import { composeWarnings } from "./composeWarnings.js";
import { jsonNumber } from "./formatNumber.js";
import type { MeshFormat } from "./meshToBytes.js";
import { TOOL_NAME, TOOL_VERSION } from "./version.js";

/**
 * `$id` of src/export/schemas/model.schema.json, written as the document's `$schema`: a URN (RFC 8141)
 * naming the format and its version, not a web address (nothing is fetched; the schema ships in the package).
 */
export const MODEL_SCHEMA_ID = "urn:twistline:schema:model:1";
export const MODEL_FORMAT = "twistline-model";
export const MODEL_FORMAT_VERSION = 1;

/** The line every model output carries. */
export const MODEL_NOTE =
  "model estimates, not measurements: a smoothing-spline fit of a traced centre line (95% bootstrap bands) and, with a material, the curvilinear-magnet model of each stretch";

/** Where the model stops being valid (shown in the report too). */
export const MODEL_VALIDITY =
  "valid for a thin wire whose curvature and torsion radii are much larger than the lattice spacing and the wire thickness, " +
  "for stretches several magnetic lengths long, with no damping and no applied field unless the material gives one; the geometry is only known down to the fit's resolution length, " +
  "so curvature varying on shorter scales is smoothed out";

type Num = number | null;

/** Material as written in model.json: lengths in `unit`, area in unit^2. */
export interface MaterialEntry {
  file: string | null;
  /** The material file's own note (provenance), or null. */
  note: string | null;
  order: "ferro" | "antiferro";
  exchange: Num;
  anisotropy: Num;
  magneticLength: number;
  intrinsic: { constant: number; axis: "tangent" | "normal" | "binormal" | "lab"; direction?: number[] } | null;
  latticeSpacing: Num;
  thickness: Num;
  crossSection: Num;
  temperature: number;
  magnonSpeed: Num;
  saturationMagnetisation: Num;
  anisotropyFromShape: boolean;
  appliedField: { field: number; direction: number[] } | null;
}

/** One stretch in model.json. Physics fields are null for a geometry-only run. */
export interface SegmentEntry {
  index: number;
  s0: number; s1: number; length: number;
  kind: "straight" | "arc" | "helix" | "irregular";
  kappa: Num; kappaLo: Num; kappaHi: Num; tau: Num; tauLo: Num; tauHi: Num;
  kappaReduced: Num; tauReduced: Num;
  state: "homogeneous" | "periodic" | "vortex" | "onion" | null;
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

/** A pinning site or barrier in model.json (lengths in `unit`). */
export interface PinningEntry {
  rank: number; kind: "site" | "barrier"; s: number; depthJ: Num; depthKT: Num; depthReduced: Num;
  depthReducedLo: Num; depthReducedHi: Num; depthKTLo: Num; depthKTHi: Num;
  relevant: boolean; note: string | null; flags: string[];
  depinning: { towardPlus: Num; towardMinus: Num; field: Num; fieldMilliTesla: Num } | null;
}

function pinningEntry(x: PinningSite, i: number, k: number): PinningEntry {
  const J = (v: number | null): Num => (v === null ? null : jsonNumber(v));
  return {
    rank: i + 1, kind: x.kind, s: jsonNumber(x.s * k) ?? 0, depthJ: J(x.depthJ), depthKT: J(x.depthKT), depthReduced: J(x.depthReduced),
    depthReducedLo: J(x.depthReducedLo), depthReducedHi: J(x.depthReducedHi), depthKTLo: J(x.depthKTLo), depthKTHi: J(x.depthKTHi),
    relevant: x.relevant, note: x.note, flags: [...x.flags],
    depinning: x.depinning === null ? null : {
      towardPlus: J(x.depinning.towardPlus), towardMinus: J(x.depinning.towardMinus), field: J(x.depinning.field), fieldMilliTesla: J(x.depinning.fieldTesla * 1000),
    },
  };
}

/** Runs of samples with the same non-zero validity code, as arc-length ranges in `unit`. */
function validityRanges(mask: Uint8Array, s: Float64Array, k: number): { code: number; s0: number; s1: number }[] {
  const out: { code: number; s0: number; s1: number }[] = [];
  let i = 0;
  while (i < mask.length) {
    const c = mask[i];
    let j = i;
    while (j + 1 < mask.length && mask[j + 1] === c) j++;
    if (c !== 0) out.push({ code: c, s0: jsonNumber(s[i] * k) ?? 0, s1: jsonNumber(s[j] * k) ?? 0 });
    i = j + 1;
  }
  return out;
}

/** The model.json document (see src/export/schemas/model.schema.json). */
export interface ModelDocument {
  $schema: string;
  format: string;
  formatVersion: number;
  tool: { name: string; version: string };
  note: string;
  run: RunInfo;
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
  pinning: PinningEntry[];
  pinningMinor: PinningEntry[];
  barriers: PinningEntry[];
  validityMap: { checks: { code: number; meaning: string }[]; ranges: { code: number; s0: number; s1: number }[] } | null;
  texture: {
    state: TextureState; energyReduced: Num; energyJ: Num; iterations: number; converged: boolean;
    alternatives: { state: TextureState; energyReduced: Num; energyJ: Num; aboveGroundReduced: Num; converged: boolean }[];
  } | null;
  ringLevels: { j: number; lower: Num; upper: Num }[] | null;
  ring: {
    order: "ferro" | "antiferro"; state: TextureState | "binormal"; kappaCircleReduced: Num; kappaMeanReduced: Num; kappaSpread: Num;
    nearCircular: boolean; closedForm: { vortex: Num; onion: Num; state: "vortex" | "onion" } | null; caution: string | null;
  } | null;
  warnings: string[];
  outputs: {
    profile: string;
    report: string;
    exports?: ExportEntry[];
    chain: { file: string; sites: number; spacing: Num; spacingNote: string; columns: string[] };
    mesh: {
      file: string; format: MeshFormat; unit: LengthUnit; offset: number[]; radius: number; radiusSource: string;
      vertices: number; triangles: number;
    };
  };
}

/** A value of one option of the run. */
export type OptionValue = string | number | boolean | null;

/** How the document was made: command line (when there was one) and every option value used. */
export interface RunInfo {
  command: string | null;
  argv: string[] | null;
  options: Record<string, OptionValue>;
}

/** Quotes one argument for a POSIX shell when it needs it (common practice: single quotes, ' as '\''). */
export function shellQuote(arg: string): string {
  return /^[A-Za-z0-9_@%+=:,./-]+$/.test(arg) ? arg : `'${arg.replace(/'/g, "'\\''")}'`;
}

/** A file for other tools (lengths in `unit`). */
export interface ExportEntry {
  file: string;
  format: "vtp" | "ovf-text" | "ovf-binary8";
  content: string;
  cell?: number;
  cells?: number[];
}

/** What the document says about the files written next to it (lengths in `unit`). */
export interface OutputsInfo {
  readonly profile: string;
  readonly report: string;
  readonly exports?: readonly ExportEntry[];
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
  /** The material file's note (provenance), when it has one. */
  readonly materialNote?: string | null;
  /** The command line (arguments after the program name, as given) and the option values used. */
  readonly run?: { readonly argv: readonly string[] | null; readonly options: Readonly<Record<string, OptionValue>> };
  /** Specific warnings of the export stage (sharp bends, thin-wire limit, resolution, spacing): listed first (see composeWarnings). */
  readonly extraWarnings?: readonly string[];
}

/** Material entry in `unit`. */
export function materialEntry(m: Material, unit: LengthUnit, file: string | null, note: string | null = null): MaterialEntry {
  const k = PER_METRE[unit];
  const len = (v: number | null): Num => (v === null ? null : jsonNumber(v * k));
  return {
    file,
    note,
    order: m.order,
    exchange: m.exchange === null ? null : jsonNumber(m.exchange),
    anisotropy: m.anisotropy === null ? null : jsonNumber(m.anisotropy),
    magneticLength: jsonNumber(m.magneticLength * k) ?? 0,
    intrinsic: m.intrinsic === null ? null : m.intrinsic.direction !== undefined
      ? { constant: m.intrinsic.constant, axis: m.intrinsic.axis, direction: [...m.intrinsic.direction] }
      : { constant: m.intrinsic.constant, axis: m.intrinsic.axis },
    latticeSpacing: len(m.latticeSpacing),
    thickness: len(m.thickness),
    crossSection: m.crossSection === null ? null : jsonNumber(m.crossSection * k * k),
    temperature: m.temperature,
    magnonSpeed: m.magnonSpeed === null ? null : jsonNumber(m.magnonSpeed),
    saturationMagnetisation: m.saturationMagnetisation === null ? null : jsonNumber(m.saturationMagnetisation),
    anisotropyFromShape: m.anisotropyFromShape,
    appliedField: m.appliedField === null ? null : { field: m.appliedField.field, direction: [...m.appliedField.direction] },
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
  const modelWarnings: string[] = [];
  if (model === null) {
    modelWarnings.push(
      "geometry only: no material given; with --material (order, exchange and anisotropy, or the magnetic length) each stretch also gets " +
        "its effective DMI and anisotropy, expected state, metastability and the pinning sites",
    );
  } else {
    modelWarnings.push(...model.warnings);
  }
  const warnings = composeWarnings({ model: modelWarnings, specific: options.extraWarnings ?? [], closed: p.closed });
  const o = options.outputs;
  return {
    $schema: MODEL_SCHEMA_ID,
    format: MODEL_FORMAT,
    formatVersion: MODEL_FORMAT_VERSION,
    tool: { name: TOOL_NAME, version: TOOL_VERSION },
    note: MODEL_NOTE,
    run: {
      command: options.run?.argv ? [TOOL_NAME, ...options.run.argv].map(shellQuote).join(" ") : null,
      argv: options.run?.argv ? [...options.run.argv] : null,
      options: { ...(options.run?.options ?? {}) },
    },
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
      field: "A/m (fieldMilliTesla: mu0 H in mT)",
      magnetisation: "A/m",
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
    material: a.material === null ? null : materialEntry(a.material, unit, options.materialFile ?? null, options.materialNote ?? null),
    segments: a.segments.map((_, i) => segmentEntry(a, i, model?.segments[i] ?? null, unit)),
    features: (a.features ?? []).map((f) => featureEntry(f, k)),
    pinning: (model?.pinning ?? []).map((x, i) => pinningEntry(x, i, k)),
    pinningMinor: (model?.pinningMinor ?? []).map((x, i) => pinningEntry(x, i, k)),
    barriers: (model?.barriers ?? []).map((x, i) => pinningEntry(x, i, k)),
    validityMap: model === null ? null : {
      checks: (Object.keys(VALIDITY_BITS) as (keyof typeof VALIDITY_BITS)[]).map((key) => ({ code: VALIDITY_BITS[key], meaning: VALIDITY_TEXT[key] })),
      ranges: validityRanges(model.validity, p.s, k),
    },
    texture: model === null ? null : {
      state: model.texture.state,
      energyReduced: jsonNumber(model.texture.energyReduced),
      energyJ: model.texture.energyJ === null ? null : jsonNumber(model.texture.energyJ),
      iterations: model.texture.iterations,
      converged: model.texture.converged,
      alternatives: model.texture.alternatives.map((x) => ({
        state: x.state, energyReduced: jsonNumber(x.energyReduced), energyJ: x.energyJ === null ? null : jsonNumber(x.energyJ),
        aboveGroundReduced: jsonNumber(x.aboveGroundReduced), converged: x.converged,
      })),
    },
    ringLevels: model?.ringLevels?.map((r) => ({ j: r.j, lower: jsonNumber(r.lower), upper: jsonNumber(r.upper) })) ?? null,
    ring: model?.ring == null ? null : {
      order: model.ring.order, state: model.ring.state, kappaCircleReduced: jsonNumber(model.ring.kappaCircleReduced),
      kappaMeanReduced: jsonNumber(model.ring.kappaMeanReduced), kappaSpread: jsonNumber(model.ring.kappaSpread), nearCircular: model.ring.nearCircular,
      closedForm: model.ring.closedForm === null ? null : { vortex: jsonNumber(model.ring.closedForm.vortex), onion: jsonNumber(model.ring.closedForm.onion), state: model.ring.closedForm.state },
      caution: model.ring.caution,
    },
    warnings,
    outputs: {
      profile: o.profile,
      report: o.report,
      ...(o.exports !== undefined && o.exports.length > 0 ? { exports: o.exports.map((e) => ({ ...e, ...(e.cells ? { cells: [...e.cells] } : {}) })) } : {}),
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
