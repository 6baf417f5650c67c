import { FLAG_BIAS } from "../types.js";
import type { Material } from "./types.js";

/** Bits of the per-sample validity mask (0: every check passes or could not be made). */
export const VALIDITY_BITS = {
  /** Radius of curvature (or of torsion) below 5 wire thicknesses. */
  bendVsThickness: 1,
  /** Radius of curvature (or of torsion) below 10 lattice spacings. */
  bendVsLattice: 2,
  /** A curvature feature near the resolution length of the geometry fit (smoothing bias comparable to the band). */
  featureVsResolution: 4,
  /** Wire thicker than the thin-wire limit (2 exchange lengths FM, 1 magnetic length AFM). */
  thickWire: 8,
} as const;

/** One line per bit, for reports and model.json. */
export const VALIDITY_TEXT: Readonly<Record<keyof typeof VALIDITY_BITS, string>> = {
  bendVsThickness: "curvature or torsion radius below 5 wire thicknesses",
  bendVsLattice: "curvature or torsion radius below 10 lattice spacings",
  featureVsResolution: "curvature feature near the resolution length of the fit (smoothing bias comparable to the band)",
  thickWire: "wire thicker than the thin-wire limit (FM: 2 exchange lengths; AFM: 1 magnetic length)",
};

/** MU0 (T m / A), the 2019 SI value (CODATA 2018: 1.25663706212e-6). */
export const MU0 = 1.25663706212e-6;

/**
 * Thin-wire limit of the thickness (m): the 1D model needs m (or n) uniform over the cross-section.
 * FM: 2 l_ex with the exchange length l_ex = sqrt(2 A / (mu0 Ms^2)) when Ms and A are known, else
 * 2 l / sqrt(2) (for the shape anisotropy of a round wire, K = mu0 Ms^2 / 4, l = sqrt(2) l_ex);
 * AFM: the magnetic length l. Common practice (no single source): the factor 2 is a conservative
 * choice of ours; the coherent-rotation limit of a round wire is a few exchange lengths (from memory).
 * @example thinWireLimit({ order: "ferro", exchange: 1.3e-11, saturationMagnetisation: 8e5, magneticLength: 7e-9 }) // ~1.14e-8
 */
export function thinWireLimit(m: Pick<Material, "order" | "exchange" | "saturationMagnetisation" | "magneticLength">): number {
  if (m.order === "antiferro") return m.magneticLength;
  if (m.exchange !== null && m.saturationMagnetisation !== null) return 2 * Math.sqrt((2 * m.exchange) / (MU0 * m.saturationMagnetisation ** 2));
  return (2 * m.magneticLength) / Math.SQRT2;
}

/**
 * Per-sample validity mask of the curvilinear thin-wire model (../shared/PHYSICS.md section 1:
 * curvature and torsion radii much larger than the lattice spacing and the thickness; thin wire),
 * bits of VALIDITY_BITS. The curvature radius is 1/kappaHi (the upper end of the 95% band, so a
 * doubtful bend is flagged), the torsion radius 1/max(|tauLo|, |tauHi|); NaN entries are not
 * flagged. The resolution check takes the fit's own per-sample bias flag (FLAG_BIAS of the
 * profile: the curvature changes by more than its band when smoothed less). Checks whose length is
 * unknown (null) are skipped. SI units. Cost O(n).
 * @example sampleValidity(profile, material)[i] & VALIDITY_BITS.bendVsThickness
 */
export function sampleValidity(
  p: { readonly kappaHi: Float64Array; readonly tauLo: Float64Array; readonly tauHi: Float64Array; readonly flags: Uint8Array },
  material: Pick<Material, "order" | "exchange" | "saturationMagnetisation" | "magneticLength" | "thickness" | "latticeSpacing">,
): Uint8Array {
  const n = p.kappaHi.length;
  const out = new Uint8Array(n);
  const t = material.thickness, a = material.latticeSpacing;
  const thick = t !== null && t > thinWireLimit(material) ? VALIDITY_BITS.thickWire : 0;
  for (let i = 0; i < n; ++i) {
    const rk = p.kappaHi[i] > 0 ? 1 / p.kappaHi[i] : Infinity;
    const tmax = Math.max(Math.abs(p.tauLo[i]), Math.abs(p.tauHi[i]));
    const rt = tmax > 0 ? 1 / tmax : Infinity;
    const r = Math.min(rk, Number.isFinite(tmax) ? rt : Infinity);
    let f = thick;
    if (t !== null && r < 5 * t) f |= VALIDITY_BITS.bendVsThickness;
    if (a !== null && r < 10 * a) f |= VALIDITY_BITS.bendVsLattice;
    if (p.flags[i] & FLAG_BIAS) f |= VALIDITY_BITS.featureVsResolution;
    out[i] = f;
  }
  return out;
}

/**
 * The failing checks of a mask (or of the union over samples i0..i1-1), as lines of VALIDITY_TEXT.
 * Cost O(i1 - i0).
 */
export function validityLines(mask: Uint8Array, i0 = 0, i1 = mask.length): string[] {
  let u = 0;
  for (let i = Math.max(0, i0); i < Math.min(mask.length, i1); ++i) u |= mask[i];
  return (Object.keys(VALIDITY_BITS) as (keyof typeof VALIDITY_BITS)[]).filter((k) => (u & VALIDITY_BITS[k]) !== 0).map((k) => VALIDITY_TEXT[k]);
}
