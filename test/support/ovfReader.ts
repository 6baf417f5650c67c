/**
 * A small OVF 2.0 reader for tests, written from the format's description (header lines "# key: value"
 * between "# Begin: Header" and "# End: Header"; one data block "# Begin: Data Text" or
 * "# Begin: Data Binary 8" whose binary form is little-endian IEEE float64 opened by the check value
 * 123456789012345.0; x index fastest, then y, then z). Independent of src/export.
 */
export interface OvfFile {
  readonly header: Readonly<Record<string, string>>;
  readonly desc: readonly string[];
  readonly format: "text" | "binary8";
  readonly values: Float64Array;
}

export function readOvf(bytes: Uint8Array): OvfFile {
  const latin = Buffer.from(bytes).toString("latin1");
  if (!latin.startsWith("# OOMMF OVF 2.0\n")) throw new Error("not an OVF 2.0 file");
  const header: Record<string, string> = {};
  const desc: string[] = [];
  const lines = latin.split("\n");
  let pos = 0, inHeader = false;
  for (const line of lines) {
    pos += line.length + 1;
    if (line === "# Begin: Header") { inHeader = true; continue; }
    if (line === "# End: Header") { inHeader = false; continue; }
    if (line.startsWith("# Begin: Data")) break;
    const m = /^#\s*([A-Za-z]+):\s*(.*)$/.exec(line);
    if (inHeader && m !== null) {
      if (m[1].toLowerCase() === "desc") desc.push(m[2]);
      else header[m[1].toLowerCase()] = m[2];
    }
  }
  const dim = Number(header.valuedim);
  const count = Number(header.xnodes) * Number(header.ynodes) * Number(header.znodes) * dim;
  const begin = lines.find((l) => l.startsWith("# Begin: Data"));
  if (begin === "# Begin: Data Text") {
    const end = latin.indexOf("# End: Data Text", pos);
    const nums = latin.slice(pos, end).trim().split(/\s+/).map(Number);
    if (nums.length !== count) throw new Error(`expected ${count} values, got ${nums.length}`);
    return { header, desc, format: "text", values: Float64Array.from(nums) };
  }
  if (begin === "# Begin: Data Binary 8") {
    const view = new DataView(bytes.buffer, bytes.byteOffset + pos, 8 * (count + 1));
    if (view.getFloat64(0, true) !== 123456789012345.0) throw new Error("bad binary check value");
    const values = new Float64Array(count);
    for (let i = 0; i < count; ++i) values[i] = view.getFloat64(8 * (i + 1), true);
    const tail = latin.slice(pos + 8 * (count + 1));
    if (!tail.startsWith("\n# End: Data Binary 8\n")) throw new Error("data block not closed after the values");
    return { header, desc, format: "binary8", values };
  }
  throw new Error(`unknown data block ${begin}`);
}
