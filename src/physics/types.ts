/**
 * Types of the physics stage (src/physics). SI units unless a name says "reduced":
 * reduced lengths are in the magnetic length l = sqrt(A/K), reduced energy densities in K,
 * reduced energies per cross-section in K*l, reduced frequencies in omega_0 = c/l.
 * Local frame components are ordered (T, N, B); torsion follows B' = -tau N.
 */

/** "ferro": thin FM wire, easy-tangential shape anisotropy; "antiferro": AFM chain, hard-tangential. */
export type MagneticOrder = "ferro" | "antiferro";

/** An axis of the local (Frenet) frame. */
export type LocalAxis = "tangent" | "normal" | "binormal";

/** Extra intrinsic uniaxial term, energy density -constant * (u . axis)^2 (constant > 0: easy axis). */
export interface IntrinsicAnisotropy {
  /** J/m^3; positive for an easy axis, negative for a hard axis. */
  readonly constant: number;
  /** An axis of the local frame, or "lab": the fixed lab direction `direction`. */
  readonly axis: LocalAxis | "lab";
  /** Unit vector in lab coordinates when axis is "lab". */
  readonly direction?: readonly [number, number, number];
}

/** A uniform applied field (FM): magnitude H in A/m along a lab direction (unit vector). */
export interface AppliedField {
  readonly field: number;
  readonly direction: readonly [number, number, number];
}

/** A validated material. Unknown quantities are null (never invented). */
export interface Material {
  readonly order: MagneticOrder;
  /** Magnetic length l = sqrt(A/K) (m). */
  readonly magneticLength: number;
  /** Exchange stiffness A (J/m), null when only l was given. */
  readonly exchange: number | null;
  /** Anisotropy constant K of the shape (FM) or dipolar (AFM) term (J/m^3), null when unknown. */
  readonly anisotropy: number | null;
  readonly intrinsic: IntrinsicAnisotropy | null;
  /** Lattice spacing (m) for validity checks, null when not given. */
  readonly latticeSpacing: number | null;
  /** Wire thickness (diameter, m) for validity checks, null when not given. */
  readonly thickness: number | null;
  /** Cross-section area (m^2): given, or pi thickness^2 / 4 (round wire), else null. */
  readonly crossSection: number | null;
  /** Temperature (K) for pinning depths in k_B T (default 300). */
  readonly temperature: number;
  /** Magnon speed c (m/s) to turn reduced frequencies into rad/s; null when not given. */
  readonly magnonSpeed: number | null;
  /** Saturation magnetisation Ms (A/m), FM; null when not given. */
  readonly saturationMagnetisation: number | null;
  /** true when K was not given and is the shape anisotropy of a thin round wire, mu0 Ms^2 / 4. */
  readonly anisotropyFromShape: boolean;
  /** Applied field of the experiment (FM, needs Ms), null when none. */
  readonly appliedField: AppliedField | null;
}

/**
 * The model in reduced units the numerics see: the order and the reduced anisotropy tensor of the
 * material alone (no geometry) in local (T, N, B) components, row-major 3x3:
 * FM -T T^T, AFM +T T^T, plus -(K_i/K) a a^T for an intrinsic term.
 */
export interface ReducedSystem {
  readonly order: MagneticOrder;
  readonly q: Float64Array;
}

/** Homogeneous state of a constant-(kappa, tau) stretch, reduced units. */
export interface HomogeneousState {
  /** Unit vector of the state in local (T, N, B) components. */
  readonly u: Float64Array;
  /** Tilt (rad): FM from T toward B, AFM from B toward T; the sign follows the handedness. */
  readonly tilt: number;
  /** Energy density relative to the fully relaxed reference, reduced (units of K). */
  readonly energy: number;
  /** Eigenvalues (ascending, reduced) of the total anisotropy tensor (material + geometric). */
  readonly eigenvalues: Float64Array;
  /** Eigenvectors as rows, local components, matching `eigenvalues`. */
  readonly axes: Float64Array;
}

/** Linear stability and small-oscillation data of a homogeneous state, reduced units. */
export interface HomogeneousModes {
  /** D . mu0 (reduced): the geometric DMI coupling of the two transverse modes. */
  readonly d0: number;
  /** Transverse stiffnesses Ka >= Kb (eigenvalue gaps of the anisotropy tensor). */
  readonly ka: number;
  readonly kb: number;
  /** Linearly unstable: 2|D0| > sqrt(Ka) + sqrt(Kb). */
  readonly unstable: boolean;
  /** (sqrt(Ka) + sqrt(Kb)) - 2|D0|: positive when stable. */
  readonly margin: number;
}

/** AFM magnon data of a homogeneous stretch (reduced frequencies in omega_0 = c/l). */
export interface MagnonGaps {
  /** Lower and upper branches at k = 0. */
  readonly lower0: number;
  readonly upper0: number;
  /** Wave number (1/l) of the minimum of the lower branch; 0 when the minimum is at k = 0. */
  readonly kMin: number;
  /** Lower branch at its minimum; NaN when the state is unstable (omega^2 < 0). */
  readonly lowerMin: number;
  /** lower0 - lowerMin: depth of the negative group-velocity region (0 when none). */
  readonly depth: number;
  readonly unstable: boolean;
}

/**
 * Ground-state label of a stretch: homogeneous or periodic (open wires, AFM rings); on a closed FM
 * wire the whole ring decides: vortex (m along T all round) or onion (two head-to-head walls).
 */
export type GroundState = "homogeneous" | "periodic" | "vortex" | "onion";

/**
 * What a relaxed texture is: homogeneous (relaxed from the local homogeneous state), periodic (from
 * the periodic texture of the stretches labelled periodic), lab-uniform (from a direction fixed in
 * the lab), local-uniform (from a fixed local axis); on a closed FM wire vortex, onion (2 walls) or
 * multidomain (4 or more walls), counted from the sign changes of m . T.
 */
export type TextureState = "homogeneous" | "periodic" | "lab-uniform" | "local-uniform" | "vortex" | "onion" | "multidomain";
export type Stability = "stable" | "metastable" | "unstable";

/** Per-stretch result in model.json. Lengths in m, kappa and tau in 1/m. */
export interface StretchModel {
  readonly s0: number;
  readonly s1: number;
  readonly kind: "straight" | "arc" | "helix" | "irregular";
  readonly kappa: number;
  readonly kappaLo: number;
  readonly kappaHi: number;
  readonly tau: number;
  readonly tauLo: number;
  readonly tauHi: number;
  readonly kappaReduced: number;
  readonly tauReduced: number;
  readonly state: GroundState;
  readonly homogeneousStability: Stability;
  /** Homogeneous tilt in degrees: FM from T toward B, AFM from B toward T. */
  readonly tiltDeg: number;
  /** Label probabilities from the bootstrap replicates (or seeded draws within the bands). */
  readonly probabilities: {
    readonly homogeneous: number;
    readonly periodic: number;
    readonly stable: number;
    readonly metastable: number;
    readonly unstable: number;
  };
  /** true when the band straddles the phase boundary or the stability line. */
  readonly uncertain: boolean;
  /** Homogeneous energy density (reduced, units of K) and, when K is known, in J/m^3. */
  readonly energyReduced: number;
  /** Best periodic energy density found (reduced); null when not searched. */
  readonly periodicEnergyReduced: number | null;
  /**
   * Full period of the periodic texture (m): twice the half-period over which the energy repeats
   * (the vector reverses after a half-period). Only where the periodic state wins or is within the
   * bands of winning; null otherwise.
   */
  readonly period: number | null;
  /** Geometric DMI magnitude 2 A sqrt(kappa^2 + tau^2) (J/m^2), null when A is unknown. */
  readonly dmi: number | null;
  /** Reduced |D| l = sqrt((kappa l)^2 + (tau l)^2). */
  readonly dmiReduced: number;
  /** Effective anisotropy: eigenvalues (J/m^3 when K known, else reduced) and axes (local, rows). */
  readonly anisotropyConstants: readonly number[];
  readonly anisotropyConstantsUnit: "J/m^3" | "K";
  readonly anisotropyAxesLocal: readonly number[];
  /** AFM only: magnon gaps of the homogeneous state (reduced, and in rad/s when c is known). */
  readonly magnons: (MagnonGaps & { readonly note: string | null; readonly omega0: number | null }) | null;
  readonly flags: readonly string[];
}

/** A pinning site (a local minimum of the wall energy) or a barrier (a local maximum: a wall pushed away), reduced and SI. */
export interface PinningSite {
  readonly kind: "site" | "barrier";
  /** Position along the wire (m). */
  readonly s: number;
  /** Site: depth = barrier to the lower of the neighbouring maxima; barrier: height above the higher
   *  neighbouring minimum. J (null when K*l*area is unknown). */
  readonly depthJ: number | null;
  /** Depth in units of k_B T at the material temperature. */
  readonly depthKT: number | null;
  /** Depth in reduced units (K l area). */
  readonly depthReduced: number;
  /** 95% interval of the depth from the bootstrap replicates of kappa(s), tau(s) (reduced, J, k_B T); null without replicates. */
  readonly depthReducedLo: number | null;
  readonly depthReducedHi: number | null;
  readonly depthKTLo: number | null;
  readonly depthKTHi: number | null;
  /** false when the interval includes 0 or the depth is below 1 k_B T (thermally irrelevant). */
  readonly relevant: boolean;
  /** Why the site is not relevant, or null. */
  readonly note: string | null;
  /** Failing validity checks of the model within l/2 of the site (see VALIDITY_TEXT). */
  readonly flags: readonly string[];
  /** FM sites with Ms and K known: the field along the wire that pushes the wall out of the site
   *  over each side, H = max |dU/dq| / (2 mu0 Ms S) (A/m), the smaller of the two, and mu0 H (T). */
  readonly depinning: { readonly towardPlus: number; readonly towardMinus: number; readonly field: number; readonly fieldTesla: number } | null;
}

/** Wall-pinning landscape U(q) along the wire. */
export interface PinningLandscape {
  /** Wall positions (m). */
  readonly q: Float64Array;
  /** Wall energy relative to the wall-free texture (reduced, units of K l area). */
  readonly energy: Float64Array;
  /** First-order estimate at the same q (reduced). */
  readonly firstOrder: Float64Array;
  readonly sites: readonly PinningSite[];
  readonly method: string;
}

/** A relaxed texture other than the lowest: a metastable state of the whole wire. */
export interface TextureAlternative {
  readonly state: TextureState;
  readonly energyReduced: number;
  readonly energyJ: number | null;
  /** energyReduced minus the ground texture's energy (reduced, >= 0). */
  readonly aboveGroundReduced: number;
  readonly converged: boolean;
}

/** The relaxed texture along the wire: the lowest of several relaxations. */
export interface Texture {
  /** What the exported (lowest) texture is. */
  readonly state: TextureState;
  /** The other distinct textures found (metastable), lowest first. */
  readonly alternatives: readonly TextureAlternative[];
  /** Unit vectors in local (T, N, B) components, interleaved 3 per sample. */
  readonly local: Float64Array;
  /** The same in lab components, interleaved. */
  readonly lab: Float64Array;
  /** Total energy, reduced (K l area), relative to the fully relaxed reference density 0. */
  readonly energyReduced: number;
  /** Total energy in J (null when K*l*area is unknown). */
  readonly energyJ: number | null;
  readonly iterations: number;
  readonly converged: boolean;
}

/** Per-sample effective interactions for a resampled-chain export. */
export interface SampleInteractions {
  /** Reduced kappa l and tau l (tau NaN where undefined). */
  readonly kappaReduced: Float64Array;
  readonly tauReduced: Float64Array;
  /** Geometric DMI vector 2 A (tau T + kappa B) in lab components (J/m^2; reduced 2 D l if A unknown). */
  readonly dmiLab: Float64Array;
  /** Anisotropy eigenvalues per sample (3 each, ascending; J/m^3, or reduced when K unknown). */
  readonly anisotropyConstants: Float64Array;
  /** Principal axes per sample in lab components, 3 rows of 3 per sample (9 each). */
  readonly anisotropyAxesLab: Float64Array;
  readonly unit: { readonly dmi: "J/m^2" | "reduced"; readonly anisotropy: "J/m^3" | "K" };
}

/** Slowly-varying-geometry magnon gap profile along the wire (AFM). */
export interface GapProfile {
  readonly lower0: Float64Array;
  readonly upper0: Float64Array;
  /** Local band bottom (lower branch minimum over k). */
  readonly bandBottom: Float64Array;
  /** 1 where the geometry varies slowly enough for the local picture, else 0. */
  readonly valid: Uint8Array;
}

/** Ring state of a closed wire (reduced units unless stated). */
export interface RingModel {
  readonly order: MagneticOrder;
  /** FM: vortex | onion | multidomain from the relaxed texture; AFM: binormal (n = +-B all round) or the texture state. */
  readonly state: TextureState | "binormal";
  /** 2 pi l / L: the curvature of the circle of the same length. */
  readonly kappaCircleReduced: number;
  /** Mean and relative spread (standard deviation / mean) of kappa l along the wire. */
  readonly kappaMeanReduced: number;
  readonly kappaSpread: number;
  /** Spread below 5%: closed forms of a circle apply. */
  readonly nearCircular: boolean;
  /** FM: closed-form energies per unit length of the circle of the same length (units of K), and
   *  the closed-form label (vortex below kappa l = 0.65690, onion above); null for an AFM. */
  readonly closedForm: { readonly vortex: number; readonly onion: number; readonly state: "vortex" | "onion" } | null;
  /** AFM: magnon levels of the circle of the same length (null for an FM or far from a circle). */
  readonly levels: readonly { readonly j: number; readonly lower: number; readonly upper: number }[] | null;
  /** Why the circle's closed forms are only indicative here, or null. */
  readonly caution: string | null;
}

/** Everything the CLI writes into model.json (lengths in m). */
export interface WireModel {
  readonly unit: "m";
  readonly material: Material;
  readonly segments: readonly StretchModel[];
  /** Pinning sites that matter (interval above 0, at least 1 k_B T), deepest first. */
  readonly pinning: readonly PinningSite[];
  /** Thermally irrelevant sites (interval includes 0 or below 1 k_B T), deepest first. */
  readonly pinningMinor: readonly PinningSite[];
  /** Barriers (local maxima of the wall energy), highest first, with their relevance. */
  readonly barriers: readonly PinningSite[];
  /** Per-sample validity mask (bits of VALIDITY_BITS in ./sampleValidity.ts). */
  readonly validity: Uint8Array;
  readonly landscape: PinningLandscape | null;
  readonly texture: Texture;
  readonly interactions: SampleInteractions;
  readonly gapProfile: GapProfile | null;
  readonly ringLevels: { readonly j: number; readonly lower: number; readonly upper: number }[] | null;
  /** Closed wires: the ring state (null for an open wire). */
  readonly ring: RingModel | null;
  readonly warnings: readonly string[];
}
