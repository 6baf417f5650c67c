import { basename } from "node:path";
import { quantile } from "d3-array";
import type { Analysis } from "../export/analyzeTrace.js";
import { brief } from "../export/brief.js";
import type { ModelDocument, SegmentEntry } from "../export/modelDocument.js";
import type { ResampledWire } from "../export/resampleWire.js";
import { reducedSystem } from "../physics/reducedSystem.js";
import { PER_METRE } from "../types.js";
import { curvatureColor, torsionColor } from "./colorScales.js";
import { escapeHtml, inlineScript, scriptJson } from "./escapeHtml.js";
import { KIND_STYLE } from "./kindStyle.js";
import { REPORT_CSS } from "./reportStyle.js";
import { categoryLegend, rampLegend } from "./svg/legend.js";
import { phaseMap, type PhasePoint } from "./svg/phaseMap.js";
import { LABELLED_SITES, pinningPlot } from "./svg/pinningPlot.js";
import { profilePlot, type ShadedStretch } from "./svg/profilePlot.js";

/** Input of {@link buildReport}. */
export interface ReportInput {
  readonly analysis: Analysis;
  /** The model.json document (lengths already in its `unit`). */
  readonly document: ModelDocument;
  /** The resampled wire (the 3D view draws it). */
  readonly chain: ResampledWire;
  /** The bundled viewer script (src/report/viewerScript.ts). */
  readonly viewerScript: string;
}

/** Most points handed to the 3D view. */
const MAX_VIEW_POINTS = 2500;
/** Most pinning sites listed in the table. */
const MAX_SITE_ROWS = 12;

/** State category code of a stretch (colorScales STATE_CATEGORIES). */
export function stretchCategory(g: SegmentEntry): number {
  if (g.homogeneousStability === null) return 0;
  if (g.uncertain === true) return 4;
  return g.homogeneousStability === "stable" ? 1 : g.homogeneousStability === "metastable" ? 2 : 3;
}

function b64(a: Float32Array | Uint8Array): string {
  return Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString("base64");
}

const num = (v: number | null | undefined, unit = ""): string => (v === null || v === undefined || !Number.isFinite(v) ? "n/a" : `${brief(v)}${unit ? ` ${unit}` : ""}`);
const band = (v: number | null, lo: number | null, hi: number | null): string =>
  v === null ? "n/a" : `${brief(v)}${lo !== null && hi !== null ? `<br><span class="small">[${brief(lo)}, ${brief(hi)}]</span>` : ""}`;

/**
 * The self-contained HTML report of one analysed wire: facts, the caution about model estimates and
 * their validity, warnings, kappa(s) and tau(s) with their 95% bands and the stretches shaded by
 * kind (SVG), the phase map and the pinning landscape (with a material), a 3D view of the wire
 * coloured by curvature, torsion or model state (three.js, inlined; no network), and the stretch
 * table. Every string that came from a file goes through escapeHtml; the data block through scriptJson.
 * Cost: O(n) plus the viewer script's size (about 0.5 MB).
 */
export function buildReport(input: ReportInput): string {
  const { analysis: a, document: doc, chain } = input;
  const unit = doc.unit;
  const k = PER_METRE[unit];
  const p = a.profile;
  const file = doc.source.file;
  const name = file === "<stdin>" ? file : basename(file);
  const hasModel = a.model !== null && a.material !== null;
  const segs = doc.segments;

  const stretches: ShadedStretch[] = segs.map((g) => ({ s0: g.s0, s1: g.s1, kind: g.kind, label: `${g.index + 1} ${KIND_STYLE[g.kind].letter}` }));
  const sU = Float64Array.from(p.s, (v) => v * k);
  const inv = (x: Float64Array) => Float64Array.from(x, (v) => v / k);
  const kappaPlot = profilePlot({
    id: "kappa-plot", title: "curvature along the wire with its 95% band", s: sU,
    value: inv(p.kappa), lo: inv(p.kappaLo), hi: inv(p.kappaHi),
    xLabel: `arc length s (${unit})`, yLabel: `curvature \u03ba (1/${unit})`, stretches, fromZero: true,
  });
  const tauPlot = profilePlot({
    id: "tau-plot", title: "torsion along the wire with its 95% band", s: sU,
    value: inv(p.tau), lo: inv(p.tauLo), hi: inv(p.tauHi),
    xLabel: `arc length s (${unit})`, yLabel: `torsion \u03c4 (1/${unit})`, stretches, zeroLine: true,
    fallbackSpan: 0.25 * ((quantile(p.kappa, 0.99) ?? 0) / k || 1),
  });

  // facts
  const facts: [string, string][] = [
    ["source file", escapeHtml(file)],
    ["input unit", escapeHtml(doc.source.unit)],
    ["length of the fitted centre line", num(doc.geometry.length, unit)],
    ["closed loop", doc.geometry.closed ? "yes" : "no"],
    ["profile samples", String(doc.geometry.samples)],
    ["noise (per coordinate, estimated)", num(doc.geometry.sigma, unit)],
    ["resolution length of the fit", num(doc.geometry.resolution, unit)],
    ["bootstrap", `${doc.geometry.replicates} replicates, seed ${doc.seed} (bands are 95% intervals)`],
  ];
  if (doc.material !== null) {
    const m = doc.material;
    facts.push(
      ["material", `${m.order === "ferro" ? "ferromagnet" : "antiferromagnet"}${m.file !== null ? ` (${escapeHtml(m.file)})` : ""}`],
      ["exchange A", num(m.exchange, "J/m")],
      ["anisotropy K", num(m.anisotropy, "J/m\u00b3")],
      ["magnetic length l", num(m.magneticLength, unit)],
      ["thickness / lattice spacing", `${num(m.thickness, unit)} / ${num(m.latticeSpacing, unit)}`],
      ["temperature", num(m.temperature, "K")],
    );
  } else {
    facts.push(["material", "none given: geometry only"]);
  }
  const counts = (["straight", "arc", "helix", "irregular"] as const).map((kind) => `${segs.filter((g) => g.kind === kind).length} ${kind}`).join(", ");
  facts.push(["stretches", `${segs.length} (${counts})`]);
  if (hasModel) {
    const meta = segs.filter((g) => g.homogeneousStability === "metastable").reduce((s, g) => s + g.length, 0);
    facts.push(["pinning sites", String(doc.pinning.length)], ["metastable length", num(meta, unit)]);
  }
  facts.push(["chain for solvers", `${doc.outputs.chain.sites} sites, spacing ${num(doc.outputs.chain.spacing, unit)} (${escapeHtml(doc.outputs.chain.spacingNote)})`]);
  facts.push(["tube mesh", `${escapeHtml(doc.outputs.mesh.file)}, radius ${num(doc.outputs.mesh.radius, unit)} (${escapeHtml(doc.outputs.mesh.radiusSource)})`]);

  // warnings
  const warningItems = [...doc.warnings, ...doc.geometry.diagnostics.map((d) => `fit: ${d}`)];
  const flagged = segs.filter((g) => g.flags.length > 0).length;
  if (flagged > 0) warningItems.push(`${flagged} of ${segs.length} stretches carry validity or uncertainty notes: see the stretch table`);

  // phase map and pinning
  let phaseSection: string;
  let pinningSection: string;
  if (hasModel && a.material !== null && a.model !== null) {
    const pts: PhasePoint[] = segs.map((g) => {
      const l = a.material!.magneticLength * k; // l in unit: kappa (1/unit) * l (unit) is reduced
      const r = (v: number | null): number => (v === null ? NaN : v * l);
      return {
        label: String(g.index + 1), kappa: r(g.kappa), kappaLo: r(g.kappaLo), kappaHi: r(g.kappaHi),
        tau: r(g.tau), tauLo: r(g.tauLo), tauHi: r(g.tauHi), category: stretchCategory(g),
      };
    });
    const system = reducedSystem(a.material);
    const ferro = a.material.order === "ferro";
    phaseSection = `<div class="twocol"><div>${phaseMap(system, pts, { intrinsic: a.material.intrinsic !== null })}</div><div>
<p>Each stretch is a marker at its mean reduced torsion \u03c4&#8201;l and curvature \u03ba&#8201;l (l = ${num(doc.material?.magneticLength ?? null, unit)}), with its 95% bars.
Shaded: the homogeneous state is linearly unstable there. Line: where the best periodic texture of an infinite helix and the homogeneous state have equal energy
(${ferro ? "periodic above it" : "periodic below it"}; from the project's reference table${a.material.intrinsic !== null ? ", plain system without the intrinsic term, which the stretch labels do include" : ""}).</p>
<p class="small">Straight and planar stretches are labelled with torsion 0; ${ferro ? "a closed ferromagnetic ring switches between vortex and onion states at \u03ba l \u2248 0.657 and an open arc turns periodic at 2/\u03c0, " : "any planar curve keeps the homogeneous state n = B, "}so the line applies to helical stretches.</p>
${categoryLegend([1, 2, 3, 4])}
<p class="small">Marker shapes: circle stable, triangle metastable, square unstable, diamond uncertain.</p></div></div>`;
    const land = a.model.landscape;
    if (land !== null && land.q.length > 0) {
      const plot = pinningPlot({
        q: Float64Array.from(land.q, (v) => v * k), energy: land.energy, firstOrder: land.firstOrder,
        sites: doc.pinning.map((s) => ({ rank: s.rank, s: s.s })), stretches,
        xLabel: `wall position s (${unit})`, sMin: sU[0] ?? 0, sMax: p.closed ? p.length * k : sU[sU.length - 1] ?? 1,
      });
      const rows = doc.pinning.slice(0, MAX_SITE_ROWS).map((s) =>
        `<tr><td class="num">${s.rank}</td><td class="num">${num(s.s)}</td><td class="num">${num(s.depthJ)}</td><td class="num">${num(s.depthKT)}</td><td class="num">${num(s.depthReduced)}</td></tr>`).join("");
      pinningSection = `${plot}
<p class="small">Wall energy of a ${ferro ? "head-to-head wall" : "wall"} held at each position along the relaxed texture (solid)${land.firstOrder.some((v) => Number.isFinite(v)) ? ", first-order estimate from the curvature (dashed)" : ""}. Numbers: the deepest ${Math.min(LABELLED_SITES, doc.pinning.length)} sites by rank. Method: ${escapeHtml(land.method)}.</p>
${doc.pinning.length > 0 ? `<table><thead><tr><th class="num">rank</th><th class="num">s (${unit})</th><th class="num">depth (J)</th><th class="num">depth (k<sub>B</sub>T at ${num(doc.material?.temperature ?? null, "K")})</th><th class="num">depth (K l area)</th></tr></thead><tbody>${rows}</tbody></table>${doc.pinning.length > MAX_SITE_ROWS ? `<p class="small">${doc.pinning.length - MAX_SITE_ROWS} more sites in model.json.</p>` : ""}` : "<p>No pinning sites found: the landscape has no local minimum deeper than its noise floor.</p>"}`;
    } else {
      pinningSection = "<p>No pinning landscape was computed for this wire.</p>";
    }
  } else {
    const what = "Give a material (<code>--material material.json</code> with the order and exchange and anisotropy, or the magnetic length) to add";
    phaseSection = `<p>${what} the phase map: each stretch placed at its reduced curvature and torsion against the boundary of the periodic state and the stability line.</p>`;
    pinningSection = `<p>${what} the domain-wall pinning landscape and the ranked pinning sites.</p>`;
  }

  // 3D view data
  const stride = Math.max(1, Math.ceil(chain.n / MAX_VIEW_POINTS));
  const count = Math.ceil(chain.n / stride);
  const off = doc.outputs.mesh.offset;
  const pos = new Float32Array(3 * count), kap = new Float32Array(count), tau = new Float32Array(count), state = new Uint8Array(count);
  const cats = segs.map(stretchCategory);
  let si = 0;
  for (let c = 0; c < count; ++c) {
    const i = Math.min(chain.n - 1, c * stride);
    for (let d = 0; d < 3; ++d) pos[3 * c + d] = chain.xyz[3 * i + d] * k - off[d];
    kap[c] = chain.kappa[i] / k;
    tau[c] = chain.tau[i] / k;
    const s = chain.s[i] * k;
    while (si + 1 < segs.length && s >= segs[si].s1) ++si;
    state[c] = cats[si] ?? 0;
  }
  // curvature colours span the 1st to 99th percentile (a near-constant curvature would otherwise be one colour)
  const kappaMax = quantile(kap, 0.99) ?? 0;
  const kappaMinQ = quantile(kap, 0.01) ?? 0;
  const tauMaxAbs = quantile(tau, 0.99, Math.abs) ?? 0;
  const radius = doc.outputs.mesh.radius;
  const viewData = {
    unit, closed: chain.closed, radius, points: b64(pos), kappa: b64(kap), tau: b64(tau), state: b64(state),
    kappaMin: kappaMinQ < kappaMax ? kappaMinQ : 0, kappaMax: kappaMax > 0 ? kappaMax : 1, tauMaxAbs: tauMaxAbs > 0 ? tauMaxAbs : 1,
  };
  const legends = `<div class="legends" id="view3d-legends" data-mode="kappa">
<div data-for="kappa">${rampLegend((v) => curvatureColor(v, viewData.kappaMin, viewData.kappaMax), viewData.kappaMin, viewData.kappaMax, `curvature \u03ba (1/${unit}); the scale spans the 1st to 99th percentile`)}</div>
<div data-for="tau">${rampLegend((v) => torsionColor(v, viewData.tauMaxAbs), -viewData.tauMaxAbs, viewData.tauMaxAbs, `torsion \u03c4 (1/${unit}); left-handed < 0 < right-handed`, "undefined")}</div>
<div data-for="state">${categoryLegend(hasModel ? [...new Set(cats)].sort() : [0])}</div>
</div>`;

  const cols = hasModel ? 9 : 6;
  // the stretch's primitive (orthogonal least-squares refit of its input points)
  const shapeCell = (g: (typeof segs)[number]): string => {
    const sh = g.shape;
    if (sh === null) return "\u2013";
    const hand = sh.handedness > 0 ? "right-handed" : sh.handedness < 0 ? "left-handed" : "";
    const r = `R ${band(sh.radius.value, sh.radius.lo, sh.radius.hi)}`;
    const text = sh.primitive === "line" ? "line"
      : sh.primitive === "circle" ? `circle, ${r}`
      : `helix, ${r}<br>pitch ${band(sh.pitch.value, sh.pitch.lo, sh.pitch.hi)}, ${hand}`;
    return `${text}${sh.verdict === "confirmed" ? "" : `<br><span class="small">${escapeHtml(sh.verdict)}</span>`}`;
  };
  const tableRows = segs.map((g) => {
    const st = g.state === null ? "n/a"
      : g.state === "homogeneous" ? `homogeneous (${g.homogeneousStability})` : `periodic (homogeneous ${g.homogeneousStability})`;
    const probs = g.probabilities === null ? "" : `<br><span class="small">p(periodic) ${num(g.probabilities.periodic)}${g.uncertain ? ", uncertain" : ""}</span>`;
    const main = `<tr class="stretch"><td class="num">${g.index + 1}</td><td>${escapeHtml(g.kind)}</td><td class="num">${num(g.s0)}\u2013${num(g.s1)}</td>` +
      `<td class="num">${band(g.kappa, g.kappaLo, g.kappaHi)}</td><td class="num">${band(g.tau, g.tauLo, g.tauHi)}</td><td class="num">${shapeCell(g)}</td>` +
      (hasModel ? `<td class="num">${num(g.kappaReduced)}<br>${num(g.tauReduced)}</td><td>${escapeHtml(st)}${probs}</td><td class="num">${num(g.tiltDeg)}<br>${num(g.dmi)}</td>` : "") + "</tr>";
    const noteLines = [...(g.demoted !== null ? [`demoted to irregular: ${g.demoted}`] : []), ...(g.wholeRing ? ["the whole closed wire, no seam"] : []), ...g.flags];
    const notes = noteLines.length > 0 ? `<tr class="notes"><td></td><td colspan="${cols - 1}" class="small">${noteLines.map((f) => escapeHtml(f)).join("<br>")}</td></tr>` : "";
    return main + notes;
  }).join("");
  const head = `<tr><th class="num">#</th><th>kind</th><th class="num">s (${unit})</th><th class="num">\u03ba (1/${unit})<br>[95%]</th><th class="num">\u03c4 (1/${unit})<br>[95%]</th><th class="num">shape (${unit})<br>[95%]</th>` +
    (hasModel ? `<th class="num">\u03ba l<br>\u03c4 l</th><th>state</th><th class="num">tilt (deg)<br>DMI (J/m\u00b2)</th>` : "") + `</tr>`;

  const kinds = (["straight", "arc", "helix", "irregular"] as const)
    .map((kind) => `<li><span class="swatch" style="background:${KIND_STYLE[kind].fill}"></span>${KIND_STYLE[kind].letter}: ${escapeHtml(KIND_STYLE[kind].name)}</li>`).join("");

  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; script-src 'unsafe-inline'; style-src 'unsafe-inline'; img-src data: blob:">
<title>${escapeHtml(`${doc.tool.name} report: ${name}`)}</title>
<style>${REPORT_CSS}</style>
</head>
<body>
<header>
<h1>${escapeHtml(name)}</h1>
<p class="sub">${escapeHtml(`${doc.tool.name} ${doc.tool.version}`)} \u00b7 curved-wire analysis \u00b7 lengths in ${unit}, curvature and torsion in 1/${unit}</p>
</header>
<aside class="caution" id="caution"><strong>These are model estimates, not measurements.</strong>
The centre line is a smoothing-spline fit of a traced wire; bands are 95% bootstrap intervals of that fit.${hasModel ? " States, stability, effective interactions and pinning come from the curvilinear-magnet model of the stretches." : ""}
The model is valid only for a thin wire whose curvature and torsion radii are much larger than the lattice spacing and the wire thickness, for stretches several magnetic lengths long, without applied field or damping.
Curvature that varies on scales shorter than the resolution length (${num(doc.geometry.resolution, unit)}) is smoothed out.</aside>
<section id="summary"><h2>Summary</h2><table class="facts"><tbody>${facts.map(([a1, b1]) => `<tr><td>${a1}</td><td>${b1}</td></tr>`).join("")}</tbody></table></section>
<section id="warnings"><h2>Warnings</h2>${warningItems.length > 0 ? `<ul class="warnings">${warningItems.map((w) => `<li>${escapeHtml(w)}</li>`).join("")}</ul>` : "<p>None.</p>"}</section>
<section id="profiles"><h2>Curvature and torsion along the wire</h2>
${kappaPlot}
${tauPlot}
<ul class="kinds">${kinds}</ul>
<p class="small">Line: estimate; filled: 95% bootstrap band. Stretches are numbered above the plots. Torsion follows B\u2032 = \u2212\u03c4N (a right-handed helix has \u03c4 > 0); it is not drawn where the curvature cannot be told from zero.</p>
</section>
<section id="view3d"><h2>3D view</h2>
<div class="controls" role="group" aria-label="colour by"><span>colour by:</span>
<button type="button" data-mode="kappa" aria-pressed="true">curvature</button>
<button type="button" data-mode="tau" aria-pressed="false">torsion</button>
<button type="button" data-mode="state" aria-pressed="false">model state</button>
<span class="small">drag to turn, wheel to zoom</span></div>
<div class="viewer"><canvas id="view3d-canvas" width="760" height="440" aria-label="3D view of the fitted wire"></canvas><div class="message" id="view3d-message" hidden></div></div>
${legends}
<p class="small">The fitted centre line drawn as a tube of radius ${num(radius, unit)} (${escapeHtml(doc.outputs.mesh.radiusSource)}), centred at (${off.map((v) => brief(v)).join(", ")}) ${unit}.</p>
</section>
<section id="phase"><h2>Phase map</h2>${phaseSection}</section>
<section id="pinning"><h2>Pinning landscape</h2>${pinningSection}</section>
<section id="stretches"><h2>Stretches</h2>
<table><thead>${head}</thead><tbody>${tableRows}</tbody></table>
${doc.features.length > 0 ? `<h3>Features</h3><ul>${doc.features.map((f) => `<li>${escapeHtml(f.kind)} at s = ${num(f.s)} ${unit}${f.within >= 0 ? ` (stretch ${f.within + 1})` : ""}: ${escapeHtml(f.note)}</li>`).join("")}</ul>` : ""}
<p class="small">Stretch means with 95% bands from the bootstrap replicates; where a shape was refitted (a line, circle or helix through the stretch's input points), \u03ba and \u03c4 of arcs and helices are the shape's, with intervals from its residual noise.${hasModel ? " Tilt: FM from T toward B, AFM from B toward T. DMI: geometric 2A\u221a(\u03ba\u00b2+\u03c4\u00b2)." : ""}</p>
</section>
<footer>Files: ${[doc.outputs.profile, "model.json", doc.outputs.chain.file, doc.outputs.mesh.file, doc.outputs.report].map((f) => `<code>${escapeHtml(f)}</code>`).join(", ")}.
Reproduce: same input, options and seed (${doc.seed}) give the same numbers. ${escapeHtml(doc.note)}.</footer>
<script type="application/json" id="report-data">${scriptJson(viewData)}</script>
<script>${inlineScript(input.viewerScript)}</script>
</body>
</html>
`;
}
