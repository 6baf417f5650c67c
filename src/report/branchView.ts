import { FLAG_JUNCTION_ZONE, type Profile } from "../types.js";
import type { PinningSite } from "../physics/types.js";

/** What the network page shows of one analysed branch: plain data (crosses from worker threads). SI units. */
export interface BranchView {
  /** Profile samples, at most `MAX_VIEW_POINTS`, in metres. */
  readonly x: number[];
  readonly y: number[];
  readonly z: number[];
  /** Curvature (1/m) and whether the sample is in a junction zone (1) at each of them. */
  readonly kappa: number[];
  readonly zone: number[];
  readonly length: number;
  /** Median curvature outside the junction zones (1/m; NaN when all of it is in a zone). */
  readonly kappaMedian: number;
  readonly stretches: number;
  /** Pinning sites (kind "site"), deepest first, with whether they fall in a junction zone. */
  readonly pinning: { readonly s: number; readonly depthKT: number | null; readonly inZone: boolean }[];
  /** null without a material. */
  readonly hasModel: boolean;
}

export const MAX_VIEW_POINTS = 400;

/** The view of one branch from its (flagged) profile, stretches and pinning sites. Pure. */
export function branchView(profile: Profile, stretches: number, pinning: readonly PinningSite[] | null): BranchView {
  const n = profile.n;
  const every = Math.max(1, Math.ceil(n / MAX_VIEW_POINTS));
  const x: number[] = [], y: number[] = [], z: number[] = [], kappa: number[] = [], zone: number[] = [];
  for (let i = 0; i < n; i += every) {
    x.push(profile.x[i]);
    y.push(profile.y[i]);
    z.push(profile.z[i]);
    kappa.push(profile.kappa[i]);
    zone.push((profile.flags[i] & FLAG_JUNCTION_ZONE) !== 0 ? 1 : 0);
  }
  const free: number[] = [];
  for (let i = 0; i < n; i++) if ((profile.flags[i] & FLAG_JUNCTION_ZONE) === 0 && Number.isFinite(profile.kappa[i])) free.push(profile.kappa[i]);
  free.sort((a, b) => a - b);
  const kappaMedian = free.length === 0 ? NaN : free.length % 2 ? free[(free.length - 1) >> 1] : 0.5 * (free[free.length / 2 - 1] + free[free.length / 2]);
  const inZoneAt = (s: number): boolean => {
    let best = 0;
    for (let i = 1; i < n; i++) if (Math.abs(profile.s[i] - s) < Math.abs(profile.s[best] - s)) best = i;
    return (profile.flags[best] & FLAG_JUNCTION_ZONE) !== 0;
  };
  return {
    x, y, z, kappa, zone,
    length: profile.length,
    kappaMedian,
    stretches,
    pinning: (pinning ?? []).filter((p) => p.kind === "site").map((p) => ({ s: p.s, depthKT: p.depthKT, inZone: inZoneAt(p.s) })),
    hasModel: pinning !== null,
  };
}
