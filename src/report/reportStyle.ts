/** The report's stylesheet: plain, print-friendly, no web fonts (works offline). */
export const REPORT_CSS = `
:root { --ink: #1d232b; --muted: #5b6470; --rule: #d5d8dc; --accent: #1f3b63; --band: #c4d0de; --paper: #ffffff; }
* { box-sizing: border-box; }
html { background: var(--paper); }
body { margin: 0 auto; max-width: 820px; padding: 24px 28px 48px; color: var(--ink);
  font: 14px/1.45 "DejaVu Sans", "Segoe UI", system-ui, sans-serif; }
h1 { font-size: 22px; margin: 0 0 2px; word-break: break-all; }
h2 { font-size: 17px; margin: 28px 0 8px; padding-bottom: 3px; border-bottom: 1px solid var(--rule); }
p { margin: 6px 0; }
.sub { color: var(--muted); margin: 0 0 12px; }
.caution { border: 1px solid #c9a227; background: #fbf6e4; padding: 8px 12px; margin: 12px 0; }
.caution strong { display: block; }
table { border-collapse: collapse; width: 100%; font-size: 13px; }
th, td { text-align: left; padding: 3px 8px 3px 0; border-bottom: 1px solid var(--rule); vertical-align: top; }
th { font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.stretch + tr.notes td { border-top: none; padding-top: 0; }
tr.stretch:has(+ tr.notes) td { border-bottom: none; }
table.facts td:first-child { color: var(--muted); width: 38%; }
.small { font-size: 12px; color: var(--muted); }
ul.warnings { padding-left: 18px; margin: 4px 0; }
ul.warnings li { margin: 2px 0; }
svg.plot { display: block; max-width: 100%; height: auto; margin: 6px 0; font: 11px "DejaVu Sans", system-ui, sans-serif; }
svg .grid line { stroke: #e6e8eb; stroke-width: 1; }
svg .axis rect, svg .axis line { stroke: #555c66; stroke-width: 1; }
svg .axis text { fill: #3a4049; }
svg .axis text.label { font-size: 12px; fill: var(--ink); }
svg .band { fill: var(--band); fill-opacity: 0.85; stroke: none; }
svg .estimate { fill: none; stroke: var(--accent); stroke-width: 1.6; stroke-linejoin: round; }
svg .first-order { fill: none; stroke: #7a8493; stroke-width: 1.2; stroke-dasharray: 5 3; }
svg .zero { stroke: #7a8493; stroke-width: 0.8; stroke-dasharray: 2 2; }
svg .cut { stroke: #9aa1ab; stroke-width: 0.8; }
svg .stretch-label { font-size: 10.5px; fill: #3a4049; }
svg .marker line { stroke: #b5302c; stroke-width: 0.8; stroke-dasharray: 3 2; }
svg .marker text { fill: #b5302c; font-size: 10px; }
svg .unstable .region { fill: #f1c9c4; stroke: #f1c9c4; stroke-width: 0.6; stroke-linejoin: round; }
svg .unstable .edge { fill: none; stroke: #c77d74; stroke-width: 1; }
svg .region-label { paint-order: stroke; stroke: #fff; stroke-width: 3px; stroke-linejoin: round; }
svg .ring-rule line { stroke: #1d232b; stroke-width: 1.4; stroke-dasharray: 4 2; }
svg .points .leader { stroke: #5b6470; stroke-width: 0.8; }
svg .points .true-spot { fill: #1d232b; stroke: none; }
svg .magnons .upper, svg .ring-levels .upper { stroke: #1c3d78; stroke-width: 2; }
svg .magnons .lower, svg .ring-levels .lower { stroke: #2f8f83; stroke-width: 2; }
svg .magnons .dip { stroke: #2f8f83; stroke-width: 1.2; stroke-dasharray: 4 2; }
svg .magnons .depth { stroke: #1d232b; stroke-width: 1; }
svg .end-zone { fill: #d9d9d9; fill-opacity: 0.55; }
svg .bias-zone { fill: #f0c36d; fill-opacity: 0.45; }
svg .junction-zone { fill: #8fb8de; fill-opacity: 0.45; }
svg .boundary { fill: none; stroke: #1d232b; stroke-width: 1.8; }
svg .note { font-size: 11px; fill: #3a4049; }
svg .points .bar { stroke: #1d232b; stroke-width: 1.1; }
svg .points path, svg .points circle, svg .points rect { stroke: #1d232b; stroke-width: 0.9; }
svg .points text { font-size: 11px; font-weight: 600; fill: #1d232b; }
svg .site circle { fill: #fff; stroke: #b5302c; stroke-width: 1.4; }
svg .site text { font-size: 9.5px; font-weight: 700; fill: #b5302c; }
svg .empty { fill: var(--muted); font-size: 13px; }
.kinds, .swatches { list-style: none; padding: 0; margin: 4px 0; display: flex; flex-wrap: wrap; gap: 4px 16px; font-size: 12px; }
.swatch { display: inline-block; width: 14px; height: 11px; border: 1px solid #777; margin-right: 5px; vertical-align: -1px; }
.viewer { position: relative; border: 1px solid var(--rule); background: #f4f4f1; }
.viewer canvas { display: block; width: 100%; height: auto; aspect-ratio: 760 / 440; }
.viewer .message { position: absolute; inset: 0; display: flex; align-items: center; justify-content: center; color: var(--muted); padding: 20px; text-align: center; background: #f4f4f1; }
.viewer .message[hidden] { display: none; }
.viewer canvas { cursor: grab; touch-action: none; }
.viewer svg.overlay { position: absolute; inset: 0; width: 100%; height: 100%; pointer-events: none; font: 11px "DejaVu Sans", system-ui, sans-serif; }
.viewer svg.overlay line { stroke-width: 2; }
.viewer svg.overlay text { fill: #1d232b; }
.controls { margin: 6px 0; display: flex; gap: 6px; align-items: center; flex-wrap: wrap; font-size: 13px; }
.controls button { font: inherit; padding: 3px 10px; border: 1px solid #8a919b; background: #fff; border-radius: 3px; cursor: pointer; }
.controls button[aria-pressed="true"] { background: var(--accent); color: #fff; border-color: var(--accent); }
.legends > * { display: none; }
.legends[data-mode="kappa"] > [data-for="kappa"], .legends[data-mode="tau"] > [data-for="tau"], .legends[data-mode="state"] > [data-for="state"] { display: block; }
svg.legend { display: block; font: 11px "DejaVu Sans", system-ui, sans-serif; }
svg.legend text { fill: #3a4049; }
svg.legend text.label { fill: var(--ink); font-size: 12px; }
figure.plot-box { margin: 0; }
figcaption.save { display: flex; gap: 6px; justify-content: flex-end; margin: -2px 0 6px; }
figcaption.save button { font: 11.5px "DejaVu Sans", system-ui, sans-serif; padding: 1px 8px; border: 1px solid #b6bcc4; background: #fff; border-radius: 3px; cursor: pointer; color: var(--muted); }
@media print { figcaption.save { display: none; } }
.twocol { display: flex; gap: 18px; align-items: flex-start; flex-wrap: wrap; }
.twocol > div { flex: 1 1 280px; }
footer { margin-top: 32px; color: var(--muted); font-size: 12px; border-top: 1px solid var(--rule); padding-top: 8px; }
code { font-size: 12.5px; }
@media print {
  body { max-width: none; padding: 0; font-size: 11.5px; }
  .controls { display: none; }
  section { break-inside: avoid; }
  h2 { margin-top: 18px; }
}
`;
