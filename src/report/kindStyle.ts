/** How each stretch kind is shown: a light fill (prints as a light grey) and a letter, so it reads without colour. */
export const KIND_STYLE: Readonly<Record<"straight" | "arc" | "helix" | "irregular", { readonly fill: string; readonly letter: string; readonly name: string }>> = {
  straight: { fill: "#efefec", letter: "S", name: "straight" },
  arc: { fill: "#dfeaf3", letter: "A", name: "arc (planar, constant curvature)" },
  helix: { fill: "#ece2f1", letter: "H", name: "helix (constant curvature and torsion)" },
  irregular: { fill: "#f6e7d6", letter: "I", name: "irregular (geometry not constant)" },
};
