import { FLAG_TORSION_UNDEFINED, type Profile, type Segment } from "../types.js";
import { mulberry32 } from "../frame/mulberry32.js";
import { anisotropyTensor } from "./anisotropyTensor.js";
import { gapProfile } from "./gapProfile.js";
import { homogeneousState } from "./homogeneousState.js";
import { interactions } from "./interactions.js";
import { symEigen3 } from "./linalg.js";
import { magnonGaps } from "./magnonGaps.js";
import type { PeriodicOptions } from "./periodicState.js";
import { firstOrderPinning, flatReference, mergeLandscapes, pinningLandscape, pinningScan, type PinningOptions } from "./pinning.js";
import { pinningSummary, WALL_RESOLUTION } from "./pinningSummary.js";
import { MU0, sampleValidity, validityLines } from "./sampleValidity.js";
import { reducedSystem } from "./reducedSystem.js";
import { relaxChain } from "./relaxChain.js";
import { relaxWire, wireChain } from "./relaxWire.js";
import { ringState, ringWalls } from "./ringState.js";
import { textureStarts } from "./textureStarts.js";
import { stretchLabels, stretchProbabilities, type StretchContext } from "./stretchLabels.js";
import type { GroundState, Material, PinningLandscape, PinningSite, ReducedSystem, Stability, StretchModel, TextureAlternative, TextureState, WireModel } from "./types.js";

/** Boltzmann constant (J/K), exact in the 2019 SI. */
export const BOLTZMANN = 1.380649e-23;

/** Options of `buildWireModel`. */
export interface WireModelOptions {
  /** Seed of the draws used when the profile has no replicates (default 1). */
  readonly seed?: number;
  /** Seeded draws per stretch without replicates (default 200). */
  readonly draws?: number;
  /** Periodic-state search settings (default hMax 0.2 as PHYSICS.md section 4 asks, scan 10, refine 6). */
  readonly periodic?: PeriodicOptions;
  /** Pinning landscape settings (reduced lengths), or false to skip it. */
  readonly pinning?: false | (PinningOptions & { readonly coarse?: number; readonly fine?: number });
  /** Stretches shorter than this many magnetic lengths are flagged (default 3). */
  readonly shortStretch?: number;
}

/**
 * The whole physics stage for one wire: per stretch the reduced parameters, the effective DMI and
 * anisotropy, the homogeneous tilt, the two labels with probabilities (closed FM wires: vortex or
 * onion, decided on the whole wire), the full period where the periodic state may win, AFM magnon
 * gaps and validity flags; along the wire the per-sample validity mask, the relaxed texture (the
 * lowest of several starts, named, with the metastable alternatives), the ring state of a closed
 * wire, the wall-pinning landscape with its sites (deepest first, in J and k_B T, 95% intervals
 * from the bootstrap replicates, thermally irrelevant ones apart, depinning fields with Ms) and
 * barriers, the per-sample interactions for a chain export, the local AFM gap profile and ring
 * levels. An applied field and a lab-fixed intrinsic axis enter the relaxation and the landscape.
 * Methods and sources: ../shared/PHYSICS.md (see each called function).
 * Units: SI in and out (lengths m, kappa and tau 1/m, energies J); reduced quantities are named so.
 * Energies in J need K and the cross-section (else null, with a warning). Deterministic (seeded).
 * Cost: seconds (a periodic search per stretch and corner, one relaxation, ~L/l wall relaxations).
 * @example buildWireModel(profile, segment(profile), material).segments[0].tiltDeg
 */
export function buildWireModel(profile: Profile, segments: readonly Segment[], material: Material, options: WireModelOptions = {}): WireModel {
  const l = material.magneticLength;
  const system = reducedSystem(material);
  const warnings: string[] = [];
  const periodicOptions: PeriodicOptions = { hMax: 0.2, scan: 10, refine: 6, ...options.periodic };
  const energyUnit = material.anisotropy !== null && material.crossSection !== null ? material.anisotropy * l * material.crossSection : null;
  if (energyUnit === null) warnings.push("energies in J need anisotropy (J/m^3) and thickness or crossSection (m, m^2): only reduced energies are given");
  const kT = BOLTZMANN * material.temperature;
  const inter = interactions(profile, material, system);
  const sRed = Float64Array.from(profile.s, (x) => x / l);
  const validity = sampleValidity(profile, material);
  if (profile.resolution > l) warnings.push(`resolution length of the geometry fit ${(profile.resolution / l).toPrecision(3)} magnetic lengths: curvature varying on the scale of a wall (l) is smoothed out, so pinning by finer features is missing`);
  const rand = mulberry32(options.seed ?? 1);
  const normal = (): number => {
    let a = rand();
    while (a <= 0) a = rand();
    return Math.sqrt(-2 * Math.log(a)) * Math.cos(2 * Math.PI * rand());
  };
  const ringWire = profile.closed && segments.length === 1 && segments[0].kind === "arc";
  // a closed FM wire: vortex or onion, decided on the whole closed wire (PHYSICS.md section 3)
  const ferroRing = profile.closed && system.order === "ferro";
  const whole: Segment = { s0: profile.s[0], s1: profile.s[0] + profile.length, i0: 0, i1: profile.n, kind: "arc", kappa: mean(profile.kappa), kappaLo: mean(profile.kappaLo), kappaHi: mean(profile.kappaHi), tau: 0, tauLo: 0, tauHi: 0 };
  const reps = profile.kappaSamples !== undefined && profile.replicates > 0 ? profile.replicates : 0;
  /** Replicate means of a stretch (bootstrap), else seeded draws within the bands. */
  const replicateMeans = (g: Segment, kr: number, tr: number): { kS: Float64Array; tS: Float64Array } => {
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
    return { kS, tS };
  };
  const ringKappa = whole.kappa * l;
  const ringProb = ferroRing ? (() => {
    const r = replicateMeans(whole, ringKappa, 0);
    return stretchProbabilities(system, "ring", r.kS, r.tS, periodicOptions);
  })() : null;
  const ringLabels = ferroRing ? stretchLabels(system, "ring", ringKappa, 0, periodicOptions) : null;
  const periodicCells: { g: Segment; texture: Float64Array; halfPeriod: number }[] = [];
  const models: StretchModel[] = segments.map((g): StretchModel => {
    const flags: string[] = [];
    const kr = g.kappa * l, tr = Number.isFinite(g.tau) ? g.tau * l : NaN;
    const context: StretchContext = ferroRing ? "ring" : g.kind === "straight" ? "straight" : g.kind === "helix" ? "helix" : ringWire ? "ring" : g.kind === "arc" ? "arc" : "helix";
    const tUse = context === "helix" ? (Number.isFinite(tr) ? tr : 0) : 0;
    const hom = homogeneousState(system, kr, tUse);
    const labels = ringLabels ?? stretchLabels(system, context, kr, tUse, periodicOptions);
    const { kS, tS } = replicateMeans(g, kr, tr);
    const prob = ringProb ?? stretchProbabilities(system, context, kS, tS, periodicOptions, labels.periodic !== null ? { kappa: kr, tau: tUse, result: labels.periodic } : null);
    if (prob.uncertain) flags.push("uncertain: the band straddles the phase boundary or the stability line");
    if (labels.stability === "metastable") flags.push("metastable: a periodic texture has lower energy than the linearly stable homogeneous state");
    // full period (2 x the energy's half-period), only where the periodic state wins or may win
    const mayBePeriodic = labels.state === "periodic" || prob.periodic > 0;
    const period = labels.periodic !== null && mayBePeriodic && !ferroRing ? 2 * labels.periodic.period * l : null;
    if (labels.periodic !== null && mayBePeriodic && !ferroRing) periodicCells.push({ g, texture: labels.periodic.texture, halfPeriod: labels.periodic.period });
    if (labels.state === "periodic" && period !== null && g.s1 - g.s0 < period) flags.push(`periodic label on a stretch shorter than one period (${((g.s1 - g.s0) / period).toPrecision(2)} periods): the texture there is set by the neighbours and the ends`);
    if (labels.periodic?.atUpperBound && mayBePeriodic) flags.push("periodic texture at the longest period searched: a dilute kink lattice, period only a lower bound");
    // validity
    const len = g.s1 - g.s0;
    if (len < (options.shortStretch ?? 3) * l) flags.push(`short: ${(len / l).toPrecision(3)} magnetic lengths (< ${options.shortStretch ?? 3}); the constant-parameter model is doubtful`);
    if (len < profile.resolution) flags.push("shorter than the resolution length of the geometry fit");
    // per-sample validity: a sharp bend inside a stretch is flagged even when the mean is fine
    let nBad = 0;
    for (let i = g.i0; i < g.i1; ++i) if (validity[i] !== 0) nBad++;
    for (const line of validityLines(validity, g.i0, g.i1)) flags.push(`validity: ${line} (${nBad} of ${g.i1 - g.i0} samples fail a check)`);
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
      period,
      dmi: material.exchange !== null ? 2 * material.exchange * Math.hypot(g.kappa, Number.isFinite(g.tau) && context === "helix" ? g.tau : 0) : null,
      dmiReduced: Math.hypot(kr, tUse),
      anisotropyConstants: Array.from(eig.values, (v) => (material.anisotropy !== null ? v * material.anisotropy : v)),
      anisotropyConstantsUnit: material.anisotropy !== null ? "J/m^3" : "K",
      anisotropyAxesLocal: Array.from(eig.vectors),
      magnons,
      flags,
    };
  });
  // relaxed texture along the real wire: several starts, the lowest kept and named
  const perNode = perNodeTerms(profile, material);
  const chain = { ...wireChain(profile, l, system), field: perNode.field, nodeTensor: perNode.tensor };
  if (perNode.field !== null || perNode.tensor !== null) {
    warnings.push(`${perNode.field !== null ? "applied field" : ""}${perNode.field !== null && perNode.tensor !== null ? " and " : ""}${perNode.tensor !== null ? "intrinsic axis fixed in the lab" : ""}: included in the relaxed texture and the pinning landscape only; the stretch labels, tilts, periodic search, per-sample anisotropy and magnon gaps are those without it (the constant-coefficient helix results no longer apply)`);
  }
  const tauRelax = Float64Array.from(inter.tauReduced, (t) => (Number.isFinite(t) ? t : 0));
  const homStart = relaxStartHomogeneous(system, inter.kappaReduced, tauRelax);
  const starts = textureStarts(profile, sRed, homStart, periodicCells.map((c) => ({ i0: c.g.i0, i1: c.g.i1, texture: c.texture, halfPeriod: c.halfPeriod })), perNode.field !== null && material.appliedField !== null ? [material.appliedField.direction] : []);
  const relaxed = relaxWire(chain, system, inter.kappaReduced, tauRelax, starts);
  if (!relaxed.converged) warnings.push("texture relaxation stopped before convergence");
  const nameOf = (name: string, local: Float64Array): TextureState => {
    if (ferroRing) {
      // the vortex is m = +-T all round (PHYSICS.md section 3); a wall-free texture that leaves the
      // tangent (m = B: the local homogeneous state for kappa l > 1, e = 0) is not a vortex
      const walls = ringWalls(local);
      let minT = Infinity;
      for (let i = 0; i < local.length / 3; ++i) minT = Math.min(minT, Math.abs(local[3 * i]));
      return walls === 0 ? (minT >= 0.5 ? "vortex" : "local-uniform") : walls === 2 ? "onion" : "multidomain";
    }
    return name === "periodic" ? "periodic" : name === "lab-uniform" ? "lab-uniform" : name === "homogeneous" ? "homogeneous" : "local-uniform";
  };
  const textureState = nameOf(relaxed.name, relaxed.local);
  // closed FM wire: an alternative is listed only if it is a local minimum. A symmetric start can
  // stop on a stationary point that is not one (m = B on a ring: tilting it in the plane by a toward
  // a lab-fixed direction changes e by -a^2 cos^2(phi) on average < 0, own derivation from the ring
  // energy of PHYSICS.md section 3; likewise the vortex above kappa l = 1): perturb and relax again.
  const isMinimum = (x: { local: Float64Array; energy: number }): boolean => {
    const rnd = mulberry32(7);
    const v = Float64Array.from(x.local, (c) => c + 0.02 * (rnd() - 0.5));
    const r = relaxChain(chain, v, { maxIterations: 3000 });
    return !(r.energy < x.energy - 1e-4 * Math.max(1, Math.abs(x.energy)));
  };
  const alternatives: TextureAlternative[] = relaxed.alternatives.filter((x) => !ferroRing || isMinimum(x)).map((x) => ({
    state: nameOf(x.name, x.local),
    energyReduced: x.energy,
    energyJ: energyUnit !== null ? x.energy * energyUnit : null,
    aboveGroundReduced: x.energy - relaxed.energy,
    converged: x.converged,
  }));
  const lab = new Float64Array(3 * profile.n);
  for (let i = 0; i < profile.n; ++i)
    for (let c = 0; c < 3; ++c)
      lab[3 * i + c] = relaxed.local[3 * i] * profile.T[3 * i + c] + relaxed.local[3 * i + 1] * profile.N[3 * i + c] + relaxed.local[3 * i + 2] * profile.B[3 * i + c];
  const ring = profile.closed ? ringState(system.order, inter.kappaReduced, profile.length / l, relaxed.local, textureState) : null;
  if (ring?.caution) warnings.push(ring.caution);
  if (ferroRing && ring !== null) {
    // every stretch of a closed FM wire carries the ring's state; the vortex is metastable when the
    // onion wins, the vortex is linearly stable (PHYSICS.md sections 3 and 4: FM at tau = 0 the
    // homogeneous m = T is unstable above kappa l = 1, the same closed-form criterion as the
    // probabilities) and it is still among the relaxed local minima
    const ringLabel: GroundState = textureState === "vortex" ? "vortex" : "onion";
    const vortexAlt = alternatives.some((x) => x.state === "vortex");
    const linearlyUnstable = ringLabels !== null && ringLabels.stability === "unstable";
    const stability: Stability = ringLabel === "vortex" ? "stable" : vortexAlt && !linearlyUnstable ? "metastable" : "unstable";
    if (textureState === "multidomain") warnings.push("closed FM wire: the lowest texture found has more than two walls (labelled onion)");
    if (ring.nearCircular && ring.closedForm !== null && ring.closedForm.state !== ringLabel) {
      warnings.push(`closed FM wire: the relaxed texture is the ${ringLabel} but the circle of the same length (kappa l = ${ring.kappaCircleReduced.toPrecision(3)}) prefers the ${ring.closedForm.state}`);
    }
    for (let k = 0; k < models.length; ++k) {
      const fl = models[k].flags.filter((f) => !f.startsWith("metastable"));
      if (stability === "metastable") fl.push("metastable: the vortex is a local minimum above the onion ground state of the ring");
      models[k] = { ...models[k], state: ringLabel, homogeneousStability: stability, flags: fl };
    }
  } else {
    const anyPeriodic = models.some((m) => m.state === "periodic");
    if (anyPeriodic && textureState !== "periodic") warnings.push(`a stretch is labelled periodic but the lowest texture found on the whole wire is ${textureState} (the finite wire's ends and neighbours decide)`);
    if (!anyPeriodic && textureState === "periodic") warnings.push("the lowest texture found on the whole wire is the tiled periodic texture although no stretch is labelled periodic (band straddling the boundary)");
  }
  // pinning landscape
  let landscape: PinningLandscape | null = null;
  let pinning: PinningSite[] = [], pinningMinor: PinningSite[] = [], barriers: PinningSite[] = [];
  // a wall of width l needs the continuum model (l above the lattice spacing) and a chain that
  // resolves it (spacing below WALL_RESOLUTION l); otherwise the landscape is a discretisation
  // artefact (a straight wire gave "sites" of 0.7 K l S at spacing 5 l): no landscape, say why
  const hSorted = Float64Array.from(chain.h).sort();
  const hMedian = hSorted.length > 0 ? hSorted[hSorted.length >> 1] : 0;
  let pinningSkipped: string | null = null;
  if (material.latticeSpacing !== null && l < material.latticeSpacing) pinningSkipped = `magnetic length ${(l * 1e9).toPrecision(3)} nm below the lattice spacing ${(material.latticeSpacing * 1e9).toPrecision(3)} nm: a wall is not a continuum texture, no pinning landscape`;
  else if (hMedian > WALL_RESOLUTION) pinningSkipped = `profile samples ${hMedian.toPrecision(3)} magnetic lengths apart (median; > ${WALL_RESOLUTION}) cannot resolve a wall of width l: no pinning landscape (sample the profile finer than l/2 = ${((l / 2) * 1e9).toPrecision(3)} nm)`;
  if (pinningSkipped !== null && options.pinning !== false) warnings.push(pinningSkipped);
  if (options.pinning !== false && pinningSkipped === null) {
    if (models.some((m) => m.state === "periodic")) warnings.push("a stretch has a periodic ground state: the wall landscape there is taken on the relaxed texture and is indicative only");
    if (textureState === "onion" || textureState === "multidomain") warnings.push(`the ring's ground state (${textureState}) already holds walls: the landscape of one more wall on it is indicative only`);
    let scan = pinningScan(chain, sRed, relaxed.local, inter.kappaReduced, system.order, { ...(options.pinning ?? {}), keepWalls: true });
    const fo = firstOrderPinning(sRed, inter.kappaReduced, scan.q, system.order);
    const replicates = reps > 0 ? {
      count: reps,
      kappa: Float64Array.from(profile.kappaSamples!, (x) => x * l),
      tau: profile.tauSamples !== undefined ? Float64Array.from(profile.tauSamples, (x) => x * l) : null,
    } : null;
    const bias = reps > 0 && profile.kappaBias !== undefined ? {
      // where the fit cannot tell kappa from 0 (flag 1) its noise floor lifts it (|r''| >= 0): 0 is
      // the corrected value there (bench/pinningDepth.ts: FM bumps of width 5 l read 1-3% shallow
      // from the straight wire's floor beside them; depth intervals holding the first-order depth
      // 15/33 -> 31/33 with this)
      kappa: Float64Array.from(profile.kappaBias, (b, i) => ((profile.flags[i] & FLAG_TORSION_UNDEFINED) !== 0 ? 0 : profile.kappa[i] + b) * l),
      tau: profile.tauBias !== undefined ? Float64Array.from(profile.tauBias, (b, i) => (profile.tau[i] + b) * l) : null,
    } : null;
    const periodic = new Uint8Array(profile.n);
    // stretches labelled periodic that are long enough to hold the texture's winding (half a period;
    // a 22 nm bend labelled periodic with a 90 nm period, on a wire whose texture is homogeneous, is not)
    models.forEach((m, k) => {
      const g = segments[k];
      if (m.state === "periodic" && m.period !== null && g.s1 - g.s0 >= 0.5 * m.period) periodic.fill(1, g.i0, g.i1);
    });
    if (replicates === null) warnings.push("no bootstrap replicates kept with the profile: pinning depths have no 95% interval");
    const ms = material.saturationMagnetisation;
    const depinning = system.order === "ferro" && ms !== null && material.anisotropy !== null ? { anisotropy: material.anisotropy, saturationMagnetisation: ms } : null;
    const reference = flatReference(chain, sRed, inter.kappaReduced, system.order, options.pinning || {});
    const summarise = () => pinningSummary({
      scan, h: chain.h, q: system.q, replicates, bias, kappaReduced: inter.kappaReduced, tauReduced: tauRelax, sReduced: sRed, validity,
      l, energyUnit, kT, depinning, reference, periodic,
    });
    let summary = summarise();
    if (depinning !== null && summary.sites.length > 0) {
      // depinning fields need the steepest slope: sample the flanks (3 l each side) of the five
      // deepest sites at the fine step too, then summarise again
      const fine = options.pinning?.fine ?? 0.25;
      const have = new Set(scan.index);
      const extra = new Set<number>();
      for (const site of summary.sites.slice(0, 5)) {
        const sq = site.s / l;
        for (let i = 0; i < profile.n; ++i) {
          if (Math.abs(sRed[i] - sq) > 3 || have.has(i)) continue;
          const prevKept = [...extra].some((j) => Math.abs(sRed[j] - sRed[i]) < 0.999 * fine) || [...have].some((j) => Math.abs(sRed[j] - sRed[i]) < 0.999 * fine);
          if (!prevKept) extra.add(i);
        }
      }
      if (extra.size > 0) {
        const more = pinningLandscape(chain, sRed, relaxed.local, inter.kappaReduced, system.order, { ...(options.pinning ?? {}), nodes: [...extra].sort((a, b) => a - b), keepWalls: true });
        scan = mergeLandscapes([scan, more]);
        summary = summarise();
      }
    }
    pinning = summary.sites;
    pinningMinor = summary.minor;
    barriers = summary.barriers;
    const indicativeOnly = pinningMinor.filter((x) => x.note !== null && x.note.startsWith("indicative only")).length;
    const irrelevant = pinningMinor.length - indicativeOnly;
    if (irrelevant > 0) warnings.push(`${irrelevant} thermally irrelevant pinning ${irrelevant === 1 ? "site" : "sites"} (95% interval includes 0 or depth below 1 k_B T) listed apart`);
    if (indicativeOnly > 0) warnings.push(`${indicativeOnly} pinning ${indicativeOnly === 1 ? "site" : "sites"} listed apart as indicative only: ${indicativeOnly === 1 ? "its" : "their"} relaxation windows reach into a stretch with a periodic ground state, where the depth depends on the relaxed periodic texture (measured on an invented stepped coil: 0.4 to 93 k_B T for the same geometry with its stretch ends moved by a few nm)`);
    if (system.order === "ferro" && ms === null) warnings.push("no saturation magnetisation Ms in the material: no depinning fields");
    else if (system.order === "ferro") warnings.push("depinning fields from the largest slope of the sampled landscape (0.25 l apart within 3 l of the five deepest sites, 1 l elsewhere): quasi-static rigid-wall fields at zero temperature, no thermal activation");
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
  const ringL = ring?.levels !== null && ring?.levels !== undefined ? [...ring.levels] : null;
  return {
    unit: "m",
    material,
    segments: models,
    pinning,
    pinningMinor,
    barriers,
    validity,
    landscape,
    texture: {
      state: textureState,
      alternatives,
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
    ring,
    warnings: ["model estimates, not measurements: thin-wire limit, curvature and torsion radii much larger than the lattice spacing and the thickness, no damping, no applied field unless the material gives one; not modelled: intrinsic DMI, FM spin waves, thermal activation beyond the k_B T unit", ...warnings],
  };
}

/** Mean of the finite entries (NaN when none). */
function mean(a: ArrayLike<number>): number {
  let acc = 0, m = 0;
  for (let i = 0; i < a.length; ++i) if (Number.isFinite(a[i])) { acc += a[i]; m++; }
  return m > 0 ? acc / m : NaN;
}

/** The local homogeneous state per sample, sign continuous (the same start `relaxWire` builds). */
function relaxStartHomogeneous(system: ReducedSystem, kappa: ArrayLike<number>, tau: ArrayLike<number>): Float64Array {
  const n = kappa.length;
  const v = new Float64Array(3 * n);
  for (let i = 0; i < n; ++i) {
    const u = homogeneousState(system, kappa[i], tau[i]).u;
    const sgn = i > 0 && u[0] * v[3 * i - 3] + u[1] * v[3 * i - 2] + u[2] * v[3 * i - 1] < 0 ? -1 : 1;
    for (let c = 0; c < 3; ++c) v[3 * i + c] = sgn * u[c];
  }
  return v;
}

/**
 * Per-node terms of the wire chain from lab-fixed quantities, in local components at each sample:
 * the Zeeman field h = mu0 Ms H / K (d . T, d . N, d . B) of an applied field (reduced; energy
 * density -h . m in units of K), and the tensor -(K_i / K) a a^T of an intrinsic axis a fixed in the
 * lab. null when absent. Cost O(n).
 */
function perNodeTerms(profile: Profile, material: Material): { field: Float64Array | null; tensor: Float64Array | null } {
  const n = profile.n, T = profile.T, N = profile.N, B = profile.B;
  const local = (d: readonly number[], i: number): [number, number, number] => {
    const o = 3 * i;
    return [d[0] * T[o] + d[1] * T[o + 1] + d[2] * T[o + 2], d[0] * N[o] + d[1] * N[o + 1] + d[2] * N[o + 2], d[0] * B[o] + d[1] * B[o + 1] + d[2] * B[o + 2]];
  };
  let field: Float64Array | null = null, tensor: Float64Array | null = null;
  const af = material.appliedField, ms = material.saturationMagnetisation, K = material.anisotropy;
  if (af !== null && ms !== null && K !== null && af.field > 0) {
    const h = (MU0 * ms * af.field) / K;
    field = new Float64Array(3 * n);
    for (let i = 0; i < n; ++i) {
      const a = local(af.direction, i);
      for (let c = 0; c < 3; ++c) field[3 * i + c] = h * a[c];
    }
  }
  const intr = material.intrinsic;
  if (intr !== null && intr.axis === "lab" && intr.direction !== undefined && K !== null) {
    const f = -intr.constant / K;
    tensor = new Float64Array(9 * n);
    for (let i = 0; i < n; ++i) {
      const a = local(intr.direction, i);
      for (let r = 0; r < 3; ++r) for (let c = 0; c < 3; ++c) tensor[9 * i + 3 * r + c] = f * a[r] * a[c];
    }
  }
  return { field, tensor };
}
