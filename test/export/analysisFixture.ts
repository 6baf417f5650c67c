/**
 * A small Analysis for the writer tests, built without a fit: an invented helix-then-arc profile
 * from test/support/profiles (closed-form Frenet-Serret integration, seeded replicates), cut by
 * `segment`, with the physics stage run on it (invented material). Invented data, for tests only.
 */
import type { Analysis } from "../../src/export/analyzeTrace.js";
import { segment } from "../../src/frame/segment.js";
import { buildWireModel } from "../../src/physics/buildWireModel.js";
import { parseMaterial } from "../../src/physics/parseMaterial.js";
import type { Trace } from "../../src/types.js";
import { makeProfile } from "../support/profiles.js";

/** Invented soft ferromagnet: A = 1.3e-11 J/m, K = 2e5 J/m^3 (l = 8.06 nm), 4 nm thick. */
export const MATERIAL_JSON = { order: "ferro", exchange: 1.3e-11, anisotropy: 2e5, thickness: 4e-9 } as const;

export function analysisFixture(options: { material?: boolean; pinning?: boolean; file?: string; temperature?: number } = {}): Analysis {
  const l = 8.06e-9;
  const profile = {
    ...makeProfile({
      n: 240, length: 24 * l, replicates: 40, seed: 3,
      kappa: (s) => (s < 12 * l ? 0.3 / l : 0.6 / l), tau: (s) => (s < 12 * l ? 0.1 / l : 0),
    }),
    source: { file: options.file ?? "invented-wire.csv", unit: "nm" as const },
  };
  const trace: Trace = {
    xyz: Float64Array.from({ length: 3 * profile.n }, (_, k) => [profile.x, profile.y, profile.z][k % 3][Math.floor(k / 3)]),
    dims: 3, source: profile.source, diagnostics: [],
  };
  const segments = segment(profile);
  const material = options.material === false ? null : parseMaterial({ ...MATERIAL_JSON, ...(options.temperature !== undefined ? { temperature: options.temperature } : {}) }, "material.json");
  const model = material === null ? null : buildWireModel(profile, segments, material, options.pinning === false ? { pinning: false } : {});
  return { trace, profile, segments, material, model, seed: 1, timings: { profile: 0, segment: 0, model: 0 } };
}
