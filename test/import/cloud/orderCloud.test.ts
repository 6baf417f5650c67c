import { describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { orderCloud } from "../../../src/import/cloud/orderCloud.js";
import { parseCloudText } from "../../../src/import/cloud/parseCloudText.js";
import { readCloudPly, readCloudText } from "../../../src/import/cloud/readCloud.js";
import { mulberry32, normalStream } from "../../support/rng.js";
import { distancesToTruth } from "../../support/tubes.js";

// Invented test clouds, lengths in nm converted to m. Truth: the curve the points were drawn from.
const NM = 1e-9;
type Fn = (t: number) => [number, number, number];
const helix: Fn = (t) => [60 * Math.cos(4 * Math.PI * t), 60 * Math.sin(4 * Math.PI * t), 80 * t]; // 2 turns, length 765 nm
const ring: Fn = (t) => [100 * Math.cos(2 * Math.PI * t), 100 * Math.sin(2 * Math.PI * t), 20 * Math.sin(6 * Math.PI * t)];

function sample(f: Fn, n: number, closed: boolean, noise: number, seed: number): Float64Array {
  const g = normalStream(seed);
  const out = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) {
    const p = f(closed ? i / n : i / (n - 1));
    for (let c = 0; c < 3; c++) out[3 * i + c] = (p[c] + noise * g()) * NM;
  }
  return out;
}

function shuffle(xyz: Float64Array, seed: number): { xyz: Float64Array; perm: number[] } {
  const n = xyz.length / 3, rnd = mulberry32(seed);
  const perm = Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(rnd() * (i + 1));
    [perm[i], perm[j]] = [perm[j], perm[i]];
  }
  const out = new Float64Array(xyz.length);
  perm.forEach((p, i) => out.set(xyz.subarray(3 * p, 3 * p + 3), 3 * i));
  return { xyz: out, perm };
}

function truth(f: Fn, n: number): Float64Array {
  const out = new Float64Array(3 * (n + 1));
  for (let i = 0; i <= n; i++) out.set(f(i / n).map((v) => v * NM), 3 * i);
  return out;
}

/** Symmetric Hausdorff distance between two polylines (vertex-to-polyline both ways). */
function hausdorff(a: Float64Array, b: Float64Array): number {
  return Math.max(Math.max(...distancesToTruth(a, b).dist), Math.max(...distancesToTruth(b, a).dist));
}

describe("orderCloud(xyz, file, options)", () => {
  it("recovers the true order of a shuffled noise-free helix, up to reversal", () => {
    const { xyz, perm } = shuffle(sample(helix, 800, false, 0, 1), 2);
    const r = orderCloud(xyz, "h.xyz", { unit: "nm" });
    const rank = Array.from(r.order, (o) => perm[o]);
    const forward = rank[0] < rank[rank.length - 1];
    expect(rank).toEqual(Array.from({ length: 800 }, (_, i) => (forward ? i : 799 - i)));
    expect(r.closed).toBe(false);
    expect(r.outliers).toBe(0);
    expect(r.trace.dims).toBe(3);
    expect(r.trace.source).toEqual({ file: "h.xyz", unit: "nm" });
  });

  it("recovers a closed ring as closed, in cyclic order up to rotation and reversal", () => {
    const { xyz, perm } = shuffle(sample(ring, 600, true, 0, 1), 3);
    const r = orderCloud(xyz, "r.xyz", { unit: "nm" });
    expect(r.closed).toBe(true);
    const rank = Array.from(r.order, (o) => perm[o]);
    const step = (rank[1] - rank[0] + 600) % 600 === 1 ? 1 : -1;
    for (let i = 1; i < 600; i++) expect((rank[i] - rank[i - 1] + 600 * 2) % 600).toBe(step === 1 ? 1 : 599);
  });

  it("rejects gross outliers, counts them, and orders a noisy cloud close to the truth", () => {
    // noise sd 2 nm = 2.1 sample spacings; 10 gross outliers (1%) uniform in a 300 nm box
    const clean = sample(helix, 1000, false, 2, 4);
    const rnd = mulberry32(9);
    const withOut = new Float64Array(clean.length + 30);
    withOut.set(clean);
    for (let i = 0; i < 30; i++) withOut[clean.length + i] = (rnd() - 0.5) * 300 * NM;
    const { xyz, perm } = shuffle(withOut, 5);
    const r = orderCloud(xyz, "n.xyz", { unit: "nm" });
    expect(r.outliers).toBe(10);
    expect([...r.outlierIndices].map((i) => perm[i]).every((p) => p >= 1000)).toBe(true);
    expect(r.trace.diagnostics[0]).toMatch(/^left out 10 gross outliers \(\d+ isolated, 0 in small separate pieces, \d+ stray points off the curve\)$/);
    // the smoothed ordering path is within about one noise sd of the true curve, and covers it
    // (away from the ends, where the running-mean window shrinks to a single noisy point)
    const inner = truth(helix, 4000).subarray(3 * 80, 3 * 3921);
    const { dist, foot } = distancesToTruth(r.path, truth(helix, 4000));
    const pathToTruth = Math.max(...dist.filter((_, i) => foot[i] > 0.02 && foot[i] < 0.98));
    const truthToPath = Math.max(...distancesToTruth(inner, r.path).dist);
    expect(Math.max(pathToTruth, truthToPath) / NM).toBeLessThan(4); // measured 2.8 nm (noise sd 2 nm)
    // including the ends (one noisy point each): measured 7.3 nm, about 2 sd in 3D
    expect(hausdorff(r.path, truth(helix, 4000)) / NM).toBeLessThan(12);
    // the recovered order is the true order up to local swaps within the noise: rank jumps stay small
    const rank = Array.from(r.order, (o) => perm[o]);
    let maxJump = 0;
    for (let i = 1; i < rank.length; i++) maxJump = Math.max(maxJump, Math.abs(rank[i] - rank[i - 1]));
    expect(maxJump).toBeLessThan(25); // measured 12 (2 nm noise spans about 5 spacings either way)
    // a running mean of the ordered points (window 9) lies close to the truth too
    const n = r.trace.xyz.length / 3, sm = new Float64Array(3 * (n - 8));
    for (let i = 4; i < n - 4; i++) for (let c = 0; c < 3; c++) {
      let s = 0;
      for (let k = -4; k <= 4; k++) s += r.trace.xyz[3 * (i + k) + c];
      sm[3 * (i - 4) + c] = s / 9;
    }
    expect(Math.max(...distancesToTruth(sm, truth(helix, 4000)).dist) / NM).toBeLessThan(4); // measured 2.8 nm
  });

  it("gives the same order after a rotation and translation (rigid-motion invariance)", () => {
    const { xyz } = shuffle(sample(helix, 500, false, 1, 6), 7);
    const a = orderCloud(xyz, "a.xyz", { unit: "nm" });
    const c = Math.cos(1.1), s = Math.sin(1.1);
    const moved = new Float64Array(xyz.length);
    for (let i = 0; i < xyz.length; i += 3) {
      moved[i] = c * xyz[i] - s * xyz[i + 2] + 3e-6;
      moved[i + 1] = xyz[i + 1] - 2e-6;
      moved[i + 2] = s * xyz[i] + c * xyz[i + 2] + 1e-6;
    }
    const b = orderCloud(moved, "b.xyz", { unit: "nm" });
    const same = [...b.order].every((v, i) => v === a.order[i]) || [...b.order].every((v, i) => v === a.order[a.order.length - 1 - i]);
    expect(same).toBe(true);
  });

  it("refuses a branched or self-crossing cloud, naming where; with allowBranches it warns instead", () => {
    const pts: number[] = [];
    for (let i = 0; i <= 300; i++) pts.push((i - 150) * NM, 0, 0); // bar along x
    for (let i = 1; i <= 80; i++) pts.push(0, i * NM, 0); // a branch along y from the middle
    expect(() => orderCloud(Float64Array.from(pts), "t.xyz", { unit: "nm" })).toThrow(
      /^t\.xyz: points: the cloud crosses itself or branches near \(.*\) nm \(a side branch of \d+ points reaching [\d.]+ nm from the path\): the order along one wire is ambiguous there; trace the wire as an ordered polyline, or split it into its wires \(--branches split\)$/,
    );
    const r = orderCloud(Float64Array.from(pts), "t.xyz", { unit: "nm", allowBranches: true });
    expect(r.sideBranches).toHaveLength(1);
    const d = r.trace.diagnostics.find((x) => x.startsWith("long side branch"));
    expect(d).toMatch(/^long side branch of \d+ points reaching [\d.]+ nm from the curve near \(.*\) nm: a self-crossing or a branch; the ordering may be wrong there$/);
    expect(Math.hypot(r.sideBranches[0].x, r.sideBranches[0].y) / NM).toBeLessThan(90); // attached near the junction
  });

  it("fails clearly on too few points, non-finite values and a cloud in two pieces", () => {
    const err = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        expect(e).toBeInstanceOf(InputError);
        return (e as Error).message;
      }
      return "no error";
    };
    expect(err(() => orderCloud(new Float64Array(6), "f.xyz", { unit: "nm" }))).toBe("f.xyz: points: need at least 4, got 2");
    expect(err(() => orderCloud(Float64Array.from([0, 0, 0, 1, NaN, 0, 2, 0, 0, 3, 0, 0]), "f.xyz", { unit: "nm" }))).toBe("f.xyz: point 2: y: not a finite number (NaN)");
    const two = new Float64Array(3 * 400);
    for (let i = 0; i < 200; i++) {
      two.set([i * NM, 0, 0], 3 * i);
      two.set([i * NM, 5000 * NM, 0], 3 * (200 + i));
    }
    expect(err(() => orderCloud(two, "two.xyz", { unit: "nm" }))).toBe(
      "two.xyz: points: the cloud falls into 2 separate pieces of 200, 200 points (even with 40 neighbours per point): give one wire per file",
    );
  });
});

describe("parseCloudText(text, file, options) and the cloud readers", () => {
  it("reads xyz and csv text with a header, comments and units", () => {
    const { xyz, dims } = parseCloudText("x,y,z\n# a comment\n1,2,3\n4;5;6\n7 8 9 # end\n", "c.csv", { unit: "um" });
    expect([...xyz]).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9].map((v) => v / 1e6));
    expect(dims).toBe(3);
    expect(parseCloudText("1 2\n3 4\n", "c.xy", { unit: "nm" }).dims).toBe(2);
  });

  it("fails clearly on bad values, naming the line", () => {
    const err = (text: string) => {
      try {
        parseCloudText(text, "c.xyz", { unit: "nm" });
      } catch (e) {
        expect(e).toBeInstanceOf(InputError);
        return (e as Error).message;
      }
      return "no error";
    };
    expect(err("1 2 3\n4 5 1.2e\n")).toBe('c.xyz:2: z: not a finite number: "1.2e"');
    expect(err("1 2 3\n4 5 6 7\n")).toBe("c.xyz:2: point: expected 3 values like the first point, got 4");
    expect(err("# nothing\n")).toBe("c.xyz: points: none");
  });

  it("orders the points of an XYZ file and of a PLY vertex file into one trace", () => {
    const { xyz } = shuffle(sample(helix, 300, false, 0, 1), 8);
    const text = Array.from({ length: 300 }, (_, i) => `${xyz[3 * i] / NM} ${xyz[3 * i + 1] / NM} ${xyz[3 * i + 2] / NM}`).join("\n");
    const [a] = readCloudText(text, "c.xyz", { unit: "nm" });
    expect(a.xyz.length).toBe(900);
    const ply = `ply\nformat ascii 1.0\nelement vertex 300\nproperty double x\nproperty double y\nproperty double z\nend_header\n${text}\n`;
    const [b] = readCloudPly(ply, "c.ply", { unit: "nm" });
    for (let i = 0; i < 900; i++) expect(Math.abs(b.xyz[i] - a.xyz[i])).toBeLessThan(1e-20);
  });
});

describe("orderCloud on uneven density, repeats and runs of points", () => {
  // A point at parameter t of a straight 300 nm wire, drawn at random (accept-reject on the density).
  function unevenLine(n: number, sparse: number, seed: number): Float64Array {
    const rnd = mulberry32(seed), g = normalStream(seed + 1);
    const pts: number[] = [];
    while (pts.length < 3 * n) {
      const t = rnd();
      if (t > 0.5 && rnd() > sparse) continue;
      pts.push((300 * t + 0.3 * g()) * NM, 0.3 * g() * NM, 0.3 * g() * NM);
    }
    return shuffle(Float64Array.from(pts), seed + 2).xyz;
  }

  it("does not drop the sparse half of a wire as outliers: it names the density change", () => {
    // Truth by construction: all points lie on one 300 nm line (the sparse half included), so no
    // more than a few may be outliers; the fit would take the sparse stretch for gaps, so a
    // refusal naming the density change is the right answer (before: 143 points of the sparse
    // half dropped as outliers and a 157 nm curve returned).
    const xyz = unevenLine(1500, 0.1, 41);
    let message = "no error";
    try {
      const r = orderCloud(xyz, "line.xyz", { unit: "nm" });
      expect(r.outliers).toBeLessThan(15);
      expect(r.s[r.s.length - 1] - r.s[0]).toBeGreaterThan(290 * NM);
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      message = (e as Error).message;
    }
    expect(message).toMatch(/^line\.xyz: points: the point density changes along the wire: from \(.*\) nm to \(.*\) nm the points are [\d.]+x sparser/);
  });

  it("keeps a 2:1 density change (within the fit's gap limit) and gets the length", () => {
    // Truth: the 300 nm line (construction); the ordered curve spans it within 2%.
    const r = orderCloud(unevenLine(1500, 0.5, 43), "line.xyz", { unit: "nm" });
    expect(r.outliers).toBeLessThan(15);
    expect((r.s[r.s.length - 1] - r.s[0]) / NM).toBeGreaterThan(294);
  });

  it("merges exact repeats instead of ordering copies next to each other", () => {
    // Common practice: a repeated point adds no information to an unordered cloud.
    const base = shuffle(sample(helix, 500, false, 0.3, 45), 46).xyz;
    const xyz = new Float64Array(3 * 1500);
    for (let i = 0; i < 500; i++) for (let c = 0; c < 3; c++) xyz.set(base.subarray(3 * i, 3 * i + 3), 3 * (3 * i + c));
    const r = orderCloud(xyz, "dup.xyz", { unit: "nm" });
    expect(r.trace.xyz.length / 3).toBe(500);
    expect(r.trace.diagnostics[0]).toBe("merged 1000 exact repeats of points into their first copy (500 distinct points of 1500)");
    expect(new Set(r.order).size).toBe(500);
    for (const i of r.order) expect(i % 3).toBe(0); // the first copy of each point
    expect(Array.from(r.trace.rows ?? [])).toEqual(Array.from(r.order, (i) => i + 1));
  });

  it("refuses a long run of points apart from the rest instead of dropping it as outliers", () => {
    // Common practice: outliers are strays or clumps; 15 points spaced 1 nm along a line are a wire.
    const pts = Array.from(sample((t) => [300 * t, 0, 0], 400, false, 0.1, 47));
    for (let i = 0; i < 15; i++) pts.push(i * NM, 40 * NM, 0);
    expect(() => orderCloud(Float64Array.from(pts), "two.xyz", { unit: "nm" })).toThrow(
      /^two\.xyz: points: a run of 15 points from \(.*\) nm to \(.*\) nm lies apart from the rest of the cloud but continues along a line/,
    );
    // a clump of 15 points (no direction) is still left out
    const g = normalStream(48);
    const clump = Array.from(sample((t) => [300 * t, 0, 0], 400, false, 0.1, 47));
    for (let i = 0; i < 15; i++) clump.push((150 + g()) * NM, (40 + g()) * NM, g() * NM);
    expect(orderCloud(Float64Array.from(clump), "clump.xyz", { unit: "nm" }).outliers).toBe(15);
  });
});

describe("orderCloud on a branched cloud", () => {
  it("names the branch, not a density change, for a Y of three 100 nm legs", () => {
    // Common practice: a junction of three legs cannot be ordered as one wire; along the spanning
    // tree's longest path the third leg's points crowd the junction, which must not be read as a
    // change of density.
    for (let seed = 3; seed <= 6; seed++) {
      const pts: number[] = [];
      [0, 2.1, 4.2].forEach((a, k) => {
        const g = normalStream(60 + k + 10 * seed), u = mulberry32(70 + k + 10 * seed);
        for (let i = 0; i < 500; i++) {
          const t = 100 * u();
          pts.push((t * Math.cos(a) + 0.3 * g()) * NM, (t * Math.sin(a) + 0.3 * g()) * NM, 0.3 * g() * NM);
        }
      });
      expect(() => orderCloud(Float64Array.from(pts), "y.xyz", { unit: "nm" })).toThrow(/^y\.xyz: points: the cloud crosses itself or branches near/);
    }
  });
});

describe("orderCloud: strands side by side", () => {
  it("refuses two parallel strands 2 nm apart read as one cloud, naming their distance and where", () => {
    // Invented: two straight strands along x (0-200 nm, 800 points each) at y = 0 and y = 2 nm, noise sd
    // 0.4 nm per coordinate. Truth: two equal groups a apart have lateral variance a^2/4 above the noise's
    // (textbook moments), so the distance reported is about 2 nm.
    const g = normalStream(21), rnd = mulberry32(22);
    const xyz = new Float64Array(3 * 1600);
    for (let i = 0; i < 1600; i++) {
      const p = [200 * rnd(), i % 2 === 0 ? 0 : 2, 0];
      for (let c = 0; c < 3; c++) xyz[3 * i + c] = (p[c] + 0.4 * g()) * NM;
    }
    let message = "";
    try {
      orderCloud(shuffle(xyz, 23).xyz, "two.xyz", { unit: "nm" });
    } catch (e) {
      message = (e as Error).message;
    }
    expect(message).toMatch(/^two\.xyz: points: the cloud looks like two or more strands side by side, about (\S+) nm apart, from \([-\d., ]+\) nm to \([-\d., ]+\) nm \(across the path its points spread in one direction and split into two groups, in \d+ of 26 stretches of 60 points\): ordered as one wire they zigzag between the strands; give one wire per file, or a centre-line trace$/);
    const apart = Number(/about (\S+) nm apart/.exec(message)?.[1]);
    expect(apart).toBeGreaterThan(1.6);
    expect(apart).toBeLessThan(2.4);
  });

  it("keeps one wire with noise twice as large along z as across (a flat but single cross-section)", () => {
    // Invented: one straight wire, noise sd 0.4 nm in y and 0.8 nm in z: flat offsets, but one group
    // (kurtosis of a normal distribution 3, textbook).
    const g = normalStream(31), rnd = mulberry32(32);
    const xyz = new Float64Array(3 * 1600);
    for (let i = 0; i < 1600; i++) {
      xyz[3 * i] = 200 * rnd() * NM;
      xyz[3 * i + 1] = 0.4 * g() * NM;
      xyz[3 * i + 2] = 0.8 * g() * NM;
    }
    expect(orderCloud(xyz, "one.xyz", { unit: "nm" }).order.length).toBe(1600);
  });
});

describe("orderCloud: two strands in a plane, folds and ribbons", () => {
  // Invented: two straight strands along x (0-200 nm, 400 points each) dy nm apart (and dz nm in z),
  // noise sd per coordinate (none in z for a planar cloud), `even`: points evenly spaced along x.
  function strands(dy: number, dz: number, noise: number, even: boolean, seed: number): Float64Array {
    const g = normalStream(seed), rnd = mulberry32(seed + 1);
    const xyz = new Float64Array(3 * 800);
    for (let i = 0; i < 800; i++) {
      const k = i % 2, x = even ? (200 * Math.floor(i / 2)) / 399 : 200 * rnd();
      xyz[3 * i] = (x + noise * g()) * NM;
      xyz[3 * i + 1] = (k * dy + noise * g()) * NM;
      xyz[3 * i + 2] = dz === 0 ? 0 : (k * dz + noise * g()) * NM;
    }
    return shuffle(xyz, seed + 2).xyz;
  }
  const refusal = (xyz: Float64Array, file: string, options: { closed?: boolean } = {}): string => {
    try {
      orderCloud(xyz, file, { unit: "nm", ...options });
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      return (e as Error).message;
    }
    return "no error";
  };

  it("refuses planar strands 2 nm apart with 0.5 nm of noise (ordered as one 204 nm wire before), naming their distance", () => {
    // Truth: two equal normal groups a apart with sd s are bimodal when a > 2 s (textbook property of
    // an equal two-component normal mixture; from memory): 2 nm > 1 nm, so the offsets across the
    // path dip between the strands, whose distance is about 2 nm.
    const message = refusal(strands(2, 0, 0.5, false, 81), "two.csv");
    expect(message).toMatch(/^two\.csv: points: the cloud looks like two strands side by side, about (\S+) nm apart, from \([-\d., ]+\) nm to \([-\d., ]+\) nm \(across the path its points split into two groups, the density between them \d+% of the groups'\): ordered as one wire they zigzag between the strands; give one wire per file, or a centre-line trace$/);
    const apart = Number(/about (\S+) nm apart/.exec(message)?.[1]);
    expect(apart).toBeGreaterThan(1.4);
    expect(apart).toBeLessThan(2.6);
  });

  it("refuses planar strands read up one and back down the other (a closed 400 nm loop before), naming the fold and the step across", () => {
    // Truth by construction: the strands are 4 nm apart and each ends at x = 0 and x = 200 nm, so the
    // step across a turn joins points about 4 nm apart near x = 0 or x = 200 nm.
    for (const seed of [83, 85]) {
      const message = refusal(strands(4, 0, 0.15, true, seed), "two.csv");
      expect(message).toMatch(/^two\.csv: points: the ordered path runs back along itself from \([-\d., ]+\) nm to \([-\d., ]+\) nm \((\S+) nm with the other leg about (\S+) nm away, [\d.]+ median spacings\), turning back by one step of (\S+) nm between \(([-\d.]+), [-\d.]+, 0\) nm and \(([-\d.]+), [-\d.]+, 0\) nm with no points in the turn( \(the step that closes the curve\))?: two strands side by side, or (a hairpin bent back tighter than the points resolve|one open wire whose ends lie close together and were joined); the order along one wire is ambiguous; give one wire per file or a centre-line trace(, or declare the wire open)?$/);
      const m = /\((\S+) nm with the other leg about (\S+) nm away.*one step of (\S+) nm between \(([-\d.]+),/.exec(message) as RegExpExecArray;
      expect(Number(m[1])).toBeGreaterThan(150);
      expect(Math.abs(Number(m[2]) - 4)).toBeLessThan(0.4);
      expect(Math.abs(Number(m[3]) - 4)).toBeLessThan(1);
      expect(Math.min(Math.abs(Number(m[4])), Math.abs(Number(m[4]) - 200))).toBeLessThan(2);
      // declared open, the turn at the other end is still a step across with no points
      expect(refusal(strands(4, 0, 0.15, true, seed), "two.csv", { closed: false })).toMatch(/runs back along itself .* with no points in the turn: two strands side by side, or a hairpin bent back tighter than the points resolve;/);
    }
  });

  it("refuses the same fold in 3D (strands 4 nm apart in y and 2 nm in z)", () => {
    expect(refusal(strands(4, 2, 0.15, true, 83), "two.xyz")).toMatch(/^two\.xyz: points: the ordered path runs back along itself .* about 4\.\d+ nm away/);
  });

  it("refuses a real hairpin whose legs are 2 nm apart (4 spacings), naming both readings", () => {
    // Invented: legs 100 nm long at y = +-1 nm joined by a half circle of radius 1 nm, points every
    // 0.5 nm, noise 0.1 nm: a turn of 2 spacings' radius, not resolved (common practice: a curvature
    // radius must be well above the point spacing for a fit to follow it).
    const message = refusal(shuffle(hairpin(100, 1, 0.1, 87), 88).xyz, "pin.csv");
    expect(message).toMatch(/^pin\.csv: points: the ordered path runs back along itself from .* with the other leg about 2\.\d+ nm away, [\d.]+ median spacings\), turning back .*: two strands side by side, or (a hairpin bent back tighter than the points resolve|one open wire whose ends lie close together and were joined); the order along one wire is ambiguous;/);
  });

  it("keeps a wide hairpin (legs 20 nm apart, turn radius 20 spacings) and its length", () => {
    // Truth: the length of two 100 nm legs and a half circle of radius 10 nm, 200 + 10 pi nm.
    const r = orderCloud(shuffle(hairpin(100, 10, 0.1, 89), 90).xyz, "pin.csv", { unit: "nm" });
    expect(r.closed).toBe(false);
    expect(Math.abs((r.s[r.s.length - 1] - r.s[0]) / NM - (200 + 10 * Math.PI))).toBeLessThan(5);
  });

  it("keeps a ribbon of pixels 5 and 7 pixels wide, ordered along its centre", () => {
    // Invented: every pixel (1 nm) within 2 or 3 pixels of the line y = 0.6 x: offsets across it
    // uniform (kurtosis 1.8, textbook), the same as two noisy strands' (see the text of
    // planarStrandCheck); the order must follow x.
    for (const w of [2, 3]) {
      const pts: number[] = [];
      for (let x = -5; x <= 205; x++) {
        for (let y = -10; y <= 135; y++) {
          const d = Math.abs(y - 0.6 * x) / Math.hypot(1, 0.6), t = (x + 0.6 * y) / Math.hypot(1, 0.6);
          if (d <= w && t >= 0 && t <= 200) pts.push(x * NM, y * NM, 0);
        }
      }
      const xyz = shuffle(Float64Array.from(pts), 91).xyz;
      const r = orderCloud(xyz, "ribbon.csv", { unit: "nm" });
      expect(r.order.length).toBe(pts.length / 3);
      expect(r.closed).toBe(false);
      // away from the ends, the ordered points' parameter along the ribbon rises, going back by no more than its width
      const along = Array.from(r.order, (i) => (sign0(xyz, r.order) * (xyz[3 * i] + 0.6 * xyz[3 * i + 1])) / Math.hypot(1, 0.6) / NM);
      let back = 0;
      for (let j = 50; j < along.length; j++) {
        if (Math.abs(along[j]) < 20 || Math.abs(along[j]) > 180) continue;
        back = Math.max(back, Math.max(...along.slice(j - 50, j)) - along[j]);
      }
      expect(back).toBeLessThan(2 * w + 1);
    }
  });
});

/** +1 when the ordered points run towards larger x + 0.6 y, else -1. */
function sign0(xyz: Float64Array, order: Uint32Array): number {
  const a = order[0], b = order[order.length - 1];
  return Math.sign(xyz[3 * b] + 0.6 * xyz[3 * b + 1] - xyz[3 * a] - 0.6 * xyz[3 * a + 1]);
}

/** Points every 0.5 nm along a planar hairpin: legs `leg` nm long at y = +-rho joined by a half circle of radius rho (nm in, m out). */
function hairpin(leg: number, rho: number, noise: number, seed: number): Float64Array {
  const total = 2 * leg + Math.PI * rho, n = Math.round(total / 0.5), g = normalStream(seed);
  const out = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) {
    const s = (i * total) / (n - 1);
    const a = (s - leg) / rho;
    const p = s < leg ? [leg - s, rho] : s < leg + Math.PI * rho ? [-rho * Math.sin(a), rho * Math.cos(a)] : [s - leg - Math.PI * rho, -rho];
    out[3 * i] = (p[0] + noise * g()) * NM;
    out[3 * i + 1] = (p[1] + noise * g()) * NM;
  }
  return out;
}

describe("orderCloud: whether the ends close the curve", () => {
  // Invented planar clouds (nm in, m out): `n` points at even or random parameter along a curve, with
  // normal noise of sd `noise` in x and y, shuffled.
  function planar(f: (t: number) => [number, number], n: number, closed: boolean, noise: number, seed: number, random = false): { xyz: Float64Array; perm: number[] } {
    const g = normalStream(seed), u = mulberry32(seed + 3);
    const xyz = new Float64Array(3 * n);
    for (let i = 0; i < n; i++) {
      const p = f(random ? u() : closed ? i / n : i / (n - 1));
      xyz[3 * i] = (p[0] + noise * g()) * NM;
      xyz[3 * i + 1] = (p[1] + noise * g()) * NM;
    }
    return shuffle(xyz, 99);
  }
  // 3 turns from radius 20 to 56 nm (12 nm between turns), 712 nm long: its centre and outer end are
  // 36 nm apart, 5.06% of its length (from the construction), so a little noise brings them under
  // the 5% at which the ends may close the curve.
  const spiral = (t: number): [number, number] => {
    const a = 6 * Math.PI * t, r = 20 + 36 * t;
    return [r * Math.cos(a), r * Math.sin(a)];
  };
  /** Spearman rank correlation of the ordered points' true indices with their places in the order. */
  const rankCorrelation = (rank: number[]): number => {
    const n = rank.length;
    let d2 = 0;
    const sorted = [...rank].sort((a, b) => a - b);
    rank.forEach((v, i) => (d2 += (sorted.indexOf(v) - i) ** 2));
    return 1 - (6 * d2) / (n * (n * n - 1)); // textbook formula without ties
  };

  it("orders a coarse open spiral whose ends come within 5% of its length as open, from its centre to its outer end", () => {
    // These three clouds had been closed across the 35 nm between the spiral's ends, exit 0.
    for (const [noise, seed] of [[0.3, 1], [1, 1], [0.3, 2]]) {
      const { xyz, perm } = planar(spiral, 600, false, noise, seed);
      const r = orderCloud(xyz, "spiral.csv", { unit: "nm" });
      expect(r.closed).toBe(false);
      const rank = Array.from(r.order, (o) => perm[o]);
      expect(Math.abs(rankCorrelation(rank))).toBeGreaterThan(0.9999);
      // truth by construction: the ends are the points at t = 0 and t = 1, 36 nm apart
      expect(Math.min(rank[0], rank[599])).toBeLessThan(5);
      expect(Math.max(rank[0], rank[599])).toBeGreaterThan(594);
      // truth by construction: the turns at radius 32 and 44 nm cross the step between the ends
      const m = /another part of the wire passes between them, near \(([-\d.]+), ([-\d.e]+), 0\) nm, across the (3\d\.\d+) nm step that would join them; declare the wire closed to join them$/m.exec(r.trace.diagnostics.join("\n")) as RegExpExecArray;
      expect(m).not.toBeNull();
      const radius = Math.hypot(Number(m[1]), Number(m[2]));
      expect(Math.min(Math.abs(radius - 32), Math.abs(radius - 44))).toBeLessThan(3 * noise + 1);
    }
  });

  it("still orders a coarse 200-point open spiral with 1 nm of noise (refused as a fold before) as open", () => {
    const { xyz, perm } = planar(spiral, 200, false, 1, 3);
    const r = orderCloud(xyz, "spiral.csv", { unit: "nm" });
    expect(r.closed).toBe(false);
    expect(Math.abs(rankCorrelation(Array.from(r.order, (o) => perm[o])))).toBeGreaterThan(0.999);
  });

  it("orders a 100-point two-turn spiral (4 spacings between its ends) as open", () => {
    // Invented: radius 30 to 50 nm over 2 turns (503 nm, 5 nm spacing); its ends are 20 nm apart, 4% of its length.
    const two = (t: number): [number, number] => [(30 + 20 * t) * Math.cos(4 * Math.PI * t), (30 + 20 * t) * Math.sin(4 * Math.PI * t)];
    for (const seed of [1, 2]) {
      const { xyz, perm } = planar(two, 100, false, 0.3, seed);
      const r = orderCloud(xyz, "spiral.csv", { unit: "nm" });
      expect(r.closed).toBe(false);
      expect(Math.abs(rankCorrelation(Array.from(r.order, (o) => perm[o])))).toBeGreaterThan(0.999);
    }
  });

  it("keeps a spiral declared closed closed or refused, never silently open", () => {
    const { xyz } = planar(spiral, 600, false, 0.3, 1);
    try {
      expect(orderCloud(xyz, "spiral.csv", { unit: "nm", closed: true }).closed).toBe(true);
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
    }
  });

  it("still closes coarse rings: 100-300 points, noise-free and noisy, evenly and randomly sampled", () => {
    // Truth by construction: the points lie on one circle of radius 80 nm, a closed curve. (100 points
    // at random leave a widest spacing of about ln 100 + 0.58 = 5.2 mean spacings, about 5% of the length
    // (expected largest of n exponential spacings, textbook): those may be read open, as before.)
    const circle = (t: number): [number, number] => [80 * Math.cos(2 * Math.PI * t), 80 * Math.sin(2 * Math.PI * t)];
    for (const n of [100, 200, 300]) {
      for (const noise of [0, 1]) {
        for (const random of n === 100 ? [false] : [false, true]) {
          const r = orderCloud(planar(circle, n, true, noise, 7 + n, random).xyz, "ring.csv", { unit: "nm" });
          expect(r.closed, `n ${n} noise ${noise} random ${random}`).toBe(true);
        }
      }
    }
  });

  it("still closes a dense noisy tilted loop (3000 points, noise 2 nm across a 30 nm radius)", () => {
    const g = normalStream(11), xyz = new Float64Array(3 * 3000);
    for (let i = 0; i < 3000; i++) {
      const a = (2 * Math.PI * i) / 3000;
      [30 * Math.cos(a), 30 * Math.sin(a), 4 * Math.sin(a)].forEach((v, c) => (xyz[3 * i + c] = (v + 2 * g()) * NM));
    }
    expect(orderCloud(shuffle(xyz, 12).xyz, "loop.xyz", { unit: "nm" }).closed).toBe(true);
  });

  it("still closes a ring with a stretch of 6 points missing (a closing step 7 spacings wide, nothing else near it)", () => {
    // Invented: 200 even points on a circle of radius 80 nm with points 0-5 left out.
    const r0 = 80, n = 200, pts: number[] = [];
    for (let i = 6; i < n; i++) pts.push(r0 * Math.cos((2 * Math.PI * i) / n) * NM, r0 * Math.sin((2 * Math.PI * i) / n) * NM, 0);
    const r = orderCloud(shuffle(Float64Array.from(pts), 5).xyz, "ring.csv", { unit: "nm" });
    expect(r.closed).toBe(true);
    expect(r.order.length).toBe(n - 6);
    // declared open it stays open
    expect(orderCloud(shuffle(Float64Array.from(pts), 5).xyz, "ring.csv", { unit: "nm", closed: false }).closed).toBe(false);
  });
});
