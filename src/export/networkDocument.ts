/** `network.json`: the graph of a wire network (junctions, free ends, branches) in an output unit. */
import type { WireNetwork } from "../import/network/types.js";
import { PER_METRE, type LengthUnit } from "../types.js";
import { jsonNumber } from "./formatNumber.js";
import { TOOL_NAME, TOOL_VERSION } from "./version.js";

/** The URN of the shipped schema (src/export/schemas/network.schema.json). */
export const NETWORK_SCHEMA_ID = "urn:twistline:schema:network:1";

/** Per-branch extras a caller may add (the analysis of each branch by `analyze`). */
export interface BranchExtras {
  /** File of the branch's centre line (or folder of its analysis), relative to the network.json. */
  readonly file: string;
  readonly [key: string]: unknown;
}

/**
 * The plain JSON value of a network: every length in `unit` (12 significant digits), angles in
 * degrees. `extras[k]` is merged into branch k + 1 (it must carry `file`). Pure.
 */
export function networkDocument(net: WireNetwork, unit: LengthUnit, extras: readonly BranchExtras[]): Record<string, unknown> {
  const k = PER_METRE[unit];
  const L = (v: number) => jsonNumber(v * k);
  const P = (p: readonly number[]) => [L(p[0]), L(p[1]), L(p[2])];
  const node = (t: { kind: "junction" | "end"; id: number } | null) => (t === null ? null : { kind: t.kind, id: t.id });
  return {
    $schema: NETWORK_SCHEMA_ID,
    format: "twistline-network",
    formatVersion: 1,
    tool: { name: TOOL_NAME, version: TOOL_VERSION },
    note: "Model estimates from the input's geometry, not measurements. Near junctions (within each junction's zoneRadius) the centre line and its curvature belong to the junction, not to the wires.",
    unit,
    source: { file: net.source.file, unit: net.source.unit, ...(net.source.pixelSize !== undefined ? { pixelSize: jsonNumber(net.source.pixelSize) } : {}) },
    order: "branches longest first; junctions and free ends numbered in the order the branches first meet them (each branch's start, then its end)",
    junctions: net.junctions.map((j) => ({
      id: j.id,
      position: P(j.position),
      branches: [...j.branches],
      tangents: j.tangents.map((t) => t.map((v) => jsonNumber(v))),
      angles: j.angles.map((a) => ({ between: [...a.between], degrees: jsonNumber(a.degrees) })),
      zoneRadius: L(j.zoneRadius),
      axisMiss: L(j.axisMiss),
    })),
    ends: net.ends.map((e) => ({ id: e.id, position: P(e.position), branch: e.branch })),
    branches: net.branches.map((b, i) => ({
      id: b.id,
      ...extras[i],
      from: node(b.from),
      to: node(b.to),
      length: L(b.length),
      closed: b.closed,
      radius: b.radius === null ? null : L(b.radius),
      junctionZone: { start: L(b.zoneStart), end: L(b.zoneEnd) },
      component: b.component,
    })),
    cycles: net.cycles,
    components: net.components,
    diagnostics: [...net.diagnostics],
  };
}

/** {@link networkDocument} as JSON text (two-space indent, final newline). */
export function networkToJson(net: WireNetwork, unit: LengthUnit, extras: readonly BranchExtras[]): string {
  return `${JSON.stringify(networkDocument(net, unit, extras), null, 2)}\n`;
}
