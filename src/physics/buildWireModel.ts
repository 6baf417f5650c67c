import type { Profile, Segment } from "../types.js";
import { mulberry32 } from "../frame/mulberry32.js";
import { anisotropyTensor } from "./anisotropyTensor.js";
import { gapProfile } from "./gapProfile.js";
import { homogeneousState } from "./homogeneousState.js";
import { interactions } from "./interactions.js";
import { symEigen3 } from "./linalg.js";
import { magnonGaps, ringLevels } from "./magnonGaps.js";
import type { PeriodicOptions } from "./periodicState.js";
import { firstOrderPinning, pinningScan, pinningSites, type PinningOptions } from "./pinning.js";
import { reducedSystem } from "./reducedSystem.js";
import { relaxWire, wireChain } from "./relaxWire.js";
import { stretchLabels, stretchProbabilities, type StretchContext } from "./stretchLabels.js";
import type { Material, PinningLandscape, PinningSite, StretchModel, WireModel } from "./types.js";

/** Boltzmann constant (J/K), exact in the 2019 SI. */
export const BOLTZMANN = 1.380649e-23;

/** Options of `buildWireModel`. */
export interface WireModelOptions {
  /** Seed of the draws used when the profile has no replicates (default 1). */
  readonly seed?: number;
  /** Seeded draws per stretch without replicates (default 200). */
  readonly draws?: number;
  /** Periodic-state search settings (default hMax 0.25, scan 10, refine 6). */
  readonly periodic?: PeriodicOptions;
  /** Pinning landscape settings (reduced lengths), or false to skip it. */
  readonly pinning?: false | (PinningOptions & { readonly coarse?: number; readonly fine?: number });
  /** Stretches shorter than this many magnetic lengths are flagged (default 3). */
  readonly shortStretch?: number;
}

/**
 * The whole physics stage for one wire: per stretch the reduced parameters, the effective DMI and
 * anisotropy, the homogeneous tilt, the two labels with probabilities, AFM magnon gaps and validity
 * flags; along the wire the relaxed texture, the wall-pinning landscape and sites (ranked deepest
 * first, in J and k_B T), the per-sample interactions for a chain export, the local AFM gap profile
 * and ring levels. Methods and sources: ../shared/PHYSICS.md (see each called function).
 * Units: SI in and out (lengths m, kappa and tau 1/m, energies J); reduced quantities are named so.
 * Energies in J need K and the cross-section (else null, with a warning). Deterministic (seeded).
 * Cost: seconds (a periodic search per stretch and corner, one relaxation, ~L/l wall relaxations).
 * @example buildWireModel(profile, segment(profile), material).segments[0].tiltDeg
 */
export function buildWireModel(profile: Profile, segments: readonly Segment[], material: Material, options: WireModelOptions = {}): WireModel {
  const l = material.magneticLength;
  const system = reducedSystem(material);
  const warnings: string[] = [];
  const periodicOptions: PeriodicOptions = { hMax: 0.25, scan: 10, refine: 6, ...options.periodic };
  const energyUnit = material.anisotropy !== null && material.crossSection !== null ? material.anisotropy * l * material.crossSection : null;
  if (energyUnit === null) warnings.push("energies in J need anisotropy (J/m^3) and thickness or crossSection (m, m^2): only reduced energies are given");
  const kT = BOLTZMANN * material.temperature;
  const inter = interactions(profile, material, system);
  const sRed = Float64Array.from(profile.s, (x) => x / l);
  const rand = mulberry32(options.seed ?? 1);
  const normal = (): number => {
    let a = rand();
    while (a <= 0) a = rand();
    return Math.sqrt(-2 * Math.log(a)) * Math.cos(2 * Math.PI * rand());
  };
  const ringWire = profile.closed && segments.length === 1 && segments[0].kind === "arc";
  const models: StretchModel[] = segments.map((g) => {
    const flags: string[] = [];
    const kr = g.kappa * l, tr = Number.isFinite(g.tau) ? g.tau * l : NaN;
    const context: StretchContext = g.kind === "straight" ? "straight" : g.kind === "helix" ? "helix" : ringWire ? "ring" : g.kind === "arc" ? "arc" : "helix";
    const tUse = context === "helix" ? (Number.isFinite(tr) ? tr : 0) : 0;
    const hom = homogeneousState(system, kr, tUse);
    const labels = stretchLabels(system, context, kr, tUse, periodicOptions);
    // replicate means of the stretch (bootstrap), else seeded draws within the bands
    const reps = profile.kappaSamples !== undefined && profile.replicates > 0 ? profile.replicates : 0;
    const nr = reps > 0 ? reps : options.draws ?? 200;
    const kS = new Float64Array(nr), tS = new Float64Array(nr);
    for (let r = 0; r < nr; ++r) {
      if (reps > 0) {
        let a = 0, b = 0, c = 0, d = 0;
        for (let i = g.i0; i < g.i1; ++i) {
          const kv = profile.kappaSamples![r * profile.n + i];
          if (Number.isFinite(kv)) { a += kv; b++; }
          const tv = profile.tauSamples?.[r * profile.n + i];
          if (tv !== undefined && Number.isFinite(tv)) { c += tv; d++; }
        }
        kS[r] = (b > 0 ? a / b : g.kappa) * l;
        tS[r] = (d > 0 ? c / d : g.tau) * l;
      } else {
        kS[r] = Math.max(0, kr + (((g.kappaHi - g.kappaLo) * l) / 3.92) * normal());
        tS[r] = Number.isFinite(tr) ? tr + (((g.tauHi - g.tauLo) * l) / 3.92) * normal() : 0;
      }
    }
    const prob = stretchProbabilities(system, context, kS, tS, periodicOptions);
    if (prob.uncertain) flags.push("uncertain: the band straddles the phase boundary or the stability line");
    if (labels.stability === "metastable") flags.push("metastable: a periodic texture has lower energy than the linearly stable homogeneous state");
    if (context === "ring" && system.order === "ferro" && labels.state === "periodic") flags.push("ring onion state (two walls), reported as periodic");
    // validity
    const len = g.s1 - g.s0;
    if (len < (options.shortStretch ?? 3) * l) flags.push(`short: ${(len / l).toPrecision(3)} magnetic lengths (< ${options.shortStretch ?? 3}); the constant-parameter model is doubtful`);
    if (len < profile.resolution) flags.push("shorter than the resolution length of the geometry fit");
    const radius = g.kappa > 0 ? 1 / g.kappaHi : Infinity;
    if (material.thickness !== null && radius < 5 * material.thickness) flags.push(`curvature radius ${radius.toExponential(2)} m not well above the thickness (model validity)`);
    if (material.latticeSpacing !== null && radius < 10 * material.latticeSpacing) flags.push(`curvature radius ${radius.toExponential(2)} m not well above the lattice spacing (model validity)`);
    if (g.kind === "helix" && Number.isFinite(g.tauLo) && g.tauLo <= 0 && g.tauHi >= 0) flags.push("torsion not resolved (band contains 0)");
    if ((g.kind === "arc" || g.kind === "irregular") && Number.isFinite(g.tauHi - g.tauLo) && (g.tauHi - g.tauLo) * l > 0.2) flags.push("torsion not resolved (wide band)");
    if (g.kind === "irregular") flags.push("irregular: geometry not constant; stretch labels use the mean");
    const qt = anisotropyTensor(new Float64Array(9), system, kr, tUse);
    const eig = symEigen3(qt);
    let magnons: StretchModel["magnons"] = null;
    if (system.order === "antiferro" && context !== "straight") {
      const mg = magnonGaps(system, kr, tUse);
      const note = labels.stability === "metastable" ? "spectrum of the metastable homogeneous state" : mg.unstable ? "homogeneous state unstable: no spectrum" : labels.state === "periodic" ? "ground state periodic: spectrum of the homogeneous state" : null;
      magnons = { ...mg, note, omega0: material.magnonSpeed !== null ? material.magnonSpeed / l : null };
    }
    return {
      s0: g.s0, s1: g.s1, kind: g.kind,
      kappa: g.kappa, kappaLo: g.kappaLo, kappaHi: g.kappaHi, tau: g.tau, tauLo: g.tauLo, tauHi: g.tauHi,
      kappaReduced: kr, tauReduced: tr,
      state: labels.state, homogeneousStability: labels.stability,
      tiltDeg: (hom.tilt * 180) / Math.PI,
      probabilities: { homogeneous: prob.homogeneous, periodic: prob.periodic, stable: prob.stable, metastable: prob.metastable, unstable: prob.unstable },
      uncertain: prob.uncertain,
      energyReduced: hom.energy,
      periodicEnergyReduced: labels.periodic?.energy ?? null,
      period: labels.periodic !== null ? labels.periodic.period * l : null,
      dmi: material.exchange !== null ? 2 * material.exchange * Math.hypot(g.kappa, Number.isFinite(g.tau) && context === "helix" ? g.tau : 0) : null,
      dmiReduced: Math.hypot(kr, tUse),
      anisotropyConstants: Array.from(eig.values, (v) => (material.anisotropy !== null ? v * material.anisotropy : v)),
      anisotropyConstantsUnit: material.anisotropy !== null ? "J/m^3" : "K",
      anisotropyAxesLocal: Array.from(eig.vectors),
      magnons,
      flags,
    };
  });
  // relaxed texture along the real wire
  const chain = wireChain(profile, l, system);
  const relaxed = relaxWire(chain, system, inter.kappaReduced, Float64Array.from(inter.tauReduced, (t) => (Number.isFinite(t) ? t : 0)));
  if (!relaxed.converged) warnings.push("texture relaxation stopped before convergence");
  const lab = new Float64Array(3 * profile.n);
  for (let i = 0; i < profile.n; ++i)
    for (let c = 0; c < 3; ++c)
      lab[3 * i + c] = relaxed.local[3 * i] * profile.T[3 * i + c] + relaxed.local[3 * i + 1] * profile.N[3 * i + c] + relaxed.local[3 * i + 2] * profile.B[3 * i + c];
  // pinning landscape
  let landscape: PinningLandscape | null = null;
  let pinning: PinningSite[] = [];
  if (options.pinning !== false) {
    if (models.some((m) => m.state === "periodic")) warnings.push("a stretch has a periodic ground state: the wall landscape there is taken on the relaxed texture and is indicative only");
    const scan = pinningScan(chain, sRed, relaxed.local, inter.kappaReduced, system.order, options.pinning ?? {});
    const fo = firstOrderPinning(sRed, inter.kappaReduced, scan.q, system.order);
    const sites = pinningSites(scan.q, scan.energy);
    pinning = sites.map((x) => {
      const depthJ = energyUnit !== null ? x.depth * energyUnit : null;
      return { s: x.q * l, depthJ, depthKT: depthJ !== null ? depthJ / kT : null, depthReduced: x.depth };
    });
    landscape = {
      q: Float64Array.from(scan.q, (x) => x * l),
      energy: scan.energy,
      firstOrder: fo,
      sites: pinning,
      method: system.order === "ferro"
        ? "constrained relaxation of a head-to-head wall through -N (window relaxation); firstOrder: 4 - 2 (kappa * sech)(q)"
        : "constrained relaxation of a wall between the two easy directions, through +N and through -N, the lower kept at every position (window relaxation); no first-order estimate; skipped where kappa l < 0.1",
    };
    const afmMin = (options.pinning ?? {}).afmMinKappa ?? 0.1;
    if (system.order === "antiferro" && inter.kappaReduced.some((k) => !(k >= afmMin))) warnings.push(`AFM wall not localised where kappa l < ${afmMin} (near-straight): no pinning landscape there`);
    warnings.push("wall positions within one relaxation window of an open end are skipped (the wall would be expelled there)");
  }
  const gp = system.order === "antiferro" ? gapProfile(system, sRed, inter.kappaReduced, inter.tauReduced) : null;
  if (gp !== null && gp.valid.some((v) => v === 0)) warnings.push("local magnon gap profile not valid everywhere (geometry not slowly varying, nearly straight or unstable): see gapProfile.valid");
  const ringL = system.order === "antiferro" && ringWire ? ringLevels(segments[0].kappa * l, 6) : null;
  if (profile.closed && system.order === "antiferro" && !ringWire) warnings.push("closed wire that is not one arc: no ring levels (the local gap profile applies where valid)");
  return {
    unit: "m",
    material,
    segments: models,
    pinning,
    landscape,
    texture: {
      local: relaxed.local,
      lab,
      energyReduced: relaxed.energy,
      energyJ: energyUnit !== null ? relaxed.energy * energyUnit : null,
      iterations: relaxed.iterations,
      converged: relaxed.converged,
    },
    interactions: inter,
    gapProfile: gp,
    ringLevels: ringL,
    warnings: ["model estimates, not measurements: thin-wire limit, curvature and torsion radii much larger than the lattice spacing and the thickness, no field, no damping", ...warnings],
  };
}
