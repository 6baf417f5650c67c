/**
 * The network page (`network.html`): a self-contained HTML view of a wire network after `analyze
 * --branches split`: the network drawn as an SVG projection on its plane of largest spread, each
 * branch coloured by curvature (grey and dashed inside junction zones, where the curvature is the
 * junction's), junctions and free ends marked; a table of branches (length, stretches, pinning
 * sites, curvature outside the zones) linked to each branch's own report.html; a table of
 * junctions (position, branches, angles). No script, no network access; every file string escaped.
 */
import { symEigen3 } from "../frame/symEigen3.js";
import type { WireNetwork } from "../import/network/types.js";
import { PER_METRE, type LengthUnit } from "../types.js";
import type { BranchView } from "./branchView.js";
import { CURVATURE_STOPS, curvatureColor, toHex } from "./colorScales.js";
import { escapeHtml } from "./escapeHtml.js";
import { sig } from "./formatQuantity.js";

/** One branch's row: its folder (relative link target), its view, or its error. */
export interface NetworkPageBranch {
  readonly folder: string;
  readonly view: BranchView | null;
  readonly error: string | null;
}

export interface NetworkPageOptions {
  readonly unit: LengthUnit;
  readonly title: string;
  readonly tool: string;
}

/** A 2D projection basis: the two principal axes of the points (largest spread first). */
function projection(points: number[][]): { c: number[]; u: number[]; v: number[] } {
  const n = points.length;
  const c = [0, 0, 0];
  for (const p of points) for (let k = 0; k < 3; k++) c[k] += p[k] / n;
  const m = new Float64Array(9);
  for (const p of points) for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) m[3 * a + b] += (p[a] - c[a]) * (p[b] - c[b]);
  const { vectors } = symEigen3(m);
  return { c, u: [vectors[6], vectors[7], vectors[8]], v: [vectors[3], vectors[4], vectors[5]] };
}

/** The network page's HTML. Pure. */
export function buildNetworkPage(net: WireNetwork, branches: readonly NetworkPageBranch[], options: NetworkPageOptions): string {
  const k = PER_METRE[options.unit];
  const u = escapeHtml(options.unit);
  const pts: number[][] = [];
  branches.forEach((b, i) => {
    if (b.view !== null) for (let j = 0; j < b.view.x.length; j++) pts.push([b.view.x[j], b.view.y[j], b.view.z[j]]);
    else {
      const t = net.branches[i].trace.xyz;
      for (let j = 0; j < t.length; j += 3) pts.push([t[j], t[j + 1], t[j + 2]]);
    }
  });
  for (const j of net.junctions) pts.push([...j.position]);
  const P = projection(pts.length > 0 ? pts : [[0, 0, 0]]);
  const proj = (p: readonly number[]) => {
    const d = [p[0] - P.c[0], p[1] - P.c[1], p[2] - P.c[2]];
    return [d[0] * P.u[0] + d[1] * P.u[1] + d[2] * P.u[2], d[0] * P.v[0] + d[1] * P.v[1] + d[2] * P.v[2]];
  };
  const flat = pts.map(proj);
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const [a, b] of flat) {
    x0 = Math.min(x0, a); x1 = Math.max(x1, a); y0 = Math.min(y0, b); y1 = Math.max(y1, b);
  }
  const W = 720, H = 480, pad = 30;
  const scale = Math.min((W - 2 * pad) / Math.max(x1 - x0, 1e-30), (H - 2 * pad) / Math.max(y1 - y0, 1e-30));
  const sx = (a: number) => (pad + (a - x0) * scale).toFixed(1), sy = (b: number) => (H - pad - (b - y0) * scale).toFixed(1);
  // curvature scale over every branch outside the zones
  const ks: number[] = [];
  for (const b of branches) if (b.view !== null) b.view.kappa.forEach((q, i) => { if (b.view?.zone[i] === 0 && Number.isFinite(q)) ks.push(q); });
  ks.sort((a, b) => a - b);
  const kMax = ks.length > 0 ? ks[Math.min(ks.length - 1, Math.floor(0.98 * (ks.length - 1)))] : 0;
  const svg: string[] = [];
  branches.forEach((b, i) => {
    const br = net.branches[i];
    if (b.view === null) {
      const t = br.trace.xyz;
      const d: string[] = [];
      for (let j = 0; j < t.length; j += 3) {
        const [a, c] = proj([t[j], t[j + 1], t[j + 2]]);
        d.push(`${j === 0 ? "M" : "L"}${sx(a)} ${sy(c)}`);
      }
      svg.push(`<path d="${d.join("")}" fill="none" stroke="#b5302c" stroke-width="3" stroke-dasharray="2 4"><title>branch ${br.id}: not analysed</title></path>`);
      return;
    }
    const v = b.view;
    for (let j = 1; j < v.x.length; j++) {
      const [a0, c0] = proj([v.x[j - 1], v.y[j - 1], v.z[j - 1]]), [a1, c1] = proj([v.x[j], v.y[j], v.z[j]]);
      const zone = v.zone[j] === 1 || v.zone[j - 1] === 1;
      const colour = zone ? "#9a9a9a" : toHex(curvatureColor(0.5 * (v.kappa[j] + v.kappa[j - 1]), 0, kMax));
      svg.push(`<line x1="${sx(a0)}" y1="${sy(c0)}" x2="${sx(a1)}" y2="${sy(c1)}" stroke="${colour}" stroke-width="5" stroke-linecap="round"${zone ? ' stroke-dasharray="3 3"' : ""}/>`);
    }
    const mid = Math.floor(v.x.length / 2);
    const [am, cm] = proj([v.x[mid], v.y[mid], v.z[mid]]);
    svg.push(`<a href="${escapeHtml(b.folder)}/report.html"><text x="${sx(am)}" y="${sy(cm)}" dy="-8" class="lab">B${br.id}</text></a>`);
  });
  for (const j of net.junctions) {
    const [a, c] = proj(j.position);
    svg.push(`<circle cx="${sx(a)}" cy="${sy(c)}" r="${Math.max(4, j.zoneRadius * scale).toFixed(1)}" fill="none" stroke="#555" stroke-dasharray="2 2"/>`);
    svg.push(`<circle cx="${sx(a)}" cy="${sy(c)}" r="4" fill="#222"><title>junction ${j.id}</title></circle><text x="${sx(a)}" y="${sy(c)}" dx="7" dy="14" class="lab">J${j.id}</text>`);
  }
  for (const e of net.ends) {
    const [a, c] = proj(e.position);
    svg.push(`<rect x="${(Number(sx(a)) - 3).toFixed(1)}" y="${(Number(sy(c)) - 3).toFixed(1)}" width="6" height="6" fill="#fff" stroke="#222"><title>free end ${e.id}</title></rect>`);
  }
  const legend = CURVATURE_STOPS.map((c, i) => `<stop offset="${(i / (CURVATURE_STOPS.length - 1)).toFixed(2)}" stop-color="${toHex(c)}"/>`).join("");
  const node = (t: { kind: string; id: number } | null) => (t === null ? "-" : `${t.kind === "junction" ? "J" : "E"}${t.id}`);
  const rows = branches.map((b, i) => {
    const br = net.branches[i];
    const link = `<a href="${escapeHtml(b.folder)}/report.html">${escapeHtml(b.folder)}</a>`;
    if (b.view === null) {
      return `<tr><td>B${br.id}</td><td>${node(br.from)} &rarr; ${node(br.to)}</td><td>${sig(br.length * k)}</td><td colspan="4" class="err">not analysed: ${escapeHtml(b.error ?? "unknown error")}</td><td>${escapeHtml(b.folder)}</td></tr>`;
    }
    const v = b.view;
    const pins = !v.hasModel ? "no material" : `${v.pinning.length}${v.pinning.some((p) => p.inZone) ? ` (${v.pinning.filter((p) => p.inZone).length} in a junction zone)` : ""}`;
    const deepest = v.pinning.length > 0 && v.pinning[0].depthKT !== null ? sig(v.pinning[0].depthKT) : "n/a";
    return `<tr><td>B${br.id}</td><td>${node(br.from)} &rarr; ${node(br.to)}${br.closed ? " (ring)" : ""}</td><td>${sig(v.length * k)}</td><td>${br.radius === null ? "n/a" : sig(br.radius * k)}</td>` +
      `<td>${sig(v.kappaMedian / k)}</td><td>${v.stretches}</td><td>${pins}; deepest ${deepest} k<sub>B</sub>T</td><td>${link}</td></tr>`;
  });
  const jrows = net.junctions.map((j) => {
    const angles = j.angles.map((a) => `B${a.between[0]}&ndash;B${a.between[1]}: ${sig(a.degrees)}&deg;`).join(", ");
    return `<tr><td>J${j.id}</td><td>(${j.position.map((v) => sig(v * k)).join(", ")})</td><td>${j.branches.map((b) => `B${b}`).join(", ")}</td><td>${angles}</td><td>${sig(j.zoneRadius * k)}</td><td>${sig(j.axisMiss * k)}</td></tr>`;
  });
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(options.title)}</title>
<style>
body{font:14px/1.4 system-ui,sans-serif;margin:1.5em;color:#222;max-width:1100px}
table{border-collapse:collapse;margin:0.5em 0 1.5em}td,th{border-bottom:1px solid #ddd;padding:3px 8px;text-align:left;vertical-align:top}
th{background:#f3f1ea}.lab{font-size:12px;fill:#222}.err{color:#b5302c}.note{color:#555;font-size:13px}svg{border:1px solid #ddd;background:#fff}
</style></head><body>
<h1>${escapeHtml(options.title)}</h1>
<p class="note">${escapeHtml(options.tool)}. A network of ${net.branches.length} branches, ${net.junctions.length} junctions, ${net.ends.length} free ends and ${net.cycles} independent ${net.cycles === 1 ? "cycle" : "cycles"}, from ${escapeHtml(net.source.file)}. Model estimates from the geometry, not measurements. Lengths in ${u}, curvature in 1/${u}.</p>
<h2>Network</h2>
<p class="note">Projection on the plane of largest spread. Colour: curvature (0 to ${sig(kMax / k)} 1/${u}); grey dashes: junction zones (dashed circles), where the curvature belongs to the junction, not to the wire. Squares: free ends. Click a branch label for its report.</p>
<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H + 40}" viewBox="0 0 ${W} ${H + 40}" role="img" aria-label="wire network, coloured by curvature">
${svg.join("\n")}
<defs><linearGradient id="kscale">${legend}</linearGradient></defs>
<rect x="${pad}" y="${H + 10}" width="200" height="10" fill="url(#kscale)"/><text x="${pad}" y="${H + 34}" class="lab">0</text><text x="${pad + 200}" y="${H + 34}" class="lab" text-anchor="end">${sig(kMax / k)} 1/${u}</text>
</svg>
<h2>Branches</h2>
<p class="note">Numbered longest first. Curvature: median outside the junction zones. Stretches and pinning sites: from each branch's own analysis (its report and model.json).</p>
<table><thead><tr><th>branch</th><th>from &rarr; to</th><th>length (${u})</th><th>tube radius (${u})</th><th>median curvature (1/${u})</th><th>stretches</th><th>pinning sites</th><th>report</th></tr></thead>
<tbody>
${rows.join("\n")}
</tbody></table>
<h2>Junctions</h2>
<p class="note">Position: where the branch axes meet (least squares); angles between the branches' tangents at the junction; the zone radius; the RMS miss of the axes.</p>
<table><thead><tr><th>junction</th><th>position (${u})</th><th>branches</th><th>angles</th><th>zone radius (${u})</th><th>axis miss (${u})</th></tr></thead>
<tbody>
${jrows.join("\n")}
</tbody></table>
${net.diagnostics.length > 0 ? `<h2>Notes</h2><ul>${net.diagnostics.map((d) => `<li>${escapeHtml(d)}</li>`).join("")}</ul>` : ""}
</body></html>
`;
}
