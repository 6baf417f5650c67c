import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { ParameterError } from "../../src/errors.js";
import { formatNumber, jsonNumber } from "../../src/export/formatNumber.js";
import { defaultOutputUnit } from "../../src/export/outputUnit.js";
import { profileToCsv } from "../../src/export/profileToCsv.js";
import { TOOL_VERSION } from "../../src/export/version.js";
import { FLAG_TORSION_UNDEFINED, type LengthUnit, type Profile } from "../../src/types.js";
import { helixProfile, readCsv } from "./helixProfile.js";

const a = 40e-9, b = 10e-9; // helix radius and pitch / (2 pi), metres
const kappa0 = a / (a * a + b * b), tau0 = b / (a * a + b * b); // helix closed forms (see helixProfile.ts)
const relErr = (x: number, y: number) => Math.abs(x - y) / Math.abs(y);

describe("profileToCsv(profile, options)", () => {
  it("starts with # lines that state tool, version, source, unit, fit figures and that these are estimates", () => {
    const { comments } = readCsv(profileToCsv(helixProfile(a, b, 30), { seed: 7 }));
    expect(comments).toEqual([
      `# twistline ${TOOL_VERSION}: curvature and torsion profile`,
      "# note: model estimates from a smoothing-spline fit of a traced centre line, not measurements; bands are 95% bootstrap intervals",
      "# source: helix.csv (unit nm)",
      "# unit: nm (s x y z in nm; kappa tau and their bands in 1/nm; t n b unit vectors)",
      "# closed: false",
      "# samples: 30",
      `# length: ${formatNumber(helixProfile(a, b, 30).length * 1e9)} nm`,
      "# noise sigma: 0.25 nm (estimated, per coordinate)",
      "# smoothing lambda: 0.0123 (dimensionless)",
      "# torsion smoothing lambda: 0.5 (dimensionless)",
      "# edf: 17.5 (effective degrees of freedom per coordinate)",
      "# resolution: 5 nm (shortest length scale the fit resolves)",
      "# bootstrap: 200 replicates, seed 7",
      "# planar projection: false",
      "# outliers: 0",
      "# dropped rows: 0 (gross outliers left out before the fit; input_row numbering)",
      "# down-weighted rows: 0 (robust weight below 0.5)",
      "# flag 1: torsion undefined: curvature not resolved from 0 (tau NaN, Frenet n and b undefined)",
      "# flag 2: n and b from the twist-free (parallel-transport) frame",
      "# flag 4: within one resolution length of an open end (larger bias)",
      "# flag 8: torsion not measurable (planar projection)",
      "# flag 16: smoothing bias comparable to the band (feature near the resolution length): the band may under-cover",
      "# diagnostic: dropped 1 consecutive duplicate point (line 7)",
    ]);
  });

  it("writes the fixed column set, one row per sample", () => {
    const { header, rows } = readCsv(profileToCsv(helixProfile(a, b, 30)));
    expect(header.join(",")).toBe("s,x,y,z,kappa,kappa_lo,kappa_hi,tau,tau_lo,tau_hi,tx,ty,tz,nx,ny,nz,bx,by,bz,flags,input_row");
    expect(rows.length).toBe(30);
    expect(rows.every((r) => r.length === 21 && r.every(Number.isFinite))).toBe(true);
    expect(rows.map((r) => r[20]).slice(4, 8)).toEqual([6, 7, 9, 10]); // input lines, line 8 a dropped duplicate
    expect(rows[0][19]).toBe(4);
    expect(rows[1][19]).toBe(0);
  });

  it("writes the helix closed forms in the output unit: lengths x 1e9, kappa and tau / 1e9 for nm", () => {
    const { rows } = readCsv(profileToCsv(helixProfile(a, b, 30), { unit: "nm" }));
    for (const r of rows) {
      expect(relErr(r[4], kappa0 / 1e9)).toBeLessThan(1e-11); // 12 digits written
      expect(relErr(r[7], tau0 / 1e9)).toBeLessThan(1e-11);
      expect(Math.hypot(r[1], r[2])).toBeCloseTo(40, 9); // radius 40 nm
      expect(Math.hypot(r[10], r[11], r[12])).toBeCloseTo(1, 10); // unit tangent
    }
    expect(rows[29][0]).toBeCloseTo(4 * Math.PI * Math.hypot(40, 10), 8); // s = t sqrt(a^2 + b^2)
  });

  it("scales by exact powers of ten between units", () => {
    const p = helixProfile(a, b, 10);
    const inUnit = (unit: LengthUnit) => readCsv(profileToCsv(p, { unit })).rows;
    const nm = inUnit("nm"), um = inUnit("um"), A = inUnit("A"), m = inUnit("m");
    for (let i = 0; i < 10; ++i) {
      expect(relErr(um[i][1] * 1e3, nm[i][1])).toBeLessThan(1e-11);
      expect(relErr(A[i][1] / 10, nm[i][1])).toBeLessThan(1e-11);
      expect(relErr(m[i][4], kappa0)).toBeLessThan(1e-11);
      expect(relErr(um[i][4] / 1e3, nm[i][4])).toBeLessThan(1e-11);
    }
  });

  it("defaults to the input unit, and for pixels to the unit their size is written in (issue 12)", () => {
    expect(defaultOutputUnit({ file: "a", unit: "A" })).toBe("A");
    const px = helixProfile(a, b, 5, { file: "img.csv", unit: "px", pixelSize: 2.5e-9 });
    const text = profileToCsv(px);
    expect(text).toContain("# unit: nm (");
    expect(text).toContain("# source: img.csv (unit px, pixel size 2.5 nm)");
    expect(defaultOutputUnit({ file: "a", unit: "px", pixelSize: 0.4e-6 })).toBe("nm");
    expect(defaultOutputUnit({ file: "a", unit: "px", pixelSize: 1.5e-6 })).toBe("um");
    expect(defaultOutputUnit({ file: "a", unit: "px", pixelSize: 2e-3 })).toBe("m");
    expect(defaultOutputUnit({ file: "a", unit: "px" })).toBe("um");
  });

  it("writes NaN as NaN and records a missing seed as not recorded", () => {
    const p = helixProfile(a, b, 5);
    const tau = p.tau.slice();
    tau[2] = NaN;
    const flags = p.flags.slice();
    flags[2] = FLAG_TORSION_UNDEFINED;
    const text = profileToCsv({ ...p, tau, flags });
    const row = text.split("\n").filter((l) => !l.startsWith("#"))[3].split(",");
    expect(row[7]).toBe("NaN");
    expect(row[19]).toBe("1");
    expect(text).toContain("# bootstrap: 200 replicates, seed not recorded");
  });

  it("keeps file-borne text on one comment line", () => {
    const p: Profile = { ...helixProfile(a, b, 5), diagnostics: ["two\nlines"], source: { file: "odd\r\nname.csv", unit: "nm" } };
    const text = profileToCsv(p);
    expect(text).toContain("# diagnostic: two lines\n");
    expect(text).toContain("# source: odd name.csv (unit nm)\n");
  });

  it("lists outlier indices", () => {
    const text = profileToCsv({ ...helixProfile(a, b, 5), outliers: [3, 17] });
    expect(text).toContain("# outliers: 2 (input point indices from 0: 3 17)\n");
  });

  it("refuses a unit that is not a length, and inconsistent columns", () => {
    expect(() => profileToCsv(helixProfile(a, b, 5), { unit: "px" as LengthUnit })).toThrow(ParameterError);
    expect(() => profileToCsv(helixProfile(a, b, 5), { unit: "px" as LengthUnit })).toThrow(
      'profileToCsv: unit: must be one of "m", "um", "nm", "A" (got "px")',
    );
    const p = helixProfile(a, b, 5);
    expect(() => profileToCsv({ ...p, kappa: p.kappa.subarray(1) })).toThrow("profile column kappa has 4 entries, expected 5 (n = 5)");
  });

  it("writes an empty table for a profile of 0 samples", () => {
    const p = helixProfile(a, b, 2);
    const empty = new Float64Array(0);
    const { rows } = readCsv(profileToCsv({
      ...p, n: 0, s: empty, x: empty, y: empty, z: empty, T: empty, N: empty, B: empty, kappa: empty, kappaLo: empty,
      kappaHi: empty, tau: empty, tauLo: empty, tauHi: empty, flags: new Uint8Array(0),
    }));
    expect(rows).toEqual([]);
  });
});

describe("formatNumber(value) and jsonNumber(value)", () => {
  it("writes 12 significant digits in the shortest form", () => {
    expect(formatNumber(3e-10 * 1e10)).toBe("3");
    expect(formatNumber(0.1 + 0.2)).toBe("0.3");
    expect(formatNumber(1 / 3)).toBe("0.333333333333");
    expect(formatNumber(-2.5e-12)).toBe("-2.5e-12");
    expect(formatNumber(123456789.123456)).toBe("123456789.123");
    expect(formatNumber(NaN)).toBe("NaN");
    expect(formatNumber(-0)).toBe("0");
    expect(formatNumber(Infinity)).toBe("Infinity");
  });

  it("reads back to within half a unit in the 12th digit", () => {
    for (let k = -30; k <= 30; ++k) {
      const v = Math.PI * 10 ** k;
      expect(Math.abs(Number(formatNumber(v)) - v) / v).toBeLessThanOrEqual(5e-12);
    }
  });

  it("gives null for JSON where the value is not finite", () => {
    expect(jsonNumber(NaN)).toBeNull();
    expect(jsonNumber(-Infinity)).toBeNull();
    expect(jsonNumber(0.1 + 0.2)).toBe(0.3);
  });
});

describe("TOOL_VERSION", () => {
  it("equals the version in package.json", () => {
    const pkg = JSON.parse(readFileSync(new URL("../../package.json", import.meta.url), "utf8")) as { version: string; name: string };
    expect(TOOL_VERSION).toBe(pkg.version);
  });
});
