import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { InputError, ParameterError } from "../../src/errors.js";
import { buildTrace } from "../../src/import/buildTrace.js";
import { formatOfPath, readTraceFile } from "../../src/import/readTrace.js";
import { TRACE_READERS } from "../../src/import/traceReaders.js";
import type { TraceReader } from "../../src/import/types.js";

const dir = mkdtempSync(join(tmpdir(), "twistline-read-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const square = "0 0 0\n1 0 0\n1 1 0\n0 1 0\n";
const write = (name: string, text: string | Uint8Array): string => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};

async function rejection(p: Promise<unknown>): Promise<Error> {
  try {
    await p;
  } catch (e) {
    return e as Error;
  }
  throw new Error("expected a rejection");
}

describe("readTraceFile(path, options)", () => {
  it("picks the reader from the extension, case-insensitively", async () => {
    const t = await readTraceFile(write("a.XYZ", square), { unit: "um" });
    expect(t.xyz[3]).toBe(1e-6);
    const j = await readTraceFile(write("a.json", '{"unit":"A","points":[[0,0],[1,0],[1,1],[0,1]]}'));
    expect(j.source.unit).toBe("A");
    expect(j.source.file).toBe(join(dir, "a.json"));
  });

  it("uses the format option over the extension", async () => {
    const t = await readTraceFile(write("trace.dat", square), { format: "txt" });
    expect(t.xyz.length).toBe(12);
  });

  it("refuses an unknown extension, naming the file and the accepted ones", async () => {
    const p = write("trace.dat", square);
    const e = await rejection(readTraceFile(p));
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toBe(`${p}: format: unknown file extension ".dat" (accepted: .csv, .tsv, .txt, .xyz, .json, .stl, .obj, .ply, .svg; or name the format)`);
    const q = write("noext", square);
    expect((await rejection(readTraceFile(q))).message).toBe(
      `${q}: format: no file extension (accepted: .csv, .tsv, .txt, .xyz, .json, .stl, .obj, .ply, .svg; or name the format)`,
    );
  });

  it("refuses an unknown format name with a ParameterError", async () => {
    const e = await rejection(readTraceFile(write("b.csv", square), { format: "gltf" }));
    expect(e).toBeInstanceOf(ParameterError);
    expect(e.message).toBe('readTraceFile: format: must be one of csv, tsv, txt, xyz, json, stl, obj, ply, svg, cloud (got "gltf")');
  });

  it("reports a missing file, a directory and non-UTF-8 bytes as InputError", async () => {
    const missing = join(dir, "none.csv");
    expect((await rejection(readTraceFile(missing))).message).toBe(`${missing}: file: no such file`);
    const folder = join(dir, "folder.csv");
    mkdirSync(folder);
    expect((await rejection(readTraceFile(folder))).message).toBe(`${folder}: file: is a directory, not a file`);
    const binary = write("bin.csv", new Uint8Array([0x30, 0x20, 0xff, 0xfe, 0x0a]));
    expect((await rejection(readTraceFile(binary))).message).toBe(`${binary}: file: not UTF-8 text (a binary file, or the wrong format?)`);
  });

  it("reads standard input through io, sniffing JSON, and names it <stdin>", async () => {
    const bytes = (s: string) => async () => new TextEncoder().encode(s);
    const t = await readTraceFile("-", { io: { readStdin: bytes(square) } });
    expect(t.source.file).toBe("<stdin>");
    const j = await readTraceFile("-", { io: { readStdin: bytes(' {"unit":"um","points":[[0,0],[1,0],[1,1],[0,1]]}') } });
    expect(j.source.unit).toBe("um");
    const e = await rejection(readTraceFile("-", { io: { readStdin: bytes("0 0\n1 x\n") } }));
    expect(e.message).toBe('<stdin>:2: y: not a finite number: "x"');
    expect((await rejection(readTraceFile("-"))).message).toBe("<stdin>: file: standard input is not available here");
  });

  it("passes unit, pixel size and closure to the reader", async () => {
    const t = await readTraceFile(write("p.csv", square), { unit: "px", pixelSize: 5e-9, closed: true });
    expect(t.xyz[3]).toBe(5e-9);
    expect(t.closed).toBe(true);
  });

  it("accepts a format table with more readers, text or binary", async () => {
    const seen: number[] = [];
    const binary: TraceReader = {
      kind: "binary",
      extensions: [".bin"],
      parse(data, file, options) {
        seen.push(data.length);
        const values = Float64Array.from([0, 0, 0, 1, 0, 0, 1, 1, 0, 0, 1, 0]);
        return [buildTrace({ values, count: 4, dims: 3, declared: {} }, file, options)];
      },
    };
    const readers = new Map<string, TraceReader>([...TRACE_READERS, ["bin", binary]]);
    expect(formatOfPath("w.BIN", readers)).toBe("bin");
    const t = await readTraceFile(write("w.bin", new Uint8Array([1, 2, 3])), { readers, unit: "nm" });
    expect(seen).toEqual([3]);
    expect(t.xyz[3]).toBe(1e-9);
  });
});
