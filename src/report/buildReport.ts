import { basename } from "node:path";
import { quantile } from "d3-array";
import type { Analysis } from "../export/analyzeTrace.js";
import { brief } from "../export/brief.js";
import { wireSummary } from "../export/wireSummary.js";
import { isGeneralCaution } from "../export/composeWarnings.js";
import { banded, ENGINEERING, outsideBandReason, sig } from "./formatQuantity.js";
import type { ModelDocument, SegmentEntry } from "../export/modelDocument.js";
import type { ResampledWire } from "../export/resampleWire.js";
import { reducedSystem } from "../physics/reducedSystem.js";
import { FLAG_BIAS, FLAG_END, FLAG_JUNCTION_ZONE, PER_METRE } from "../types.js";
import { curvatureColor, torsionColor } from "./colorScales.js";
import { escapeHtml, inlineScript, scriptJson } from "./escapeHtml.js";
import { KIND_STYLE } from "./kindStyle.js";
import { REPORT_CSS } from "./reportStyle.js";
import { categoryLegend, rampLegend } from "./svg/legend.js";
import { phaseMap, RING_SWITCH_FM, type PhasePoint } from "./svg/phaseMap.js";
import { magnonPanel } from "./svg/magnonPanel.js";
import { LABELLED_SITES, pinningPlot } from "./svg/pinningPlot.js";
import { profilePlot, type ShadedStretch, type Zone } from "./svg/profilePlot.js";

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
/** Most input points handed to the 3D view (shown on demand). */
const MAX_INPUT_POINTS = 6000;

/** State category code of a stretch (colorScales STATE_CATEGORIES). */
export function stretchCategory(g: SegmentEntry): number {
  if (g.homogeneousStability === null) return 0;
  if (g.uncertain === true) return 4;
  return g.homogeneousStability === "stable" ? 1 : g.homogeneousStability === "metastable" ? 2 : 3;
}

function b64(a: Float32Array | Uint8Array): string {
  return Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString("base64");
}

/** A value with 3 significant digits and its unit (see formatQuantity.ts). */
const num = (v: number | null | undefined, unit = ""): string => {
  const t = sig(v);
  return t === "n/a" || unit === "" ? t : `${t} ${unit}`;
};
/** An estimate over its 95% band, common decimals (see formatQuantity.ts). */
const band = (v: number | null, lo: number | null, hi: number | null): string => {
  const [a, b, c] = banded(v, lo, hi);
  return a === "n/a" ? a : `${a}${lo !== null && hi !== null ? `<br><span class="small">[${b}, ${c}]</span>` : ""}`;
};
/** The same on one line, for the summary. */
const bandInline = (v: number, lo: number, hi: number, unit: string): string => {
  const [a, b, c] = banded(v, lo, hi);
  return a === "n/a" ? a : `${a} ${unit}${Number.isFinite(lo) && Number.isFinite(hi) ? ` <span class="small">[${b}, ${c}]</span>` : ""}`;
};
/** A plot with its save buttons (SVG and PNG, made in the page by the viewer script; offline). */
const saveable = (svg: string, id: string): string =>
  `<figure class="plot-box">${svg}<figcaption class="save"><button type="button" data-save="${id}" data-as="svg">save SVG</button><button type="button" data-save="${id}" data-as="png">save PNG</button></figcaption></figure>`;
/** A quantity in an engineering unit (value given in SI). */
const eng = (v: number | null | undefined, q: keyof typeof ENGINEERING): string =>
  v === null || v === undefined || !Number.isFinite(v) ? "n/a" : `${sig(v * ENGINEERING[q].factor)} ${ENGINEERING[q].unit}`;

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
  /** A length of model.json (in `unit`) in nm, the scale of material lengths. */
  const toNm = (v: number | null): number | null => (v === null ? null : (v * PER_METRE.nm) / k);
  const summary = wireSummary(a, doc);
  // positions along the wire: one common number of decimals, 3 significant digits of the total length
  const sDecimals = Math.max(0, Math.min(6, 2 - Math.floor(Math.log10(Math.max(doc.geometry.length ?? 1, 1e-300)))));
  const sPos = (v: number | null): string => (v === null || !Number.isFinite(v) ? "n/a" : v.toFixed(sDecimals).replace(/^-(0\.?0*)$/, "$1"));
  const wholeNotes: string[] = [];

  const stretches: ShadedStretch[] = segs.map((g) => ({ s0: g.s0, s1: g.s1, kind: g.kind, label: `${g.index + 1} ${KIND_STYLE[g.kind].letter}` }));
  const sU = Float64Array.from(p.s, (v) => v * k);
  const inv = (x: Float64Array) => Float64Array.from(x, (v) => v / k);
  // shaded zones: within one resolution length of an open end (flag 4), smoothing bias comparable to
  // the band (flag 16), near a junction of a wire network (flag 32)
  const zones: Zone[] = [];
  for (const [bit, kind] of [[FLAG_END, "end"], [FLAG_BIAS, "bias"], [FLAG_JUNCTION_ZONE, "junction"]] as const) {
    let start = -1;
    for (let i = 0; i <= p.n; ++i) {
      const on = i < p.n && (p.flags[i] & bit) !== 0;
      if (on && start < 0) start = i;
      if (!on && start >= 0) {
        // a run covers half the gap to its neighbours on each side, so a single flagged sample still shows
        const a = start > 0 ? (sU[start - 1] + sU[start]) / 2 : sU[start], b = i < p.n ? (sU[i - 1] + sU[i]) / 2 : sU[i - 1];
        zones.push({ s0: a, s1: b, kind });
        start = -1;
      }
    }
  }
  const kappaPlot = profilePlot({
    zones,
    id: "kappa-plot", title: "curvature along the wire with its 95% band", s: sU,
    value: inv(p.kappa), lo: inv(p.kappaLo), hi: inv(p.kappaHi),
    xLabel: `arc length s (${unit})`, yLabel: `curvature \u03ba (1/${unit})`, stretches, fromZero: true,
  });
  const tauPlot = profilePlot({
    zones,
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
      ...(m.note !== null ? [["material note", escapeHtml(m.note)] as [string, string]] : []),
      ["exchange A", eng(m.exchange, "exchange")],
      ["anisotropy K", eng(m.anisotropy, "anisotropy")],
      ["magnetic length l", num(toNm(m.magneticLength), "nm")],
      ["thickness / lattice spacing", `${num(toNm(m.thickness), "nm")} / ${num(toNm(m.latticeSpacing), "nm")}`],
      ["temperature", num(m.temperature, "K")],
    );
  } else {
    facts.push(["material", "none given: geometry only"]);
  }
  facts.push(
    ["mean curvature (arc-length weighted)", bandInline(summary.kappaMean.value, summary.kappaMean.lo, summary.kappaMean.hi, `1/${unit}`)],
    ["maximum curvature", bandInline(summary.kappaMax.value, summary.kappaMax.lo, summary.kappaMax.hi, `1/${unit}`)],
    ["mean |torsion| (of |\u03c4|, arc-length weighted)", bandInline(summary.tauAbsMean.value, summary.tauAbsMean.lo, summary.tauAbsMean.hi, `1/${unit}`)],
  );
  for (const [what, b] of [["mean curvature", summary.kappaMean], ["maximum curvature", summary.kappaMax]] as const) {
    const why = outsideBandReason("curvature", b.value, b.lo, b.hi);
    if (why !== null) wholeNotes.push(`${what}: ${why}`);
  }
  const whyTau = outsideBandReason("|torsion|", summary.tauAbsMean.value, summary.tauAbsMean.lo, summary.tauAbsMean.hi);
  if (whyTau !== null) wholeNotes.push(`mean |torsion|: ${whyTau}`);
  const counts = (["straight", "arc", "helix", "irregular"] as const).map((kind) => `${segs.filter((g) => g.kind === kind).length} ${kind}`).join(", ");
  facts.push(["stretches", `${segs.length} (${counts})`]);
  if (hasModel) {
    const meta = segs.filter((g) => g.homogeneousStability === "metastable").reduce((s, g) => s + g.length, 0);
    facts.push(["pinning sites", String(doc.pinning.length)], ["metastable length", num(meta, unit)]);
  }
  facts.push(["chain for solvers", `${doc.outputs.chain.sites} sites, spacing ${num(doc.outputs.chain.spacing, unit)} (${escapeHtml(doc.outputs.chain.spacingNote)})`]);
  facts.push(["tube mesh", `${escapeHtml(doc.outputs.mesh.file)}, radius ${num(doc.outputs.mesh.radius, unit)} (${escapeHtml(doc.outputs.mesh.radiusSource)})`]);

  // warnings
  // specific findings first; the general caution is the box under the list (once)
  const warningItems = [...doc.warnings.filter((w) => !isGeneralCaution(w)), ...wholeNotes, ...doc.geometry.diagnostics.map((d) => `fit: ${d}`)];
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
    phaseSection = `<div class="twocol"><div>${saveable(phaseMap(system, pts, { intrinsic: a.material.intrinsic !== null, closedRing: p.closed }), "phase-map")}</div><div>
<p>Each stretch is a marker at its mean reduced torsion \u03c4&#8201;l and curvature \u03ba&#8201;l (l = ${num(toNm(doc.material?.magneticLength ?? null), "nm")}), with its 95% bars.
Shaded: the homogeneous state is linearly unstable there. Line: where the best periodic texture of an infinite helix and the homogeneous state have equal energy
(${ferro ? "periodic above it" : "periodic below it"}${a.material.intrinsic !== null ? "; drawn for the material without its intrinsic anisotropy term, which the stretch labels do include" : ""}).
A marker moved aside to stay readable has a thin leader to its true position (a dot).</p>
<p class="small">Straight and planar stretches sit at torsion 0. ${ferro
    ? `Planar stretches follow their own rules: an open arc turns periodic at \u03ba l = 2/\u03c0, and a closed ring switches from the vortex to the onion state at \u03ba l \u2248 ${RING_SWITCH_FM}${p.closed ? " (dashed mark)" : ""}; the line applies to helical stretches.`
    : "A planar antiferromagnetic curve keeps the homogeneous state n = B; the line applies to helical stretches."}</p>
${categoryLegend([1, 2, 3, 4])}
<p class="small">Marker shapes: circle stable, triangle metastable, square unstable, diamond uncertain.</p></div></div>`;
    const land = a.model.landscape;
    if (land !== null && land.q.length > 0) {
      const plot = pinningPlot({
        q: Float64Array.from(land.q, (v) => v * k), energy: land.energy, firstOrder: land.firstOrder,
        sites: doc.pinning.map((s) => ({ rank: s.rank, s: s.s })), stretches,
        xLabel: `wall position s (${unit})`, sMin: Math.min(0, sU[0] ?? 0), sMax: p.closed ? p.length * k : sU[sU.length - 1] ?? 1,
      });
      const rows = doc.pinning.slice(0, MAX_SITE_ROWS).map((s) =>
        `<tr><td class="num">${s.rank}</td><td class="num">${sPos(s.s)}</td><td class="num">${eng(s.depthJ, "energy")}</td><td class="num">${eng(s.depthJ, "energyMeV")}</td><td class="num">${num(s.depthKT)}</td><td class="num">${num(s.depthReduced)}</td></tr>`).join("");
      pinningSection = `${saveable(plot, "pinning-plot")}
<p class="small">Wall energy of a ${ferro ? "head-to-head wall" : "wall"} held at each position along the relaxed texture (solid)${land.firstOrder.some((v) => Number.isFinite(v)) ? ", first-order estimate from the curvature (dashed)" : ""}. Numbers: the deepest ${Math.min(LABELLED_SITES, doc.pinning.length)} sites by rank. Method: the wall is held at each position and the texture around it relaxed${ferro ? "; the dashed first-order estimate is the wall energy of a straight wire lowered by the curvature it sits on, weighted by the wall profile" : ""}.</p>
${doc.pinning.length > 0 ? `<table><thead><tr><th class="num">rank</th><th class="num">s (${unit})</th><th class="num">depth</th><th class="num">depth</th><th class="num">depth (k<sub>B</sub>T at ${num(doc.material?.temperature ?? null, "K")})</th><th class="num">depth (K l area)</th></tr></thead><tbody>${rows}</tbody></table>${doc.pinning.length > MAX_SITE_ROWS ? `<p class="small">${doc.pinning.length - MAX_SITE_ROWS} more sites in model.json.</p>` : ""}` : "<p>No pinning sites found: the landscape has no local minimum deeper than its noise floor.</p>"}`;
    } else {
      pinningSection = "<p>No pinning landscape was computed for this wire.</p>";
    }
  } else {
    const what = "Give a material (<code>--material material.json</code> with the order and exchange and anisotropy, or the magnetic length) to add";
    phaseSection = `<p>${what} the phase map: each stretch placed at its reduced curvature and torsion against the boundary of the periodic state and the stability line.</p>`;
    pinningSection = `<p>${what} the domain-wall pinning landscape and the ranked pinning sites.</p>`;
  }

  // magnons (antiferromagnet): branches at k = 0, the dip of the lower branch and its depth, ring levels
  let magnonSection = "";
  const withMagnons = segs.filter((g) => g.magnons !== null);
  if (withMagnons.length > 0) {
    const omega0 = withMagnons.find((g) => g.magnons?.omega0 !== null)?.magnons?.omega0 ?? null;
    const ghz = (v: number | null): string => (omega0 === null || v === null ? "" : `<br><span class="small">${sig((v * omega0) / (2 * Math.PI) / 1e9)} GHz</span>`);
    const plot = magnonPanel({
      stretches: withMagnons.map((g) => ({
        label: String(g.index + 1), s0: g.s0, s1: g.s1, lower0: g.magnons!.lower0, upper0: g.magnons!.upper0,
        lowerMin: g.magnons!.lowerMin, depth: g.magnons!.depth, unstable: g.magnons!.unstable,
      })),
      shading: stretches, ringLevels: doc.ringLevels, xLabel: `arc length s (${unit})`,
      sMin: Math.min(0, sU[0] ?? 0), sMax: p.closed ? p.length * k : sU[sU.length - 1] ?? 1,
    });
    const rows = withMagnons.map((g) => {
      const m = g.magnons!;
      return `<tr><td class="num">${g.index + 1}</td><td class="num">${num(m.lower0)}${ghz(m.lower0)}</td><td class="num">${num(m.upper0)}${ghz(m.upper0)}</td>` +
        `<td class="num">${num(m.kMin)}</td><td class="num">${num(m.lowerMin)}${ghz(m.lowerMin)}</td><td class="num">${num(m.depth)}</td><td>${m.unstable ? "unstable: no gap" : escapeHtml(m.note ?? "")}</td></tr>`;
    }).join("");
    const ring = doc.ringLevels !== null && doc.ringLevels.length > 0
      ? `<p class="small">Closed ring made of one arc: its magnon levels j = ${doc.ringLevels.map((r) => r.j).join(", ")} (lower / upper): ${doc.ringLevels.map((r) => `${num(r.lower)} / ${num(r.upper)}`).join("; ")}.</p>` : "";
    magnonSection = `<section id="magnons"><h2>Magnon gaps (antiferromagnet)</h2>
${saveable(plot, "magnon-panel")}
<p class="small">Per stretch: the lower (teal) and upper (dark blue) branch at wave number k = 0; where curvature and torsion pull the lower branch below its k = 0 value, its bottom is dashed and the arrow gives the depth of the dip. Frequencies in units of c/l (c: magnon speed, l: magnetic length)${omega0 !== null ? `, and in GHz with c/l = ${sig(omega0)} rad/s` : "; give magnonSpeed in the material for GHz"}.</p>
<table><thead><tr><th class="num">#</th><th class="num">lower, k = 0</th><th class="num">upper, k = 0</th><th class="num">k at dip (1/l)</th><th class="num">lower at dip</th><th class="num">depth</th><th>note</th></tr></thead><tbody>${rows}</tbody></table>
${ring}</section>`;
  }

  // 3D view data
  const stride = Math.max(1, Math.ceil(chain.n / MAX_VIEW_POINTS));
  const count = Math.ceil(chain.n / stride);
  const off = doc.outputs.mesh.offset;
  const pos = new Float32Array(3 * count), kap = new Float32Array(count), tau = new Float32Array(count), state = new Uint8Array(count);
  const interiorKappa: number[] = [], interiorTau: number[] = [];
  const cats = segs.map(stretchCategory);
  let si = 0;
  for (let c = 0; c < count; ++c) {
    const i = Math.min(chain.n - 1, c * stride);
    for (let d = 0; d < 3; ++d) pos[3 * c + d] = chain.xyz[3 * i + d] * k - off[d];
    kap[c] = chain.kappa[i] / k;
    tau[c] = chain.tau[i] / k;
    if ((chain.flags[i] & FLAG_END) === 0) {
      interiorKappa.push(kap[c]);
      if (Number.isFinite(tau[c])) interiorTau.push(tau[c]);
    }
    const s = chain.s[i] * k;
    while (si + 1 < segs.length && s >= segs[si].s1) ++si;
    state[c] = cats[si] ?? 0;
  }
  // colour ranges from the interior samples (the ends, where the fit's bias is larger, would dominate them)
  const useInterior = interiorKappa.length >= Math.min(20, count);
  const kSrc = useInterior ? interiorKappa : Array.from(kap);
  const tSrc = useInterior ? interiorTau : Array.from(tau).filter(Number.isFinite);
  const kappaMax = quantile(kSrc, 0.99) ?? 0;
  const kappaMinQ = quantile(kSrc, 0.01) ?? 0;
  const tauMaxAbs = quantile(tSrc, 0.99, Math.abs) ?? 0;
  const rangeNote = useInterior && !chain.closed ? "1st to 99th percentile of the interior samples (within one resolution length of an open end excluded)" : "1st to 99th percentile of the samples";
  const radius = doc.outputs.mesh.radius;
  // a position on the wire at arc length s (in unit), by linear interpolation along the chain
  const chainS = Float64Array.from(chain.s, (v) => v * k);
  const at = (s: number, out: number[]): void => {
    let lo = 0, hi = chain.n - 1;
    if (!(s > chainS[0])) hi = 0;
    while (hi - lo > 1) { const mid = (lo + hi) >> 1; if (chainS[mid] <= s) lo = mid; else hi = mid; }
    const t = hi > lo && chainS[hi] > chainS[lo] ? Math.min(1, Math.max(0, (s - chainS[lo]) / (chainS[hi] - chainS[lo]))) : 0;
    for (let d = 0; d < 3; ++d) out.push((chain.xyz[3 * lo + d] + t * (chain.xyz[3 * hi + d] - chain.xyz[3 * lo + d])) * k - off[d]);
  };
  const cutXyz: number[] = [];
  segs.forEach((g, idx) => { if (idx > 0 || (chain.closed && segs.length > 1)) at(g.s0, cutXyz); });
  const pinXyz: number[] = [];
  const shownPins = doc.pinning.slice(0, LABELLED_SITES);
  for (const site of shownPins) at(site.s, pinXyz);
  const tr = a.trace.xyz, trN = tr.length / 3, trStride = Math.max(1, Math.ceil(trN / MAX_INPUT_POINTS));
  const inputXyz = new Float32Array(3 * Math.ceil(trN / trStride));
  for (let c = 0, i = 0; i < trN; i += trStride, ++c) for (let d = 0; d < 3; ++d) inputXyz[3 * c + d] = tr[3 * i + d] * k - off[d];
  const viewData = {
    unit, closed: chain.closed, radius, points: b64(pos), kappa: b64(kap), tau: b64(tau), state: b64(state),
    kappaMin: kappaMinQ < kappaMax ? kappaMinQ : 0, kappaMax: kappaMax > 0 ? kappaMax : 1, tauMaxAbs: tauMaxAbs > 0 ? tauMaxAbs : 1,
    cuts: b64(new Float32Array(cutXyz)), pins: b64(new Float32Array(pinXyz)), pinRanks: shownPins.map((q) => q.rank), input: b64(inputXyz),
  };
  const legends = `<div class="legends" id="view3d-legends" data-mode="kappa">
<div data-for="kappa">${rampLegend((v) => curvatureColor(v, viewData.kappaMin, viewData.kappaMax), viewData.kappaMin, viewData.kappaMax, `curvature \u03ba (1/${unit})`)}</div>
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
      : g.state === "homogeneous" ? `homogeneous (${g.homogeneousStability})`
      : g.state === "vortex" || g.state === "onion" ? `ring ${g.state} (vortex ${g.homogeneousStability})` : `periodic (homogeneous ${g.homogeneousStability})`;
    const probs = g.probabilities === null ? "" : `<br><span class="small">p(periodic) ${num(g.probabilities.periodic)}${g.uncertain ? ", uncertain" : ""}</span>`;
    const main = `<tr class="stretch"><td class="num">${g.index + 1}</td><td>${escapeHtml(g.kind)}</td><td class="num">${sPos(g.s0)}\u2013${sPos(g.s1)}</td>` +
      `<td class="num">${band(g.kappa, g.kappaLo, g.kappaHi)}</td><td class="num">${band(g.tau, g.tauLo, g.tauHi)}</td><td class="num">${shapeCell(g)}</td>` +
      (hasModel ? `<td class="num">${num(g.kappaReduced)}<br>${num(g.tauReduced)}</td><td>${escapeHtml(st)}${probs}</td><td class="num">${num(g.tiltDeg)}<br>${eng(g.dmi, "dmi")}</td>` : "") + "</tr>";
    const why = [outsideBandReason("curvature", g.kappa, g.kappaLo, g.kappaHi), outsideBandReason("torsion", g.tau, g.tauLo, g.tauHi)].filter((t): t is string => t !== null);
    const lines = [...(g.demoted !== null ? [`demoted to irregular: ${g.demoted}`] : []), ...(g.wholeRing ? ["the whole closed wire, no seam"] : []), ...g.flags, ...why];
    const notes = lines.length > 0 ? `<tr class="notes"><td></td><td colspan="${cols - 1}" class="small">${lines.map((f) => escapeHtml(f)).join("<br>")}</td></tr>` : "";
    return main + notes;
  }).join("");
  const head = `<tr><th class="num">#</th><th>kind</th><th class="num">s (${unit})</th><th class="num">\u03ba (1/${unit})<br>[95%]</th><th class="num">\u03c4 (1/${unit})<br>[95%]</th><th class="num">shape (${unit})<br>[95%]</th>` +
    (hasModel ? `<th class="num">\u03ba l<br>\u03c4 l</th><th>state</th><th class="num">tilt (deg)<br>DMI</th>` : "") + `</tr>`;

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
<p class="sub">${escapeHtml(`${doc.tool.name} ${doc.tool.version}`)} \u00b7 curved-wire analysis (model estimates, not measurements) \u00b7 lengths in ${unit}, curvature and torsion in 1/${unit}</p>
</header>
<section id="summary"><h2>Summary</h2><table class="facts"><tbody>${facts.map(([a1, b1]) => `<tr><td>${a1}</td><td>${b1}</td></tr>`).join("")}</tbody></table></section>
<section id="warnings"><h2>Warnings</h2>${warningItems.length > 0 ? `<ul class="warnings">${warningItems.map((w) => `<li>${escapeHtml(w)}</li>`).join("")}</ul>` : "<p>No specific warnings for this wire.</p>"}
<aside class="caution" id="caution"><strong>These are model estimates, not measurements.</strong>
The centre line is a smoothing-spline fit of a traced wire; bands are 95% bootstrap intervals of that fit.${hasModel ? " States, stability, effective interactions and pinning come from the curvilinear-magnet model of the stretches." : ""}
The model is valid only for a thin wire whose curvature and torsion radii are much larger than the lattice spacing and the wire thickness, for stretches several magnetic lengths long, without applied field or damping.
Curvature that varies on scales shorter than the resolution length (${num(doc.geometry.resolution, unit)}) is smoothed out.</aside></section>
<section id="profiles"><h2>Curvature and torsion along the wire</h2>
${saveable(kappaPlot, "kappa-plot")}
${saveable(tauPlot, "tau-plot")}
<ul class="kinds">${kinds}</ul>
<p class="small">Line: estimate; filled: 95% bootstrap band. Stretches are numbered above the plots.${zones.some((z) => z.kind === "end") ? " Grey shade: within one resolution length of an open end, where the fit's bias is larger." : ""}${zones.some((z) => z.kind === "bias") ? " Amber shade: the smoothing bias is comparable to the band (a feature near the resolution length), so the band may under-cover there." : ""}${zones.some((z) => z.kind === "junction") ? " Blue shade: near a junction of the wire network, where this branch meets others and its centre line is not that of a single wire." : ""} Torsion follows B\u2032 = \u2212\u03c4N (a right-handed helix has \u03c4 > 0); it is not drawn where the curvature cannot be told from zero.</p>
</section>
<section id="view3d"><h2>3D view</h2>
<div class="controls" role="group" aria-label="colour by"><span>colour by:</span>
<button type="button" data-mode="kappa" aria-pressed="true">curvature</button>
<button type="button" data-mode="tau" aria-pressed="false">torsion</button>
<button type="button" data-mode="state" aria-pressed="false">model state</button>
<button type="button" id="view3d-points" aria-pressed="false">input points</button>
<span class="small">drag to turn, right-drag to pan, wheel to zoom, double-click to reset</span></div>
<div class="viewer"><canvas id="view3d-canvas" width="760" height="440" aria-label="3D view of the fitted wire"></canvas>
<svg class="overlay" id="view3d-overlay" viewBox="0 0 760 440" preserveAspectRatio="none" aria-hidden="true" xmlns="http://www.w3.org/2000/svg">
<line id="view3d-axis-x" x1="46" y1="394" x2="76" y2="394" stroke="#b5302c"/><line id="view3d-axis-y" x1="46" y1="394" x2="46" y2="364" stroke="#3d8b57"/><line id="view3d-axis-z" x1="46" y1="394" x2="46" y2="394" stroke="#1f3b63"/>
<text id="view3d-label-x" x="80" y="398">x</text><text id="view3d-label-y" x="43" y="358">y</text><text id="view3d-label-z" x="43" y="398">z</text>
<line id="view3d-scale-bar" x1="590" y1="420" x2="740" y2="420" stroke="#1d232b"/><text id="view3d-scale-text" x="665" y="412" text-anchor="middle"></text>
</svg>
<div class="message" id="view3d-message" hidden></div></div>
${legends}
<p class="small">The fitted centre line drawn as a tube of radius ${num(radius, unit)} (${escapeHtml(doc.outputs.mesh.radiusSource)}), centred at (${off.map((v) => brief(v)).join(", ")}) ${unit}.
Curvature and torsion colours span the ${rangeNote}. Grey beads: stretch boundaries; red beads: the ${shownPins.length < doc.pinning.length ? `deepest ${shownPins.length} of ${doc.pinning.length} ` : ""}pinning sites. Triad: the lab x, y, z axes; scale bar: length at the depth of the view centre.
The tube is drawn no thinner than 0.6% and no thicker than 4% of the wire's size, so it stays visible.</p>
</section>
<section id="phase"><h2>Phase map</h2>${phaseSection}</section>
<section id="pinning"><h2>Pinning landscape</h2>${pinningSection}</section>
${magnonSection}
<section id="stretches"><h2>Stretches</h2>
<table><thead>${head}</thead><tbody>${tableRows}</tbody></table>
${doc.features.length > 0 ? `<h3>Features</h3><ul>${doc.features.map((f) => `<li>${escapeHtml(f.kind)} at s = ${num(f.s)} ${unit}${f.within >= 0 ? ` (stretch ${f.within + 1})` : ""}: ${escapeHtml(f.note)}</li>`).join("")}</ul>` : ""}
<p class="small">Stretch means with 95% bands from the bootstrap replicates; where a shape was refitted (a line, circle or helix through the stretch's input points), \u03ba and \u03c4 of arcs and helices are the shape's, with intervals from its residual noise.${hasModel ? " Tilt: FM from T toward B, AFM from B toward T. DMI: geometric 2A\u221a(\u03ba\u00b2+\u03c4\u00b2)." : ""}</p>
</section>
<footer>Files: ${[doc.outputs.profile, "model.json", doc.outputs.chain.file, doc.outputs.mesh.file, doc.outputs.report, ...(doc.outputs.exports ?? []).map((e) => e.file)].map((f) => `<code>${escapeHtml(f)}</code>`).join(", ")}.
Reproduce: same input, options and seed (${doc.seed}) give the same numbers${doc.run.command !== null ? `: <code>${escapeHtml(doc.run.command)}</code>` : " (every option value is in model.json, under run)"}. ${escapeHtml(doc.note)}.</footer>
<script type="application/json" id="report-data">${scriptJson(viewData)}</script>
<script>${inlineScript(input.viewerScript)}</script>
</body>
</html>
`;
}
