/**
 * Sparse helical traces (run by hand: `npx tsx bench/molecules.ts`): ideal helices through atom
 * positions with textbook geometries (from memory: alpha 2.3 A radius, 1.5 A rise, 100 deg per
 * residue; 3-10 1.9 A, 2.0 A, 120 deg; pi 2.8 A, 1.15 A, 87 deg; polyproline II 1.6 A, 3.1 A,
 * -120 deg (left-handed); DNA phosphates 8.9 A, 3.38 A, 36 deg), 20-30 atoms, Gaussian noise of
 * 0.05, 0.15 and 0.3 A, 20 seeds each. Prints the mean and worst relative error of the mean kappa
 * and tau over interior samples against R/(R^2+c^2) and c/(R^2+c^2). Invented data, seeded.
 */
import { fitProfile } from "../src/frame/profile.js";
import { normalStream } from "../test/support/rng.js";
// name, radius A, rise per residue A, twist per residue deg (negative: left-handed), n
const cases: [string, number, number, number, number][] = [
  ["alpha", 2.3, 1.5, 100, 25], ["alpha30", 2.3, 1.5, 100, 30], ["alpha20", 2.3, 1.5, 100, 20], ["3-10", 1.9, 2.0, 120, 24],
  ["pi", 2.8, 1.15, 87, 25], ["PPII", 1.6, 3.1, -120, 24], ["DNA-P", 8.9, 3.38, 36, 30],
];
for (const noise of [0.05, 0.15, 0.3]) {
  for (const [name, R, rise, twist, n] of cases) {
    const dphi = (twist * Math.PI) / 180, c = rise / dphi;
    const k0 = R / (R * R + c * c), t0 = c / (R * R + c * c);
    let ek = 0, et = 0, wk = 0, wt = 0; const trials = 20;
    for (let seed = 1; seed <= trials; seed++) {
      const g = normalStream(seed); const xyz = new Float64Array(3 * n);
      for (let i = 0; i < n; i++) { const t = i * dphi; xyz[3*i] = (R*Math.cos(t) + noise*g())*1e-10; xyz[3*i+1] = (R*Math.sin(t) + noise*g())*1e-10; xyz[3*i+2] = (c*t + noise*g())*1e-10; }
      const p = fitProfile({ xyz, dims: 3, source: { file: name, unit: "A" }, diagnostics: [] }, { bootstrap: 50 });
      let sk = 0, st = 0, m = 0, mt = 0;
      for (let j = 0; j < p.n; j++) { if (p.flags[j] & 4) continue; sk += p.kappa[j] * 1e-10; m++; if (!Number.isNaN(p.tau[j])) { st += p.tau[j] * 1e-10; mt++; } }
      if (m === 0) for (let j = 0; j < p.n; j++) { sk += p.kappa[j]*1e-10; m++; if (!Number.isNaN(p.tau[j])) { st += p.tau[j]*1e-10; mt++; } }
      const rk = Math.abs(sk / m / k0 - 1), rt = Math.abs(st / mt / t0 - 1);
      ek += rk; et += rt; wk = Math.max(wk, rk); wt = Math.max(wt, rt);
    }
    console.log(noise, name.padEnd(8), "kappa err mean", (ek/trials*100).toFixed(1) + "% max", (wk*100).toFixed(1) + "%", " tau err mean", (et/trials*100).toFixed(1) + "% max", (wt*100).toFixed(1) + "%");
  }
}
