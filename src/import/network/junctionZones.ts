import { FLAG_JUNCTION_ZONE, type Profile } from "../../types.js";
import type { NetworkBranch, WireNetwork } from "./types.js";

/** A junction zone as plain data (crosses to worker threads): a ball around a junction. Metres. */
export interface JunctionZone {
  readonly junction: number;
  readonly position: readonly [number, number, number];
  readonly radius: number;
}

/** The zones of the junctions at a branch's two ends (none for free ends and rings). */
export function zonesOfBranch(net: WireNetwork, branch: NetworkBranch): JunctionZone[] {
  const out: JunctionZone[] = [];
  for (const t of [branch.from, branch.to]) {
    if (t?.kind !== "junction" || out.some((z) => z.junction === t.id)) continue;
    const j = net.junctions[t.id - 1];
    out.push({ junction: j.id, position: j.position, radius: j.zoneRadius });
  }
  return out;
}

/**
 * The profile with {@link FLAG_JUNCTION_ZONE} set on every sample inside one of `zones`, and a
 * diagnostic saying how much of the wire that is. The fit itself is untouched: the flag only says
 * that the curvature and torsion there belong to the junction, not to the wire. Pure.
 */
export function markJunctionZones(profile: Profile, zones: readonly JunctionZone[]): Profile {
  if (zones.length === 0) return profile;
  const flags = Uint8Array.from(profile.flags);
  let count = 0;
  for (let i = 0; i < profile.n; i++) {
    for (const z of zones) {
      const d = Math.hypot(profile.x[i] - z.position[0], profile.y[i] - z.position[1], profile.z[i] - z.position[2]);
      if (d < z.radius) {
        flags[i] |= FLAG_JUNCTION_ZONE;
        count++;
        break;
      }
    }
  }
  const note = `${count} of ${profile.n} samples lie within the zone of junction ${zones.map((z) => z.junction).join(" or ")} (flag ${FLAG_JUNCTION_ZONE}): the curvature there is the junction's, not the wire's`;
  return { ...profile, flags, diagnostics: [...profile.diagnostics, note] };
}
