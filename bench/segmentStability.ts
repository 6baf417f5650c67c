/**
 * Benchmark (run by hand): stretch labels of the invented demo wires with and without bootstrap
 * bands, the primitive fits of each stretch and the named features.
 * `npx tsx bench/segmentStability.ts`
 */
import { readTraceFile } from "../src/import/readTrace.js";
import { fitProfile } from "../src/frame/profile.js";
import { samplePoints, segmentWire } from "../src/frame/segment.js";

const nm = (x: number) => (x * 1e9).toFixed(1);
for (const name of ["coil", "meander", "ring"]) {
  const trace = await readTraceFile(`fixtures/demo/${name}.csv`);
  for (const bootstrap of [0, 200]) {
    const p = fitProfile(trace, { bootstrap, keepSamples: true });
    const points = samplePoints(trace, p) ?? undefined;
    const { segments, features } = segmentWire(p, points !== undefined ? { points } : {});
    console.log(`${name} bootstrap ${bootstrap} ${p.closed ? "closed" : "open"} resolution ${nm(p.resolution)} nm noise ${nm(p.sigma)} nm`);
    for (const g of segments) {
      const sh = g.shape;
      console.log(`  ${g.kind.padEnd(9)} ${nm(g.s0)}-${nm(g.s1)} nm  kappa ${(g.kappa * 1e-9).toFixed(5)} [${(g.kappaLo * 1e-9).toFixed(5)}, ${(g.kappaHi * 1e-9).toFixed(5)}]/nm tau ${(g.tau * 1e-9).toFixed(5)}/nm` +
        (sh ? `  ${sh.primitive} R ${nm(sh.radius.value)} [${nm(sh.radius.lo)}, ${nm(sh.radius.hi)}] pitch ${nm(sh.pitch.value)} hand ${sh.handedness} rms ${nm(sh.rms)} ${sh.verdict}` : "") + (g.demoted ? ` DEMOTED: ${g.demoted}` : "") + (g.wholeRing ? " (whole ring)" : ""));
    }
    for (const f of features) console.log(`  feature ${f.kind} at ${nm(f.s)} nm [${nm(f.s0)}, ${nm(f.s1)}] within ${f.within}: ${f.note}`);
  }
}
