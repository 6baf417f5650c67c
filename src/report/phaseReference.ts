/**
 * Phase boundary of the infinite constant-(kappa, tau) stretch, reduced units (kappa l, tau l), for
 * the plain systems (no intrinsic anisotropy term), drawn as the boundary line of the report's phase map.
 *
 * Source: ../shared/PHYSICS.md section 4, table "Phase boundaries of the infinite helix" (the
 * project's own derivation, each value confirmed by two methods there); FM at tau = 0: 2/pi exactly;
 * AFM at tau = 0: the boundary meets kappa = 0. Computing the line live with physics/phaseBoundary
 * costs seconds per point, too slow for a report, so the table is used and
 * test/export/phaseReference.test.ts checks points of it against phaseBoundary.
 * Each row: [tau l, kappa_c l]. FM: periodic above kappa_c; AFM: periodic below.
 */
export const PHASE_BOUNDARY: Readonly<Record<"ferro" | "antiferro", readonly (readonly [number, number])[]>> = {
  ferro: [
    [0, 2 / Math.PI], [0.05, 0.64], [0.1, 0.648], [0.25, 0.708], [0.5, 0.902], [0.75, 1.18], [1, 1.5], [1.5, 2.17], [2, 2.86],
  ],
  antiferro: [
    [0, 0], [0.05, 0.0783], [0.1, 0.155], [0.25, 0.364], [0.5, 0.67], [0.75, 1.01], [0.9, 1.22], [1, 1.36], [1.5, 2.08], [2, 2.8],
  ],
};

/** kappa_c l at |tau l| by linear interpolation in the table; NaN beyond its last row. */
export function boundaryAt(order: "ferro" | "antiferro", tauAbs: number): number {
  const t = PHASE_BOUNDARY[order];
  if (!(tauAbs >= 0) || tauAbs > t[t.length - 1][0]) return NaN;
  for (let i = 0; i + 1 < t.length; ++i) {
    const [a, ka] = t[i], [b, kb] = t[i + 1];
    if (tauAbs <= b) return ka + ((tauAbs - a) / (b - a)) * (kb - ka);
  }
  return t[t.length - 1][1];
}
