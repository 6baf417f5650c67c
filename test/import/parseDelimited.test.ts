import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import { parseDelimited } from "../../src/import/parseDelimited.js";

/** The message of the InputError that `f` throws (fails the test when it throws nothing or something else). */
function errorOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return (e as InputError).message;
  }
  throw new Error("expected an InputError, got none");
}

const square = "0,0,0\n1,0,0\n1,1,0\n0,1,0\n";

describe("parseDelimited(text, file, options)", () => {
  it("reads x,y,z rows and converts nm to metres by dividing by exactly 1e9", () => {
    const t = parseDelimited("x,y,z\n1,2,3\n4,5,6\n7,8,10\n11,12,13\n", "w.csv");
    // 1 nm = 1e-9 m (SI prefix nano; BIPM SI Brochure, 9th ed., Table 7). Division by the exact
    // integer 1e9 is correctly rounded (IEEE 754), so it equals the literal; 3 * 1e-9 would not.
    expect(Array.from(t.xyz)).toEqual([1e-9, 2e-9, 3e-9, 4e-9, 5e-9, 6e-9, 7e-9, 8e-9, 10e-9, 11e-9, 12e-9, 13e-9]);
    expect(3 * 1e-9).not.toBe(3e-9); // why the rule exists: 3.0000000000000004e-9
    expect(t.dims).toBe(3);
    expect(t.source).toEqual({ file: "w.csv", unit: "nm" });
    expect(t.closed).toBeUndefined();
    expect(t.diagnostics).toEqual([]);
  });

  it("converts angstrom exactly: 3 A is 3 / 1e10 = 3e-10 m", () => {
    // 1 A = 1e-10 m (BIPM SI Brochure, 8th ed., Table 8, non-SI units; from memory).
    const t = parseDelimited("3 0 0\n0 3 0\n-3 0 0\n0 -3 7\n", "a.xyz", { unit: "A" });
    expect(t.xyz[0]).toBe(3 / 1e10);
    expect(t.xyz[0]).toBe(3e-10);
    expect(t.xyz[11]).toBe(7e-10);
    expect(7 * 1e-10).not.toBe(7e-10); // multiplying by 1e-10 is off by one ulp here
  });

  it("converts um and m, and px by the pixel size", () => {
    expect(parseDelimited(square, "a.csv", { unit: "um" }).xyz[3]).toBe(1e-6);
    expect(parseDelimited(square, "a.csv", { unit: "m" }).xyz[3]).toBe(1);
    const px = parseDelimited("2,0\n2,2\n0,2\n0,0\n", "img.csv", { unit: "px", pixelSize: 2.5e-9 });
    expect(px.xyz[0]).toBe(2 * 2.5e-9);
    expect(px.source).toEqual({ file: "img.csv", unit: "px", pixelSize: 2.5e-9 });
  });

  it("requires a pixel size for px and refuses one for other units", () => {
    expect(errorOf(() => parseDelimited(square, "img.csv", { unit: "px" }))).toBe(
      'img.csv: pixelSize: unit "px" needs a pixel size (metres per pixel)',
    );
    expect(errorOf(() => parseDelimited(square, "a.csv", { unit: "nm", pixelSize: 1e-9 }))).toBe(
      'a.csv: pixelSize: only applies to unit "px" (the unit is "nm")',
    );
  });

  it("reads two columns as dims 2 with z = 0", () => {
    const t = parseDelimited("x,y\n0,0\n1,0\n1,1\n0,1\n", "p.csv");
    expect(t.dims).toBe(2);
    expect(Array.from(t.xyz)).toEqual([0, 0, 0, 1e-9, 0, 0, 1e-9, 1e-9, 0, 0, 1e-9, 0]);
  });

  it("handles CRLF, lone CR, a byte-order mark, comments, blank lines and spaces around commas", () => {
    const crlf = "\ufeff# comment\r\n\r\nx, y, z\r\n 0 , 0 , 0 # trailing\r\n1,0,0\r\n\r\n1,1,0\r\n0,1,0\r\n";
    const t = parseDelimited(crlf, "c.csv");
    expect(t.xyz.length).toBe(12);
    expect(t.xyz[3]).toBe(1e-9);
    const cr = parseDelimited("x y z\r0 0 0\r1 0 0\r1 1 0\r0 1 0\r", "c.txt");
    expect(cr.xyz.length).toBe(12);
  });

  it("counts physical lines in messages, also with CRLF and comments", () => {
    const text = "# a\r\n# b\r\nx,y,z\r\n0,0,0\r\n\r\n1,0,1.2e\r\n";
    expect(errorOf(() => parseDelimited(text, "wire.csv"))).toBe('wire.csv:6: z: not a finite number: "1.2e"');
  });

  it("reads whitespace-separated rows with tabs and runs of spaces", () => {
    const t = parseDelimited("0\t0   0\n  1 0\t0\n1 1 0\n0 1 0\n", "w.tsv");
    expect(t.xyz.length).toBe(12);
    expect(t.xyz[3]).toBe(1e-9);
  });

  it("maps columns by header name in any order and reports the ignored ones", () => {
    const t = parseDelimited("id,Z,y,x,signal\n1,9,0,0,5\n2,9,0,1,5\n3,9,1,1,5\n4,9,1,0,5\n", "m.csv");
    expect(Array.from(t.xyz.subarray(0, 6))).toEqual([0, 0, 9e-9, 1e-9, 0, 9e-9]);
    expect(t.diagnostics).toEqual(['ignored columns "id", "signal" (not x, y or z)']);
  });

  it("takes the unit from header names: x_um, y (um), z[um]", () => {
    const t = parseDelimited('x_um,"y (um)",z[um]\n0,0,0\n1,0,0\n1,1,0\n0,1,0\n', "h.csv");
    expect(t.source.unit).toBe("um");
    expect(t.xyz[3]).toBe(1e-6);
  });

  it("takes the unit and closure from '# unit:' and '# closed:' comment lines", () => {
    const t = parseDelimited("# unit: A\n# closed: true\n" + square, "d.csv");
    expect(t.source.unit).toBe("A");
    expect(t.closed).toBe(true);
    expect(parseDelimited("# closed: true\n" + square, "d.csv", { closed: false }).closed).toBe(false);
  });

  it("refuses a declared unit that contradicts the caller's, naming the line", () => {
    expect(errorOf(() => parseDelimited("# made up\n# unit: um\n" + square, "d.csv", { unit: "nm" }))).toBe(
      'd.csv:2: unit: the file declares "um" but "nm" was asked for',
    );
    expect(errorOf(() => parseDelimited("x_nm,y_nm\n# unit: um\n0,0\n1,0\n1,1\n0,1\n", "d.csv"))).toBe(
      'd.csv:1: header: unit "nm" contradicts "um" declared on line 2',
    );
    expect(errorOf(() => parseDelimited("x_nm,y_um\n0,0\n", "d.csv"))).toBe('d.csv:1: header: columns "x_nm" and "y_um" disagree on the unit');
  });

  it("rejects bad values with file, line and field", () => {
    expect(errorOf(() => parseDelimited("0,0,0\n1,,0\n", "e.csv"))).toBe("e.csv:2: y: empty field");
    expect(errorOf(() => parseDelimited("0,0,0\n1,3nm,0\n", "e.csv"))).toBe('e.csv:2: y: not a finite number: "3nm"');
    expect(errorOf(() => parseDelimited("0,0,0\n1,Infinity,0\n", "e.csv"))).toBe('e.csv:2: y: not a finite number: "Infinity"');
    expect(errorOf(() => parseDelimited("0,0,0\n1,NaN,0\n", "e.csv"))).toBe('e.csv:2: y: not a finite number: "NaN"');
    expect(errorOf(() => parseDelimited("0 0 0\n0x10 0 0\n", "e.txt"))).toBe('e.txt:2: x: not a decimal number: "0x10"');
    expect(errorOf(() => parseDelimited("0 0 0\n1 2 3 4\n", "e.txt"))).toBe("e.txt:2: point: expected 3 values, got 4");
    expect(errorOf(() => parseDelimited("x,y,z,w\n0,0,0,1\n1,0,0\n", "e.csv"))).toBe(
      "e.csv:3: point: expected 4 values (one per column of the header on line 1), got 3",
    );
    expect(errorOf(() => parseDelimited("1 2 3 4\n", "e.txt"))).toBe(
      "e.txt:1: point: expected 2 or 3 values (x y [z]), got 4; a header line naming the x, y, z columns selects columns",
    );
  });

  it("rejects headers without x or y, and with a column named twice", () => {
    expect(errorOf(() => parseDelimited("x,z,t\n0,0,0\n", "h.csv"))).toBe('h.csv:1: header: no column named "y" (columns: x, z, t)');
    expect(errorOf(() => parseDelimited("x,y,x\n0,0,0\n", "h.csv"))).toBe("h.csv:1: header: two columns name x (columns 1 and 3)");
    expect(errorOf(() => parseDelimited("x (mm),y (mm)\n0,0\n", "h.csv"))).toBe(
      'h.csv:1: header: column "x (mm)": unknown unit "mm" (expected one of m, um, nm, A, px)',
    );
  });

  it("names the likely cause when x is missing: a unit suffix that is not a unit, a separator that is not one", () => {
    // Both had been refused as 'no column named "x"', naming neither the unit nor the separator.
    expect(errorOf(() => parseDelimited("x_mm,y_mm,z_mm\n0,0,0\n", "h.csv"))).toBe(
      'h.csv:1: header: no column named "x": column "x_mm" has the unknown unit "mm" (expected one of m, um, nm, A, px)',
    );
    expect(errorOf(() => parseDelimited("x;y;z\n0;0;0\n", "h.csv"))).toBe(
      'h.csv:1: header: no column named "x": the header is one column, "x;y;z"; ";" does not separate fields (use commas, tabs or spaces)',
    );
    // Other suffixed columns beside the axes are still ignored (x_err next to x).
    expect(parseDelimited("x,y,x_err\n0,0,1\n1,0,1\n2,1,1\n3,3,1\n", "h.csv").xyz.length).toBe(12);
  });

  it("reports a truncated last line as a wrong count or a bad number", () => {
    expect(errorOf(() => parseDelimited("0,0,0\n1,0,0\n1,1,0\n0,1", "t.csv"))).toBe("t.csv:4: point: expected 3 values, got 2");
    expect(errorOf(() => parseDelimited("0,0,0\n1,0,0\n1,1,0\n0,1,1e-", "t.csv"))).toBe('t.csv:4: z: not a finite number: "1e-"');
  });

  it("rejects empty files, comment-only files and bad declarations", () => {
    expect(errorOf(() => parseDelimited("", "e.csv"))).toBe("e.csv: points: no data rows (the file is empty or holds only comments)");
    expect(errorOf(() => parseDelimited("# only\n\n", "e.csv"))).toBe("e.csv: points: no data rows (the file is empty or holds only comments)");
    expect(errorOf(() => parseDelimited("x,y\n", "e.csv"))).toBe("e.csv: points: no data rows after the header on line 1");
    expect(errorOf(() => parseDelimited("# unit: mm\n" + square, "e.csv"))).toBe(
      'e.csv:1: unit: must be one of "m", "um", "nm", "A", "px" (got "mm")',
    );
    expect(errorOf(() => parseDelimited("# closed: maybe\n" + square, "e.csv"))).toBe('e.csv:1: closed: must be true or false (got "maybe")');
  });

  it("drops consecutive duplicate points and reports their lines", () => {
    const text = "x,y,z\n0,0,0\n1,0,0\n1,0,0\n1,0,0\n1,1,0\n0,1,0\n0,1,0\n0,2,0\n";
    const t = parseDelimited(text, "d.csv");
    expect(t.xyz.length / 3).toBe(5);
    expect(t.diagnostics).toEqual(["dropped 3 consecutive duplicate points (lines 4, 5, 8)"]);
  });

  it("drops points closer than 1e-9 of the median step, keeps those at 1e-6", () => {
    // steps of 1 nm; 1e-10 nm is 1e-10 of the median step, 1e-6 nm is 1e-6 of it
    const t = parseDelimited("0 0 0\n1 0 0\n1.0000000001 0 0\n2 0 0\n3 0 0\n3.000001 0 0\n4 0 0\n", "d.txt");
    expect(t.xyz.length / 3).toBe(6);
    expect(t.diagnostics).toEqual(["dropped 1 consecutive duplicate point (line 3)"]);
  });

  it("tells distinct points from duplicates at any scale (steps of 1e-200 and 1e200 in the file's unit)", () => {
    // Squared steps of 1e-200 underflow to 0 in floating point: every point looked a duplicate of the
    // first ("need at least 4 distinct points, got 1") and the last one a closing point.
    for (const f of [1e-200, 1e200]) {
      const text = [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 1], [0, 2, 1], [1, 2, 2]].map((p) => p.map((v) => v * f).join(",")).join("\n");
      const t = parseDelimited(text, "d.csv");
      expect(t.xyz.length / 3).toBe(6);
      expect(t.diagnostics).toEqual([]);
      expect(t.closed).toBeUndefined();
    }
  });

  it("lists at most 10 duplicate lines", () => {
    const rows = ["0 0", "1 0", ...Array.from({ length: 12 }, () => "1 0"), "1 1", "0 1"];
    const t = parseDelimited(rows.join("\n"), "d.txt");
    expect(t.diagnostics).toEqual(["dropped 12 consecutive duplicate points (lines 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, and 2 more)"]);
  });

  it("drops a last point that repeats the first and treats the trace as closed, unless told open", () => {
    const text = "0,0\n1,0\n1,1\n0,1\n-1,0\n0,0\n";
    const t = parseDelimited(text, "r.csv");
    expect(t.closed).toBe(true);
    expect(t.xyz.length / 3).toBe(5);
    expect(t.diagnostics).toEqual(["the last point (line 6) repeats the first: dropped it and treated the trace as closed"]);
    const open = parseDelimited(text, "r.csv", { closed: false });
    expect(open.closed).toBe(false);
    expect(open.xyz.length / 3).toBe(6);
    expect(parseDelimited(text, "r.csv", { closed: true }).diagnostics).toEqual(["dropped the last point (line 6), which repeats the first"]);
  });

  it("needs at least 4 distinct points", () => {
    expect(errorOf(() => parseDelimited("0 0\n1 0\n1 1\n", "s.txt"))).toBe("s.txt: points: need at least 4 distinct points, got 3");
    expect(errorOf(() => parseDelimited("0 0\n1 0\n1 0\n1 1\n1 1\n", "s.txt"))).toBe(
      "s.txt: points: need at least 4 distinct points, got 3 after dropping 2 duplicates",
    );
    expect(errorOf(() => parseDelimited("5 5\n5 5\n5 5\n5 5\n", "s.txt"))).toBe(
      "s.txt: points: need at least 4 distinct points, got 1 after dropping 3 duplicates",
    );
  });

  it("reads 100 000 rows with the same values Number() gives", () => {
    const n = 100_000;
    const cells: string[] = [];
    const rows: string[] = ["x,y,z"];
    for (let i = 0; i < n; ++i) {
      const r = [(i * 0.37).toFixed(4), (Math.sin(i) * 1e3).toPrecision(9), `${i}e-3`];
      cells.push(...r);
      rows.push(r.join(","));
    }
    const t = parseDelimited(rows.join("\n"), "big.csv", { unit: "m" });
    expect(t.xyz.length).toBe(3 * n);
    let mismatches = 0;
    for (let k = 0; k < 3 * n; ++k) if (t.xyz[k] !== Number(cells[k])) ++mismatches;
    expect(mismatches).toBe(0);
  });
});
