/**
 * Kinked wires (run by hand: `npx tsx bench/kinks.ts [seeds]`, default 1-6). Planar arcs of radius
 * 500 nm (600 points, 2 nm apart) and 300 nm (300 points) and a helix of radius 100 nm and rise 20 nm per radian (600
 * points, 3.2 nm apart, 3 turns) with one kink in the middle (the arc turns by the kink angle more
 * at one point; the helix's second half is turned about the z axis through the joint), kink angles
 * 0 (none), 20, 45, 90 and 135 degrees, noise 0.05, 0.1, 0.2 and 0.3 of the point spacing. Prints per
 * case whether the kink was found (and where), and the median relative error of curvature (and
 * torsion) at the input rows more than 40 rows from the kink and not in the kinked fit's end zones,
 * against the same wire with no kink and the same noise at the same rows; then the fraction of
 * kinked cases within 1.5x of their unkinked twin or within 2% of the truth, and the worst.
 * Truth: kappa = 1/R on the arc, R/(R^2+c^2) and
 * c/(R^2+c^2) on the helix (do Carmo 1976, sec. 1-5). Invented data, seeded.
 */
import { fitProfile } from "../src/frame/profile.js";
import { FLAG_END, type Profile } from "../src/types.js";
import { kinkedArc, kinkedHelix } from "../test/support/kinkedWires.js";

const nm = 1e-9;
const seedArg = (process.argv[2] ?? "1-6").split("-").map(Number);
const seeds = Array.from({ length: (seedArg[1] ?? seedArg[0]) - seedArg[0] + 1 }, (_, i) => seedArg[0] + i);

const arc = (kinkDeg: number, noise: number, seed: number) => kinkedArc(500, 600, 300, kinkDeg, noise, seed);
const shortArc = (kinkDeg: number, noise: number, seed: number) => kinkedArc(300, 300, 150, kinkDeg, noise, seed);
const helix = kinkedHelix;

/** Input rows more than 40 rows from `row` outside the end zones of p. */
function farRows(p: Profile, row: number): Set<number> {
  const out = new Set<number>();
  for (let j = 0; j < p.n; ++j) if (!(p.flags[j] & FLAG_END) && Math.abs((p.inputRow?.[j] ?? NaN) - row) > 40) out.add(p.inputRow?.[j] ?? -1);
  return out;
}

/** Median relative error of kappa (and tau) at the given input rows. */
function errorsAt(p: Profile, rows: Set<number>, k0: number, t0: number): [number, number] {
  const ek: number[] = [], et: number[] = [];
  for (let j = 0; j < p.n; ++j) {
    if (!rows.has(p.inputRow?.[j] ?? -1)) continue;
    ek.push(Math.abs((p.kappa[j] * nm) / k0 - 1));
    if (t0 > 0 && Number.isFinite(p.tau[j])) et.push(Math.abs((p.tau[j] * nm) / t0 - 1));
  }
  const med = (v: number[]) => (v.length ? v.sort((a, b) => a - b)[v.length >> 1] : NaN);
  return [med(ek), med(et)];
}

const cases = [
  { name: "arc", make: arc, row: 301, step: 2, k0: 1 / 500, t0: 0 },
  { name: "short arc", make: shortArc, row: 151, step: 2, k0: 1 / 300, t0: 0 },
  { name: "helix", make: helix, row: 300, step: 3.2, k0: 100 / 10400, t0: 20 / 10400 },
];
let total = 0, within = 0, found = 0, refused = 0, worst = 0, worstCase = "";
console.log("case                          found      kappa err (no kink)   tau err (no kink)");
for (const c of cases) for (const rel of [0.05, 0.1, 0.2, 0.3]) for (const seed of seeds) {
  const noise = rel * c.step;
  const ref = fitProfile({ xyz: c.make(0, noise, seed), dims: 3, source: { file: c.name, unit: "nm" }, diagnostics: [] }, { bootstrap: 0, seed });
  for (const deg of [20, 45, 90, 135]) {
    let p: Profile;
    try {
      p = fitProfile({ xyz: c.make(deg, noise, seed), dims: 3, source: { file: c.name, unit: "nm" }, diagnostics: [] }, { bootstrap: 0, seed });
    } catch (err) {
      ++total; ++refused;
      console.log(`${`${c.name} ${deg} deg ${rel} step s${seed}`.padEnd(30)}refused: ${(err as Error).message}`);
      continue;
    }
    const rows = farRows(p, c.row);
    const [ek, et] = errorsAt(p, rows, c.k0, c.t0), [rk, rt] = errorsAt(ref, rows, c.k0, c.t0);
    const kink = p.diagnostics.find((d) => d.startsWith("kink"));
    const at = kink ? /at (?:point|row) (\d+) \((\d+) degrees\)/.exec(kink) : null;
    const ok = (e: number, r: number) => e <= Math.max(1.5 * r, 0.02);
    const pass = ok(ek, rk) && (c.t0 === 0 || ok(et, rt));
    const r = Math.max(ek / Math.max(rk, 0.02 / 1.5), c.t0 > 0 ? et / Math.max(rt, 0.02 / 1.5) : 0);
    ++total; if (kink) ++found; if (pass) ++within;
    if (r > worst) { worst = r; worstCase = `${c.name} ${deg} deg, noise ${rel} step, seed ${seed}`; }
    console.log(`${`${c.name} ${deg} deg ${rel} step s${seed}`.padEnd(30)}${(at ? `${at[1]} (${at[2]})` : "-").padEnd(11)}${ek.toFixed(3)} (${rk.toFixed(3)})`.padEnd(64) + (c.t0 > 0 ? `${et.toFixed(3)} (${rt.toFixed(3)})` : ""));
  }
}
console.log(`kinks found: ${found}/${total}; refused ${refused}; far-field error within 1.5x of the unkinked twin's or 2%: ${within}/${total}; worst ${worst.toFixed(2)}x the larger of the two (${worstCase})`);
