import { readTraceFile } from "../src/import/readTrace.js";
import { analyzeTrace } from "../src/export/analyzeTrace.js";
import { parseMaterial } from "../src/physics/parseMaterial.js";
import { readFileSync } from "node:fs";
for (const [f, m] of [["fixtures/demo/coil.csv", "fixtures/demo/material-invented-soft-ferro.json"], ["fixtures/demo/meander.csv", "fixtures/demo/material-invented-soft-ferro.json"], ["fixtures/demo/ring.csv", "fixtures/demo/material-invented-soft-ferro.json"], ["fixtures/demo/afm/afm-coil.csv", "fixtures/demo/afm/material-invented-afm.json"]]) {
  const t = await readTraceFile(f);
  let mat;
  try { mat = parseMaterial(JSON.parse(readFileSync(m, "utf8")), m); } catch (e) { console.log((e as Error).message); continue; }
  const a = analyzeTrace(t, { bootstrap: 200, seed: 1, material: mat });
  console.log(f, JSON.stringify(a.timings), a.segments.map((s) => s.kind).join(","));
}
