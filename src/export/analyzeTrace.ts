import { describeLength } from "../frame/fitGuard.js";
import { fitProfile, type ProfileOptions } from "../frame/profile.js";
import { samplePoints, segmentWire, type SegmentOptions } from "../frame/segment.js";
import { buildWireModel, type WireModelOptions } from "../physics/buildWireModel.js";
import type { Material, WireModel } from "../physics/types.js";
import type { Feature, Profile, Segment, Trace } from "../types.js";

/** Start of the diagnostic of a `step` coarser than half the fit's resolution length (`exportWarnings` repeats it). */
export const COARSE_STEP_NOTE = "step: the profile is resampled";

/** Options of {@link analyzeTrace}. Lengths in metres. */
export interface AnalyzeOptions {
  /** Force a closed or open fit (default: the trace's declaration, else detected). */
  readonly closed?: boolean;
  /** Bootstrap replicates (default 200). */
  readonly bootstrap?: number;
  /** Seed of the bootstrap and of the model's draws (default 1). */
  readonly seed?: number;
  /** Profile sampling step (m); default one sample per input point. */
  readonly step?: number;
  /** Known coordinate error (standard deviation per coordinate, m): the noise is then not estimated. */
  readonly coordinateError?: number;
  /** A validated material (physics/parseMaterial); null or absent: geometry only. */
  readonly material?: Material | null;
  readonly segmentOptions?: SegmentOptions;
  readonly modelOptions?: WireModelOptions;
}

/** Everything one wire's analysis produced (SI units inside, as everywhere in src/). */
export interface Analysis {
  readonly trace: Trace;
  /** The fitted profile, import diagnostics merged into `diagnostics`, bootstrap replicates kept. */
  readonly profile: Profile;
  readonly segments: readonly Segment[];
  /** Named features (bends, kinks, coil defects, warps, ends), linked to the stretches (`segmentWire`). */
  readonly features?: readonly Feature[];
  readonly material: Material | null;
  /** The curvilinear-magnet model, null for a geometry-only run. */
  readonly model: WireModel | null;
  readonly seed: number;
  /** Wall time of each stage (ms), for the benchmark and the report footer. */
  readonly timings: { readonly profile: number; readonly segment: number; readonly model: number };
}

/**
 * The whole pipeline for one traced wire: fit the profile with its bootstrap replicates
 * (`fitProfile`, keepSamples on so the stretch bands and the label probabilities come from the
 * replicates), cut it into stretches (`segment`) and, with a material, build the model
 * (`buildWireModel`). No file I/O. Deterministic for a given seed.
 *
 * Units: SI in and out. Cost: the fit (~O(n) per pass plus the bootstrap) and, with a material,
 * seconds of physics (periodic searches per stretch, one relaxation, the pinning scan).
 * @throws {InputError} from the fit (too few points, non-finite coordinates, zero length).
 * @throws {ParameterError} bad options.
 * @example analyzeTrace(trace, { material }).model?.segments[0].state // "homogeneous"
 */
export function analyzeTrace(trace: Trace, options: AnalyzeOptions = {}): Analysis {
  const seed = options.seed ?? 1;
  const fitOptions: { -readonly [K in keyof ProfileOptions]: ProfileOptions[K] } = { bootstrap: options.bootstrap ?? 200, seed, keepSamples: true };
  if (options.closed !== undefined) fitOptions.closed = options.closed;
  if (options.step !== undefined) fitOptions.step = options.step;
  if (options.coordinateError !== undefined) fitOptions.coordinateError = options.coordinateError;
  const t0 = performance.now();
  const fitted = fitProfile(trace, fitOptions);
  const diagnostics = [...trace.diagnostics, ...fitted.diagnostics.filter((d) => !trace.diagnostics.includes(d))];
  // The stretches, features and model see the profile's samples: resampled more coarsely than the
  // fit resolves, they see less than the fit does (a uniform 198 nm helix resampled every 20 nm,
  // 11 samples, came out as irregular, helix, helix, irregular; one helix at one row per point).
  if (options.step !== undefined && options.step > 0.5 * fitted.resolution) {
    diagnostics.push(`${COARSE_STEP_NOTE} every ${describeLength(options.step, trace.source)}, more than half the fit's resolution length (${describeLength(fitted.resolution, trace.source)}): the stretches, features and model see only its ${fitted.n} samples; for them use a step of at most ${describeLength(0.25 * fitted.resolution, trace.source)}, or none`);
  }
  const profile: Profile = { ...fitted, diagnostics };
  const t1 = performance.now();
  // each stretch is refitted by its primitive on the input points of its samples (when the profile
  // has one sample per input point)
  const points = samplePoints(trace, profile);
  const { segments, features } = segmentWire(profile, { ...(points !== null ? { points } : {}), ...options.segmentOptions });
  const t2 = performance.now();
  const material = options.material ?? null;
  const model = material !== null ? buildWireModel(profile, segments, material, { seed, ...options.modelOptions }) : null;
  const t3 = performance.now();
  return { trace, profile, segments, features, material, model, seed, timings: { profile: t1 - t0, segment: t2 - t1, model: t3 - t2 } };
}
