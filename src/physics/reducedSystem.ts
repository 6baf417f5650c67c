import type { Material, ReducedSystem } from "./types.js";

const AXIS_INDEX = { tangent: 0, normal: 1, binormal: 2 } as const;

/**
 * The reduced material tensor of the numerics: FM -T T^T, AFM +T T^T (units of K, local
 * (T, N, B) components), plus -(K_i/K) a a^T for an intrinsic uniaxial term along the local axis a.
 * Source: ../shared/PHYSICS.md section 2 (FM: Q = -K T T^T - A D D^T; AFM: +K T T^T - A D D^T).
 * An intrinsic term needs K (parseMaterial enforces it). Cost O(1).
 * @example reducedSystem({ order: "antiferro", ... }).q // [1,0,0, 0,0,0, 0,0,0]
 */
export function reducedSystem(material: Pick<Material, "order" | "intrinsic" | "anisotropy">): ReducedSystem {
  const q = new Float64Array(9);
  q[0] = material.order === "ferro" ? -1 : 1;
  const intr = material.intrinsic;
  // a lab-fixed axis varies along the wire in local components: a per-node term of the chain
  if (intr !== null && intr.axis !== "lab" && material.anisotropy !== null && material.anisotropy > 0) {
    const a = AXIS_INDEX[intr.axis];
    q[4 * a] -= intr.constant / material.anisotropy;
  }
  return { order: material.order, q };
}

/** The plain FM or AFM system without an intrinsic term (for tests and tables). */
export function plainSystem(order: "ferro" | "antiferro"): ReducedSystem {
  const q = new Float64Array(9);
  q[0] = order === "ferro" ? -1 : 1;
  return { order, q };
}
