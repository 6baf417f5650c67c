/**
 * Small invented wires for the CLI tests (invented data, not measurements): a seeded noisy helix
 * (radius 30 nm, pitch 2 pi 8 nm, 2 turns) and a noisy arc, written as CSV with `# unit: nm`.
 */
import { writeFileSync } from "node:fs";
import { normalStream } from "../support/rng.js";

export function helixCsv(seed = 5, n = 160): string {
  const g = normalStream(seed);
  const rows = ["# invented test wire (not a measurement): helix r 30 nm, c 8 nm, 2 turns", "# unit: nm", "x,y,z"];
  for (let i = 0; i < n; ++i) {
    const t = (4 * Math.PI * i) / (n - 1);
    rows.push([30 * Math.cos(t) + 0.2 * g(), 30 * Math.sin(t) + 0.2 * g(), 8 * t + 0.2 * g()].map((v) => v.toFixed(4)).join(","));
  }
  return `${rows.join("\n")}\n`;
}

export function arcCsv(seed = 6, n = 120): string {
  const g = normalStream(seed);
  const rows = ["# invented test wire (not a measurement): planar arc of radius 60 nm over 180 degrees", "# unit: nm", "x,y"];
  for (let i = 0; i < n; ++i) {
    const t = (Math.PI * i) / (n - 1);
    rows.push([60 * Math.cos(t) + 0.2 * g(), 60 * Math.sin(t) + 0.2 * g()].map((v) => v.toFixed(4)).join(","));
  }
  return `${rows.join("\n")}\n`;
}

/** The invented demo-like material used by the CLI tests (soft ferromagnet, l = 8.06 nm). */
export const TEST_MATERIAL = JSON.stringify({ order: "ferro", exchange: 1.3e-11, anisotropy: 2e5, thickness: 4e-9 }, null, 2);

export function write(path: string, text: string): string {
  writeFileSync(path, text);
  return path;
}
