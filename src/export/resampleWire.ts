import { ParameterError } from "../errors.js";
import type { Profile } from "../types.js";

/**
 * A wire resampled at (nearly) equal arc-length spacing: the sites of a chain for another solver.
 * Lengths in metres, kappa and tau in 1/m, frames interleaved 3 per site (unit vectors).
 */
export interface ResampledWire {
  readonly n: number;
  /** Actual spacing (m): the requested one adjusted so that the sites span the wire exactly. */
  readonly spacing: number;
  readonly closed: boolean;
  readonly s: Float64Array;
  /** Positions, interleaved x, y, z (m). */
  readonly xyz: Float64Array;
  readonly T: Float64Array;
  readonly N: Float64Array;
  readonly B: Float64Array;
  readonly kappa: Float64Array;
  readonly kappaLo: Float64Array;
  readonly kappaHi: Float64Array;
  /** NaN where either neighbouring profile sample has undefined torsion. */
  readonly tau: Float64Array;
  readonly tauLo: Float64Array;
  readonly tauHi: Float64Array;
  /** Flags of the nearer profile sample (bits of src/types.ts). */
  readonly flags: Uint8Array;
  /** For each site: the profile interval [index, index + 1] it lies in and the fraction in it. */
  readonly index: Int32Array;
  readonly frac: Float64Array;
}

/** Most sites a resampling may produce (guards against a spacing given in the wrong unit). */
export const MAX_SITES = 2_000_000;

/**
 * Resamples a fitted profile at arc-length spacing `spacing`.
 *
 * Method: sites at s0 + k h with h = span / round(span / spacing) (open wires include both ends;
 * closed ones cover [s0, s0 + length) and wrap). Positions by cubic Hermite interpolation between
 * the neighbouring profile samples with end slopes T ds (the fitted tangents; error O(ds^4) for a
 * smooth curve, see https://en.wikipedia.org/wiki/Cubic_Hermite_spline); kappa, tau and their
 * bands linearly; frames by linear blending of T and N, then Gram-Schmidt (T normalised, N made
 * orthogonal to T and normalised) and B = T x N. Where N flips between two samples (Frenet frame
 * at an inflection: N_i . N_(i+1) < 0) the nearer sample's N is used instead of the blend.
 *
 * Units: metres in and out. Degenerate input: a profile with one sample gives one site.
 * Cost: O(n + m) for n profile samples and m sites.
 * @throws {ParameterError} a spacing that is not a positive finite length, or that gives more than
 *   {@link MAX_SITES} sites.
 * @example resampleWire(profile, 1e-9).spacing // about 1e-9
 */
export function resampleWire(profile: Profile, spacing: number): ResampledWire {
  if (!(Number.isFinite(spacing) && spacing > 0)) throw new ParameterError("resampleWire", "spacing", `must be a positive length (got ${spacing})`);
  const n = profile.n;
  const ps = profile.s;
  const closed = profile.closed && n > 1;
  const s0 = ps[0];
  const span = closed ? profile.length : ps[n - 1] - s0;
  const intervals = span > 0 ? Math.max(1, Math.round(span / spacing)) : 0;
  if (intervals + 1 > MAX_SITES) {
    throw new ParameterError("resampleWire", "spacing", `gives ${intervals + 1} sites (more than ${MAX_SITES}); use a larger spacing`);
  }
  const m = n === 1 || span <= 0 ? 1 : closed ? intervals : intervals + 1;
  const h = m > 1 || closed ? span / intervals : 0;
  const out = {
    s: new Float64Array(m), xyz: new Float64Array(3 * m),
    T: new Float64Array(3 * m), N: new Float64Array(3 * m), B: new Float64Array(3 * m),
    kappa: new Float64Array(m), kappaLo: new Float64Array(m), kappaHi: new Float64Array(m),
    tau: new Float64Array(m), tauLo: new Float64Array(m), tauHi: new Float64Array(m),
    flags: new Uint8Array(m), index: new Int32Array(m), frac: new Float64Array(m),
  };
  const last = closed ? n - 1 : n - 2; // last interval index
  let i = 0;
  for (let k = 0; k < m; ++k) {
    const sk = k === m - 1 && !closed ? s0 + span : s0 + k * h;
    out.s[k] = sk;
    if (n === 1) {
      copySample(profile, 0, 0, 0, out, k);
      continue;
    }
    while (i < last && nextS(profile, i, closed) <= sk) ++i;
    const a = ps[i];
    const ds = nextS(profile, i, closed) - a;
    const t = ds > 0 ? Math.min(1, Math.max(0, (sk - a) / ds)) : 0;
    copySample(profile, i, closed && i === n - 1 ? 0 : i + 1, t, out, k, ds);
  }
  return { n: m, spacing: h, closed, ...out };
}

/** Arc length of the sample after i (for a closed wire the first sample comes back at s0 + length). */
function nextS(p: Profile, i: number, closed: boolean): number {
  return closed && i === p.n - 1 ? p.s[0] + p.length : p.s[i + 1];
}

type Columns = {
  s: Float64Array; xyz: Float64Array; T: Float64Array; N: Float64Array; B: Float64Array;
  kappa: Float64Array; kappaLo: Float64Array; kappaHi: Float64Array; tau: Float64Array; tauLo: Float64Array; tauHi: Float64Array;
  flags: Uint8Array; index: Int32Array; frac: Float64Array;
};

function copySample(p: Profile, i: number, j: number, t: number, out: Columns, k: number, ds = 0): void {
  out.index[k] = i;
  out.frac[k] = t;
  // cubic Hermite basis
  const t2 = t * t, t3 = t2 * t;
  const h00 = 2 * t3 - 3 * t2 + 1, h10 = t3 - 2 * t2 + t, h01 = -2 * t3 + 3 * t2, h11 = t3 - t2;
  const P = [p.x, p.y, p.z];
  for (let c = 0; c < 3; ++c) {
    out.xyz[3 * k + c] = h00 * P[c][i] + h10 * ds * p.T[3 * i + c] + h01 * P[c][j] + h11 * ds * p.T[3 * j + c];
  }
  const lerp = (a: Float64Array): number => (t === 0 ? a[i] : t === 1 ? a[j] : a[i] + t * (a[j] - a[i]));
  out.kappa[k] = lerp(p.kappa);
  out.kappaLo[k] = lerp(p.kappaLo);
  out.kappaHi[k] = lerp(p.kappaHi);
  out.tau[k] = lerp(p.tau);
  out.tauLo[k] = lerp(p.tauLo);
  out.tauHi[k] = lerp(p.tauHi);
  const near = t < 0.5 ? i : j;
  out.flags[k] = p.flags[near];
  // frame: blend, then Gram-Schmidt
  let tx = p.T[3 * i] + t * (p.T[3 * j] - p.T[3 * i]);
  let ty = p.T[3 * i + 1] + t * (p.T[3 * j + 1] - p.T[3 * i + 1]);
  let tz = p.T[3 * i + 2] + t * (p.T[3 * j + 2] - p.T[3 * i + 2]);
  let tn = Math.hypot(tx, ty, tz);
  if (!(tn > 1e-12)) { tx = p.T[3 * near]; ty = p.T[3 * near + 1]; tz = p.T[3 * near + 2]; tn = Math.hypot(tx, ty, tz) || 1; }
  tx /= tn; ty /= tn; tz /= tn;
  const dotN = p.N[3 * i] * p.N[3 * j] + p.N[3 * i + 1] * p.N[3 * j + 1] + p.N[3 * i + 2] * p.N[3 * j + 2];
  let nx: number, ny: number, nz: number;
  if (dotN > 0) {
    nx = p.N[3 * i] + t * (p.N[3 * j] - p.N[3 * i]);
    ny = p.N[3 * i + 1] + t * (p.N[3 * j + 1] - p.N[3 * i + 1]);
    nz = p.N[3 * i + 2] + t * (p.N[3 * j + 2] - p.N[3 * i + 2]);
  } else {
    nx = p.N[3 * near]; ny = p.N[3 * near + 1]; nz = p.N[3 * near + 2];
  }
  const d = nx * tx + ny * ty + nz * tz;
  nx -= d * tx; ny -= d * ty; nz -= d * tz;
  let nn = Math.hypot(nx, ny, nz);
  if (!(nn > 1e-9)) {
    // N parallel to T cannot come from a valid profile; pick any perpendicular so the output stays a frame
    const ax = Math.abs(tx) < 0.9 ? 1 : 0, ay = ax === 1 ? 0 : 1;
    nx = ay * tz; ny = -ax * tz; nz = ax * ty - ay * tx;
    nn = Math.hypot(nx, ny, nz);
  }
  nx /= nn; ny /= nn; nz /= nn;
  out.T[3 * k] = tx; out.T[3 * k + 1] = ty; out.T[3 * k + 2] = tz;
  out.N[3 * k] = nx; out.N[3 * k + 1] = ny; out.N[3 * k + 2] = nz;
  out.B[3 * k] = ty * nz - tz * ny;
  out.B[3 * k + 1] = tz * nx - tx * nz;
  out.B[3 * k + 2] = tx * ny - ty * nx;
}
