import { describe, expect, it } from "vitest";
import { profileToCsv } from "../../src/export/profileToCsv.js";
import { PROFILE_COLUMNS } from "../../src/export/profileTable.js";
import { profileToJson } from "../../src/export/profileToJson.js";
import { TOOL_VERSION } from "../../src/export/version.js";
import { helixProfile, readCsv } from "./helixProfile.js";

const a = 40e-9, b = 10e-9;
const kappa0 = a / (a * a + b * b); // helix closed form (see helixProfile.ts)

interface ProfileDoc {
  format: string; formatVersion: number; tool: { name: string; version: string }; note: string; unit: string; curvatureUnit: string;
  source: { file: string; unit: string; pixelSize?: number }; closed: boolean; n: number; length: number; sigma: number;
  lambda: number; lambdaTorsion: number; edf: number; resolution: number; bootstrap: { replicates: number; seed: number | null; level: number };
  planarProjection: boolean; outliers: number[]; flags: Record<string, string>; diagnostics: string[];
  columns: Record<string, (number | null)[]>;
}

describe("profileToJson(profile, options)", () => {
  it("writes metadata with units and a column per CSV column", () => {
    const doc = JSON.parse(profileToJson(helixProfile(a, b, 20), { unit: "nm", seed: 3 })) as ProfileDoc;
    expect(doc.format).toBe("twistline-profile");
    expect(doc.formatVersion).toBe(1);
    expect(doc.tool).toEqual({ name: "twistline", version: TOOL_VERSION });
    expect(doc.note).toMatch(/model estimates .* not measurements/);
    expect(doc.unit).toBe("nm");
    expect(doc.curvatureUnit).toBe("1/nm");
    expect(doc.source).toEqual({ file: "helix.csv", unit: "nm" });
    expect(doc).toMatchObject({ closed: false, n: 20, sigma: 0.25, lambda: 0.0123, lambdaTorsion: 0.5, edf: 17.5, resolution: 5, planarProjection: false });
    expect(doc.bootstrap).toEqual({ replicates: 200, seed: 3, level: 0.95 });
    expect(doc.diagnostics).toEqual(["dropped 1 consecutive duplicate point (line 7)"]);
    expect(Object.keys(doc.flags)).toEqual(["1", "2", "4", "8", "16"]);
    expect(Object.keys(doc.columns)).toEqual([...PROFILE_COLUMNS]);
    for (const name of PROFILE_COLUMNS) expect(doc.columns[name].length).toBe(20);
    expect(Math.abs((doc.columns.kappa[5] as number) - kappa0 / 1e9) / (kappa0 / 1e9)).toBeLessThan(1e-11);
  });

  it("holds the same numbers as the CSV", () => {
    const p = helixProfile(a, b, 25);
    const doc = JSON.parse(profileToJson(p, { unit: "um" })) as ProfileDoc;
    const { header, rows } = readCsv(profileToCsv(p, { unit: "um" }));
    header.forEach((name, c) => {
      expect(doc.columns[name]).toEqual(rows.map((r) => r[c]));
    });
    expect(doc.length).toBe(Number(readCsv(profileToCsv(p, { unit: "um" })).comments.find((l) => l.startsWith("# length:"))?.split(" ")[2]));
  });

  it("writes NaN as null, a missing seed as null, and a pixel size in the output unit", () => {
    const p = helixProfile(a, b, 4, { file: "img.json", unit: "px", pixelSize: 2e-9 });
    const tauLo = p.tauLo.slice();
    tauLo[1] = NaN;
    const doc = JSON.parse(profileToJson({ ...p, tauLo })) as ProfileDoc;
    expect(doc.unit).toBe("nm"); // the unit of a 2 nm pixel (issue 12)
    expect(doc.source).toEqual({ file: "img.json", unit: "px", pixelSize: 2 });
    expect(doc.columns.tau_lo[1]).toBeNull();
    expect(doc.bootstrap.seed).toBeNull();
  });

  it("puts each column on one line", () => {
    const text = profileToJson(helixProfile(a, b, 50));
    expect(text.split("\n").length).toBeLessThan(80);
    expect(text.endsWith("}\n")).toBe(true);
  });
});
