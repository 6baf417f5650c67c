import { describe, expect, it } from "vitest";
import { composeWarnings, GENERAL_CAUTION_PREFIX } from "../../src/export/composeWarnings.js";
import { exportWarnings } from "../../src/export/wireOutputs.js";
import { buildModelDocument } from "../../src/export/modelDocument.js";
import { analysisFixture } from "./analysisFixture.js";
import { FLAG_JUNCTION_ZONE } from "../../src/types.js";

const GENERAL = `${GENERAL_CAUTION_PREFIX}: thin-wire limit, no field`;
const OPEN_END = "wall positions within one relaxation window of an open end are skipped (the wall would be expelled there)";

describe("composeWarnings(sources)", () => {
  it("puts specific findings first and the general caution once, last", () => {
    const w = composeWarnings({ model: [GENERAL, "texture relaxation stopped before convergence", GENERAL], specific: ["sharp bend: stretch 4"], closed: false });
    expect(w).toEqual(["sharp bend: stretch 4", "texture relaxation stopped before convergence", GENERAL]);
  });

  it("drops open-end notes on a closed loop and keeps them on an open wire", () => {
    expect(composeWarnings({ model: [OPEN_END], specific: [], closed: true })).toEqual([]);
    expect(composeWarnings({ model: [OPEN_END], specific: [], closed: false })).toEqual([OPEN_END]);
  });

  it("cuts pointers to in-memory fields that model.json does not carry", () => {
    const w = composeWarnings({ model: ["local magnon gap profile not valid everywhere (nearly straight): see gapProfile.valid"], specific: [], closed: false });
    expect(w).toEqual(["local magnon gap profile not valid everywhere (nearly straight)"]);
  });
});

describe("exportWarnings and model.json warnings", () => {
  it("warn of the thin-wire limit when the radius of curvature is below 5 thicknesses, and not otherwise", () => {
    // invented fixture: kappa l = 0.6 with l = 8.06 nm gives 1/kappa = 13.4 nm, against 5 x 4 nm = 20 nm
    const a = analysisFixture({ material: true, pinning: false });
    const w = exportWarnings(a, 1e-9, "nm");
    expect(w[0]).toMatch(/^thin-wire limit: the radius of curvature 1\/\u03ba = 13\.\d+ nm at s = .* is below 5 times the thickness \(4 nm\)/);
    const thin = { ...a, material: { ...a.material!, thickness: 1e-9 } };
    expect(exportWarnings(thin, 1e-9, "nm").some((x) => x.startsWith("thin-wire limit"))).toBe(false);
  });

  it("skip samples next to a network junction (flag 32): their curvature is the junction's", () => {
    const a = analysisFixture({ material: true, pinning: false });
    const flags = Uint8Array.from(a.profile.flags, (f) => f | FLAG_JUNCTION_ZONE);
    const zoned = { ...a, profile: { ...a.profile, flags } };
    expect(exportWarnings(zoned, 1e-9, "nm").some((x) => x.startsWith("thin-wire limit") || x.startsWith("sharp bend"))).toBe(false);
    expect(exportWarnings(a, 1e-9, "nm").some((x) => x.startsWith("thin-wire limit"))).toBe(true);
  });

  it("model.json lists the general caution last and no field that does not exist", () => {
    const a = analysisFixture({ material: true, pinning: false });
    const outputs = {
      profile: "p", report: "r", chain: { file: "c", sites: 0, spacing: 1, spacingNote: "", columns: [] },
      mesh: { file: "m", format: "ply" as const, offset: [0, 0, 0], radius: 1, radiusSource: "", vertices: 0, triangles: 0 },
    };
    const doc = buildModelDocument(a, { unit: "nm", outputs, extraWarnings: exportWarnings(a, 1e-9, "nm") });
    expect(doc.warnings[doc.warnings.length - 1].startsWith(GENERAL_CAUTION_PREFIX)).toBe(true);
    expect(doc.warnings.filter((x) => x.startsWith(GENERAL_CAUTION_PREFIX)).length).toBe(1);
    expect(doc.warnings[0]).toMatch(/^thin-wire limit/);
    expect(doc.warnings.join("\n")).not.toMatch(/gapProfile|see [a-z]+\.[a-z]+/);
  });
});
