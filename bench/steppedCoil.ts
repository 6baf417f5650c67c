/**
 * A coil whose curvature and torsion step between constant stretches (run by hand:
 * `npx tsx bench/steppedCoil.ts [seeds]`, default 1-12): the invented antiferromagnetic demo coil
 * of fixtures/demo/afm/make.ts (stretches of kappa 0.015 / 0.03 / 0.015 1/nm and tau 0.025 / 0.010 /
 * 0.025 1/nm joined by tanh edges 15 nm wide, 641 points over 1260 nm, built by Frenet-Serret
 * integration) with fresh Gaussian noise of 0.3 and 1 nm per coordinate. Prints per case the
 * relative RMS curvature error of the automatic level against the truth kappa(s) of make.ts, at the
 * samples not flagged as end samples, its ratio to the best of 23 fixed quarter-decade levels
 * (same knots, the "oracle"), and the band coverage; then the fraction within 1.2x and the worst.
 * A wire of the trade's commonest kind (stretches of near-constant geometry) that the eight smooth
 * families of bench/families.ts do not hold: its edges are localised features on constant stretches.
 * Invented data, seeded.
 */
import { fitProfile } from "../src/frame/profile.js";
import { FLAG_END, type Profile } from "../src/types.js";
import { afmCoil, truth } from "../fixtures/demo/afm/make.js";
import { normalStream } from "../test/support/rng.js";

const seedArg = (process.argv[2] ?? "1-12").split("-").map(Number);
const seeds = Array.from({ length: (seedArg[1] ?? seedArg[0]) - seedArg[0] + 1 }, (_, i) => seedArg[0] + i);
// The noise-free points: the demo file's rows less the file's own noise stream (seed 404, 0.3 nm),
// up to the 4 decimals the file keeps (5e-5 nm).
const rows = afmCoil().split("\n").filter((l) => l && !l.startsWith("#") && !l.startsWith("x"));
const fileNoise = normalStream(404);
const clean = Float64Array.from(rows.flatMap((l) => l.split(",").map((v) => Number(v) - 0.3 * fileNoise())));

const out: number[] = [];
console.log("case                 kappa auto    best  ratio | cover");
for (const sigma of [0.3, 1]) {
  for (const seed of seeds) {
    const g = normalStream(1000 + seed);
    const xyz = Float64Array.from(clean, (v) => (v + sigma * g()) * 1e-9);
    const trace = () => ({ xyz, dims: 3 as const, source: { file: "stepped-coil", unit: "nm" as const }, diagnostics: [] });
    const auto = fitProfile(trace(), { bootstrap: 100, seed });
    const score = (p: Profile): [number, number] => {
      let e = 0, r = 0, c = 0, m = 0;
      for (let j = 0; j < p.n; ++j) {
        if (auto.flags[j] & FLAG_END) continue;
        const t = truth(p.s[j] * 1e9).kappa * 1e9;
        e += (p.kappa[j] - t) ** 2; r += t * t; ++m;
        if (p.kappaLo[j] <= t && t <= p.kappaHi[j]) ++c;
      }
      return [Math.sqrt(e / r), c / m];
    };
    const [ea, cover] = score(auto);
    let best = Infinity;
    for (let k = -10; k <= 12; ++k) {
      try { best = Math.min(best, score(fitProfile(trace(), { bootstrap: 0, lambda: auto.lambda * Math.pow(10, k / 4), segments: auto.segments }))[0]); } catch { /* a level the guard refuses */ }
    }
    out.push(ea / best);
    console.log(`${`${sigma} nm s${seed}`.padEnd(20)} ${(100 * ea).toFixed(2).padStart(6)}% ${(100 * best).toFixed(2).padStart(6)}% ${(ea / best).toFixed(2).padStart(6)} | ${cover.toFixed(2)}`);
  }
}
console.log(`kappa within 1.2x of the best level: ${out.filter((r) => r <= 1.2).length}/${out.length}; worst ${Math.max(...out).toFixed(2)}`);
