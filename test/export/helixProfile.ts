/**
 * A Profile built from closed forms (not from a fit), to test the writers against known numbers.
 * Helix r(t) = (a cos t, a sin t, b t): kappa = a / (a^2 + b^2), tau = b / (a^2 + b^2), arc length
 * s = t sqrt(a^2 + b^2), T = (-a sin t, a cos t, b) / w, N = (-cos t, -sin t, 0),
 * B = (b sin t, -b cos t, a) / w with w = sqrt(a^2 + b^2).
 * Source: https://en.wikipedia.org/wiki/Helix ("Arc length, curvature and torsion"); do Carmo,
 * Differential Geometry of Curves and Surfaces (1976), sec. 1-5, example 1 (from memory).
 */
import { FLAG_END, type Profile, type Source } from "../../src/types.js";

export function helixProfile(a: number, b: number, n: number, source: Source = { file: "helix.csv", unit: "nm" }): Profile {
  const w = Math.hypot(a, b);
  const kappa0 = a / (w * w), tau0 = b / (w * w);
  const col = () => new Float64Array(n);
  const s = col(), x = col(), y = col(), z = col();
  const T = new Float64Array(3 * n), N = new Float64Array(3 * n), B = new Float64Array(3 * n);
  const kappa = col().fill(kappa0), kappaLo = col().fill(0.9 * kappa0), kappaHi = col().fill(1.1 * kappa0);
  const tau = col().fill(tau0), tauLo = col().fill(0.8 * tau0), tauHi = col().fill(1.2 * tau0);
  const flags = new Uint8Array(n);
  for (let i = 0; i < n; ++i) {
    const t = (4 * Math.PI * i) / (n - 1);
    s[i] = t * w;
    x[i] = a * Math.cos(t);
    y[i] = a * Math.sin(t);
    z[i] = b * t;
    T.set([(-a * Math.sin(t)) / w, (a * Math.cos(t)) / w, b / w], 3 * i);
    N.set([-Math.cos(t), -Math.sin(t), 0], 3 * i);
    B.set([(b * Math.sin(t)) / w, (-b * Math.cos(t)) / w, a / w], 3 * i);
  }
  flags[0] = FLAG_END;
  flags[n - 1] = FLAG_END;
  return {
    n, s, x, y, z, T, N, B, kappa, kappaLo, kappaHi, tau, tauLo, tauHi, flags,
    length: s[n - 1], closed: false, resolution: 5e-9, sigma: 2.5e-10, lambda: 0.0123, lambdaTorsion: 0.5, segments: 40, edf: 17.5,
    replicates: 200, outliers: [], source, planarProjection: false, diagnostics: ["dropped 1 consecutive duplicate point (line 7)"],
    inputRow: Int32Array.from({ length: n }, (_, i) => (i < 6 ? i + 2 : i + 3)), droppedRows: [], downweightedRows: [],
  };
}

/** Rows of a CSV text (comment lines skipped) as a header and numeric rows. */
export function readCsv(text: string): { comments: string[]; header: string[]; rows: number[][] } {
  const lines = text.split("\n").filter((l) => l !== "");
  const comments = lines.filter((l) => l.startsWith("#"));
  const body = lines.filter((l) => !l.startsWith("#"));
  return { comments, header: body[0].split(","), rows: body.slice(1).map((l) => l.split(",").map(Number)) };
}
