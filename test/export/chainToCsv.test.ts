import { beforeAll, describe, expect, it } from "vitest";
import type { Analysis } from "../../src/export/analyzeTrace.js";
import { CHAIN_GEOMETRY_COLUMNS, chainToCsv } from "../../src/export/chainToCsv.js";
import { resampleWire } from "../../src/export/resampleWire.js";
import { buildWireOutputs } from "../../src/export/wireOutputs.js";
import { analysisFixture, MATERIAL_JSON } from "./analysisFixture.js";
import { helixProfile, readCsv } from "./helixProfile.js";
import { chunksToText, type Chunks } from "../../src/export/tableChunks.js";

let a: Analysis;
let text: string;
beforeAll(async () => {
  a = analysisFixture();
  const out = await buildWireOutputs(a, { unit: "nm", viewerScript: "/* no viewer in this test */" });
  text = chunksToText(out.files.find((f) => f.name === "chain.csv")!.data as Chunks);
});

describe("chainToCsv(wire, model, options)", () => {
  it("documents every column in the header, with its unit", () => {
    const { comments, header } = readCsv(text);
    const documented = comments.filter((c) => c.startsWith("# column ")).flatMap((c) => c.slice(9).split(":")[0].split(","));
    for (const col of header) expect(documented, col).toContain(col);
    expect(comments).toContain("# unit: nm (s x y z in nm; kappa tau in 1/nm; t n b unit vectors, lab frame)");
    expect(comments.some((c) => /^# spacing: [\d.]+ nm \(requested [\d.]+ nm, default: a quarter of the resolution length of the fit;/.test(c))).toBe(true);
    expect(header.slice(0, CHAIN_GEOMETRY_COLUMNS.length)).toEqual([...CHAIN_GEOMETRY_COLUMNS]);
    expect(header).toContain("mx");
  });

  it("gives the geometric DMI vector 2A (tau T + kappa B) and anisotropy constants whose sum is -K - A (kappa^2 + tau^2)", () => {
    // ../shared/PHYSICS.md section 2: DMI vector along the Darboux vector D = tau T + kappa B, constant 2A|D|;
    // FM total anisotropy tensor Q = -K T T^T - A D D^T, whose trace (the sum of the principal constants) is -K - A |D|^2.
    const { header, rows } = readCsv(text);
    const c = (name: string) => header.indexOf(name);
    const A = MATERIAL_JSON.exchange, K = MATERIAL_JSON.anisotropy;
    for (const r of rows.filter((_, i) => i % 25 === 0)) {
      const kappa = r[c("kappa")] * 1e9, tau = Number.isFinite(r[c("tau")]) ? r[c("tau")] * 1e9 : 0;
      for (const [d, t, b] of [["dmi_x", "tx", "bx"], ["dmi_y", "ty", "by"], ["dmi_z", "tz", "bz"]]) {
        const expected = 2 * A * (tau * r[c(t)] + kappa * r[c(b)]);
        expect(Math.abs(r[c(d)] - expected)).toBeLessThan(1e-9 * 2 * A * Math.hypot(kappa, tau) + 1e-30); // CSV keeps 12 digits
      }
      const sum = r[c("k1")] + r[c("k2")] + r[c("k3")];
      expect(Math.abs(sum / (-K - A * (kappa * kappa + tau * tau)) - 1)).toBeLessThan(1e-6);
      expect(r[c("k1")]).toBeLessThanOrEqual(r[c("k2")]);
      expect(r[c("k2")]).toBeLessThanOrEqual(r[c("k3")]);
      // axes orthonormal, relaxed texture a unit vector
      const ax = (k: number) => [r[c(`a${k}x`)], r[c(`a${k}y`)], r[c(`a${k}z`)]];
      const dot = (u: number[], v: number[]) => u[0] * v[0] + u[1] * v[1] + u[2] * v[2];
      expect(dot(ax(1), ax(1))).toBeCloseTo(1, 9);
      expect(dot(ax(1), ax(2))).toBeCloseTo(0, 9);
      expect(Math.hypot(r[c("mx")], r[c("my")], r[c("mz")])).toBeCloseTo(1, 9);
    }
  });

  it("without a model writes the geometry columns only, in the unit asked for", () => {
    const p = helixProfile(40e-9, 10e-9, 100);
    const wire = resampleWire(p, 2e-9);
    const t = chainToCsv(wire, null, { unit: "um", source: p.source, spacingNote: "--spacing", requestedSpacing: 2e-9 });
    const { header, rows } = readCsv(t);
    expect(header).toEqual([...CHAIN_GEOMETRY_COLUMNS]);
    expect(rows.length).toBe(wire.n);
    expect(rows[5][header.indexOf("s")]).toBeCloseTo(wire.s[5] * 1e6, 12);
    expect(rows[5][header.indexOf("kappa")]).toBeCloseTo(wire.kappa[5] / 1e6, 6);
  });
});
