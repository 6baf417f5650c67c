/**
 * Synthetic Profiles for tests (invented geometry, not measurements): integrates the
 * Frenet-Serret equations T' = kappa N, N' = -kappa T + tau B, B' = -tau N for given analytic
 * kappa(s), tau(s) (each step an exact rotation about the Darboux vector at the midpoint), fills
 * bands and optional bootstrap-like replicates from a seeded normal stream.
 */
import { FLAG_TORSION_UNDEFINED, type Profile } from "../../src/types.js";
import { normalStream } from "./rng.js";

export interface ProfileSpec {
  readonly n: number;
  /** Total length (m). For a closed wire the samples cover [0, length) evenly. */
  readonly length: number;
  readonly kappa: (s: number) => number;
  readonly tau: (s: number) => number;
  readonly closed?: boolean;
  /** Half-width of the 95% band of kappa and tau (1/m), default 1% of max kappa (+ a floor). */
  readonly band?: number;
  /** Bootstrap-like replicates (replicate-wide offset within the band + small noise), default 0. */
  readonly replicates?: number;
  readonly seed?: number;
  /** Rigid motion applied to positions and frames: row-major rotation and a translation (m). */
  readonly rotation?: readonly number[];
  readonly translation?: readonly [number, number, number];
  /** Resolution length (m), default 5 samples. */
  readonly resolution?: number;
  /** Mark samples with kappa below this (1/m) as torsion-undefined (tau NaN). */
  readonly straightBelow?: number;
}

export function makeProfile(spec: ProfileSpec): Profile {
  const { n, length } = spec;
  const closed = spec.closed ?? false;
  const h = closed ? length / n : length / (n - 1);
  const s = new Float64Array(n), kappa = new Float64Array(n), tau = new Float64Array(n);
  for (let i = 0; i < n; ++i) {
    s[i] = i * h;
    kappa[i] = spec.kappa(s[i]);
    tau[i] = spec.tau(s[i]);
  }
  const T = new Float64Array(3 * n), N = new Float64Array(3 * n), B = new Float64Array(3 * n);
  const x = new Float64Array(n), y = new Float64Array(n), z = new Float64Array(n);
  let F = [1, 0, 0, 0, 1, 0, 0, 0, 1]; // columns T, N, B (row-major: F[3r + c])
  let px = 0, py = 0, pz = 0;
  for (let i = 0; i < n; ++i) {
    for (let r = 0; r < 3; ++r) {
      T[3 * i + r] = F[3 * r];
      N[3 * i + r] = F[3 * r + 1];
      B[3 * i + r] = F[3 * r + 2];
    }
    x[i] = px; y[i] = py; z[i] = pz;
    if (i + 1 === n) break;
    const km = spec.kappa(s[i] + h / 2), tm = spec.tau(s[i] + h / 2);
    const d = Math.hypot(km, tm);
    let R = [1, 0, 0, 0, 1, 0, 0, 0, 1];
    if (d > 0) {
      const ax = tm / d, ay = 0, az = km / d, ang = h * d;
      const sn = Math.sin(ang), c1 = 1 - Math.cos(ang);
      R = [
        1 - c1 * (ay * ay + az * az), -sn * az + c1 * ax * ay, sn * ay + c1 * ax * az,
        sn * az + c1 * ax * ay, 1 - c1 * (ax * ax + az * az), -sn * ax + c1 * ay * az,
        -sn * ay + c1 * ax * az, sn * ax + c1 * ay * az, 1 - c1 * (ax * ax + ay * ay),
      ];
    }
    const Fn = new Array<number>(9).fill(0);
    for (let r = 0; r < 3; ++r) for (let c = 0; c < 3; ++c) for (let k = 0; k < 3; ++k) Fn[3 * r + c] += F[3 * r + k] * R[3 * k + c];
    const tx = 0.5 * (F[0] + Fn[0]), ty = 0.5 * (F[3] + Fn[3]), tz = 0.5 * (F[6] + Fn[6]);
    px += h * tx; py += h * ty; pz += h * tz;
    F = Fn;
  }
  if (spec.rotation !== undefined || spec.translation !== undefined) {
    const Rm = spec.rotation ?? [1, 0, 0, 0, 1, 0, 0, 0, 1];
    const t = spec.translation ?? [0, 0, 0];
    const rot = (a: Float64Array) => {
      for (let i = 0; i < n; ++i) {
        const u = a[3 * i], v = a[3 * i + 1], w = a[3 * i + 2];
        for (let r = 0; r < 3; ++r) a[3 * i + r] = Rm[3 * r] * u + Rm[3 * r + 1] * v + Rm[3 * r + 2] * w;
      }
    };
    rot(T); rot(N); rot(B);
    for (let i = 0; i < n; ++i) {
      const u = x[i], v = y[i], w = z[i];
      x[i] = Rm[0] * u + Rm[1] * v + Rm[2] * w + t[0];
      y[i] = Rm[3] * u + Rm[4] * v + Rm[5] * w + t[1];
      z[i] = Rm[6] * u + Rm[7] * v + Rm[8] * w + t[2];
    }
  }
  let kMax = 0;
  for (let i = 0; i < n; ++i) kMax = Math.max(kMax, kappa[i]);
  const band = spec.band ?? 0.01 * kMax + 1e-9 * (1 / h);
  const flags = new Uint8Array(n);
  if (spec.straightBelow !== undefined) {
    for (let i = 0; i < n; ++i) if (kappa[i] < spec.straightBelow) { flags[i] |= FLAG_TORSION_UNDEFINED; tau[i] = NaN; }
  }
  const kappaLo = Float64Array.from(kappa, (k) => Math.max(0, k - band)), kappaHi = Float64Array.from(kappa, (k) => k + band);
  const tauLo = Float64Array.from(tau, (t) => t - band), tauHi = Float64Array.from(tau, (t) => t + band);
  const reps = spec.replicates ?? 0;
  let kappaSamples: Float64Array | undefined, tauSamples: Float64Array | undefined;
  if (reps > 0) {
    const g = normalStream(spec.seed ?? 7);
    kappaSamples = new Float64Array(reps * n);
    tauSamples = new Float64Array(reps * n);
    for (let r = 0; r < reps; ++r) {
      const ok = (band / 1.96) * g(), ot = (band / 1.96) * g();
      for (let i = 0; i < n; ++i) {
        kappaSamples[r * n + i] = Math.max(0, kappa[i] + ok + 0.1 * (band / 1.96) * g());
        tauSamples[r * n + i] = tau[i] + ot + 0.1 * (band / 1.96) * g();
      }
    }
  }
  const base: Profile = {
    n, s, x, y, z, T, N, B, kappa, kappaLo, kappaHi, tau, tauLo, tauHi, flags,
    length, closed, resolution: spec.resolution ?? 5 * h, sigma: 0, lambda: 0, lambdaTorsion: 0, segments: 0, edf: 0,
    replicates: reps, outliers: [], source: { file: "synthetic (invented)", unit: "m" },
    planarProjection: false, diagnostics: [],
  };
  return kappaSamples !== undefined && tauSamples !== undefined ? { ...base, kappaSamples, tauSamples } : base;
}

/** A rotation matrix (row-major) about a unit axis. */
export function rotationMatrix(ax: number, ay: number, az: number, angle: number): number[] {
  const d = Math.hypot(ax, ay, az);
  ax /= d; ay /= d; az /= d;
  const sn = Math.sin(angle), c1 = 1 - Math.cos(angle);
  return [
    1 - c1 * (ay * ay + az * az), -sn * az + c1 * ax * ay, sn * ay + c1 * ax * az,
    sn * az + c1 * ax * ay, 1 - c1 * (ax * ax + az * az), -sn * ax + c1 * ay * az,
    -sn * ay + c1 * ax * az, sn * ax + c1 * ay * az, 1 - c1 * (ax * ax + ay * ay),
  ];
}
