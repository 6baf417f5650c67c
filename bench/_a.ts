import { readTraceFile } from "../src/import/readTrace.js";
import { analyzeTrace } from "../src/export/analyzeTrace.js";
import { parseMaterial } from "../src/physics/parseMaterial.js";
import { readFileSync } from "node:fs";
const t = await readTraceFile("fixtures/demo/afm/afm-coil.csv");
const a = analyzeTrace(t, { bootstrap: 200, seed: 1 });
console.log(a.profile.diagnostics);
for (const s of a.segments) console.log(s.kind, (s.s0*1e9).toFixed(0), (s.s1*1e9).toFixed(0), (s.kappa*1e-9).toFixed(5), (s.kappaLo*1e-9).toFixed(5), (s.kappaHi*1e-9).toFixed(5), (s.tau*1e-9).toFixed(5), (s.tauLo*1e-9).toFixed(5), (s.tauHi*1e-9).toFixed(5));
