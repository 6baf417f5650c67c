/**
 * Model-stage equivalence check (run by hand): `npx tsx bench/modelCompare.ts save DIR` writes the
 * physics results of the four invented demo wires as JSON; `... compare DIR` recomputes them and
 * prints, per wire, the largest relative difference of every numeric field (and any differing
 * string, flag or label) plus the model-stage time. Used to show a speed change leaves the results alone.
 */
import { readFileSync, writeFileSync, mkdirSync } from "node:fs";
import { readTraceFile } from "../src/import/readTrace.js";
import { analyzeTrace } from "../src/export/analyzeTrace.js";
import { parseMaterial } from "../src/physics/parseMaterial.js";

const [mode, dir] = process.argv.slice(2);
if ((mode !== "save" && mode !== "compare") || dir === undefined) throw new Error("usage: modelCompare.ts save|compare DIR");
const wires: [string, string][] = [
  ["fixtures/demo/coil.csv", "fixtures/demo/material-invented-soft-ferro.json"],
  ["fixtures/demo/meander.csv", "fixtures/demo/material-invented-soft-ferro.json"],
  ["fixtures/demo/ring.csv", "fixtures/demo/material-invented-soft-ferro.json"],
  ["fixtures/demo/afm/afm-coil.csv", "fixtures/demo/afm/material-invented-afm.json"],
];
const plain = (x: unknown): unknown => {
  if (ArrayBuffer.isView(x)) return Array.from(x as unknown as ArrayLike<number>);
  if (Array.isArray(x)) return x.map(plain);
  if (x !== null && typeof x === "object") return Object.fromEntries(Object.entries(x).filter(([k]) => k !== "material").map(([k, v]) => [k, plain(v)]));
  return typeof x === "number" && !Number.isFinite(x) ? String(x) : x;
};
/** Largest relative difference per path (array indices collapsed to []). */
function diff(a: unknown, b: unknown, path: string, out: Map<string, number>, texts: string[]): void {
  const key = path.replace(/\[\d+\]/g, "[]");
  if (typeof a === "number" && typeof b === "number") {
    const d = a === b ? 0 : Math.abs(a - b) / Math.max(1e-300, Math.abs(a), Math.abs(b));
    out.set(key, Math.max(out.get(key) ?? 0, d));
  } else if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) texts.push(`${path}: length ${a.length} vs ${b.length}`);
    for (let i = 0; i < Math.min(a.length, b.length); ++i) diff(a[i], b[i], `${path}[${i}]`, out, texts);
  } else if (a !== null && b !== null && typeof a === "object" && typeof b === "object") {
    for (const k of new Set([...Object.keys(a), ...Object.keys(b)])) diff((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`, out, texts);
  } else if (a !== b) texts.push(`${path}: ${JSON.stringify(a)?.slice(0, 160)} vs ${JSON.stringify(b)?.slice(0, 160)}`);
}
mkdirSync(dir, { recursive: true });
for (const [f, m] of wires) {
  const t = await readTraceFile(f);
  const mat = parseMaterial(JSON.parse(readFileSync(m, "utf8")), m);
  const a = analyzeTrace(t, { bootstrap: 200, seed: 1, material: mat });
  const name = f.split("/").pop()!.replace(".csv", "");
  const model = JSON.parse(JSON.stringify(plain(a.model)));
  const file = `${dir}/${name}.json`;
  if (mode === "save") {
    writeFileSync(file, JSON.stringify(model));
    console.log(`${name}: model ${a.timings.model.toFixed(0)} ms, saved`);
    continue;
  }
  const ref = JSON.parse(readFileSync(file, "utf8"));
  const rel = new Map<string, number>(), texts: string[] = [];
  diff(ref, model, "", rel, texts);
  const worst = [...rel].filter(([, d]) => d > 0).sort((x, y) => y[1] - x[1]);
  console.log(`${name}: model ${a.timings.model.toFixed(0)} ms; ${worst.length === 0 && texts.length === 0 ? "identical" : `${worst.length} numeric fields differ, ${texts.length} other differences`}`);
  for (const [k, d] of worst.slice(0, 25)) console.log(`  ${k}: ${d.toExponential(2)}`);
  for (const x of texts.slice(0, 15)) console.log(`  ${x}`);
}
