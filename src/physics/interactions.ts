import { anisotropyTensor } from "./anisotropyTensor.js";
import { symEigen3 } from "./linalg.js";
import type { Material, ReducedSystem, SampleInteractions } from "./types.js";

/** The per-sample columns the mapping needs (a subset of the shared Profile). */
export interface FrameColumns {
  readonly n: number;
  readonly kappa: Float64Array;
  readonly tau: Float64Array;
  readonly T: Float64Array;
  readonly N: Float64Array;
  readonly B: Float64Array;
}

/**
 * Effective interactions at every sample of a profile: reduced kappa l and tau l; the geometric
 * DMI vector 2 A (tau T + kappa B) along the Darboux vector (J/m^2, lab components; reduced
 * 2 (tau l T + kappa l B) when A is unknown), and the principal constants and axes of the total
 * anisotropy tensor K Qtot = K Q_material - A D D^T (J/m^3; reduced when K is unknown), axes in
 * lab components. Source: ../shared/PHYSICS.md section 2 (own derivation; the same structure as
 * Sheka, Kravchuk, Gaididei, J. Phys. A 48, 125202 (2015)). NaN torsion (undefined) is taken as
 * 0 for the vectors and kept NaN in tauReduced. Cost O(n), one 3x3 eigen-solve per sample.
 * @example interactions(profile, material, system).dmiLab // 3 per sample
 */
export function interactions(p: FrameColumns, material: Material, system: ReducedSystem): SampleInteractions {
  const n = p.n, l = material.magneticLength;
  const a = material.exchange, k = material.anisotropy;
  const kappaReduced = new Float64Array(n), tauReduced = new Float64Array(n);
  const dmiLab = new Float64Array(3 * n), constants = new Float64Array(3 * n), axesLab = new Float64Array(9 * n);
  const qt = new Float64Array(9);
  for (let i = 0; i < n; ++i) {
    const kr = p.kappa[i] * l, tr = p.tau[i] * l;
    kappaReduced[i] = kr;
    tauReduced[i] = tr;
    const t0 = Number.isFinite(tr) ? tr : 0;
    // 2 A D = 2 A (tau T + kappa B) / l in SI: 2 K l (tau_r T + kappa_r B) with A = K l^2
    const scale = a !== null ? (2 * a) / l : 2;
    for (let c = 0; c < 3; ++c) dmiLab[3 * i + c] = scale * (t0 * p.T[3 * i + c] + kr * p.B[3 * i + c]);
    anisotropyTensor(qt, system, kr, t0);
    const { values, vectors } = symEigen3(qt);
    for (let e = 0; e < 3; ++e) {
      constants[3 * i + e] = k !== null ? values[e] * k : values[e];
      for (let c = 0; c < 3; ++c) {
        axesLab[9 * i + 3 * e + c] = vectors[3 * e] * p.T[3 * i + c] + vectors[3 * e + 1] * p.N[3 * i + c] + vectors[3 * e + 2] * p.B[3 * i + c];
      }
    }
  }
  return {
    kappaReduced,
    tauReduced,
    dmiLab,
    anisotropyConstants: constants,
    anisotropyAxesLab: axesLab,
    unit: { dmi: a !== null ? "J/m^2" : "reduced", anisotropy: k !== null ? "J/m^3" : "K" },
  };
}
