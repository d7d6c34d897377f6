/**
 * The summary's style sheet (a constant: no user text). Laid out for one portrait sheet of
 * either A4 (210 × 297 mm) or US Letter (216 × 279 mm): the content is at most 190 mm wide
 * (A4 less 10 mm margins) and must stay under 259 mm tall (Letter less 10 mm margins): the
 * tests print the examples and long invented cases in Chromium and count the pages.
 * Colours of the four answers follow the app's (src/scene/palette.ts), darkened for paper,
 * and each curve also has its own dash pattern so that a grey print stays readable.
 */
export const REPORT_CSS = `
@page { margin: 10mm; }
* { box-sizing: border-box; }
html { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
body { margin: 0; background: #e9edf1; color: #17212b;
  font: 6.9pt/1.18 "Helvetica Neue", Arial, "Liberation Sans", "DejaVu Sans", sans-serif; }
.sheet { width: 190mm; margin: 8mm auto; padding: 0; background: #fff; }
@media screen { .sheet { padding: 8mm; width: 206mm; box-shadow: 0 1px 6px rgba(0,0,0,.25); } }
@media print { body { background: #fff; } .sheet { margin: 0; } .screen-only { display: none; } }
h1 { font-size: 12pt; margin: 0; letter-spacing: .01em; }
h2 { font-size: 8pt; margin: 1.2mm 0 .4mm; padding-bottom: .4mm; border-bottom: .3mm solid #2f5d7c; color: #1d3f57; }
header { border-bottom: .6mm solid #2f5d7c; padding-bottom: 1mm; }
.head-row { display: flex; justify-content: space-between; align-items: baseline; }
.date { font-size: 8.4pt; }
.case-title { font-size: 8.6pt; font-weight: 600; margin: .6mm 0 0; overflow-wrap: anywhere; }
.who { margin: .6mm 0 0; font-size: 7pt; overflow-wrap: anywhere; }
.note { margin: .3mm 0 0; font-size: 6.5pt; color: #3b4856; overflow-wrap: anywhere; }
.screen-only { color: #6b7785; margin: .5mm 0 0; }
.box { background: #f1f6f9; border: .3mm solid #c4d6e2; border-radius: 1.2mm; padding: .2mm 2.4mm .8mm; margin-top: 1.4mm; }
.box h2 { border: 0; margin-bottom: .2mm; }
ul.short { margin: 0; padding-left: 4mm; font-size: 7.6pt; }
ul.short li { margin: .15mm 0; }
.foot { display: grid; grid-template-columns: 60fr 40fr; column-gap: 4mm; }
.foot > section { min-width: 0; }
table.t { width: 100%; border-collapse: collapse; }
table.t th, table.t td { text-align: left; vertical-align: top; padding: .2mm .8mm; border-bottom: .2mm solid #dde4ea; }
table.t thead th { font-size: 6.6pt; font-weight: 600; color: #40505f; border-bottom: .3mm solid #9fb2c1; }
table.t tbody th { font-weight: 500; color: #2c3a47; }
table.inputs tbody th { width: 15%; }
table.inputs td { width: 42.5%; }
table.marks tbody th, table.eyes tbody th { width: 13%; white-space: nowrap; }
table.marks td { width: 17.4%; }
table.t tr.pair th, table.t tr.pair td { background: #f4f7f9; }
.facts { margin: .5mm 0 0; overflow-wrap: anywhere; }
.sub { color: #55626f; }
.qh { margin: 1.2mm 0 .4mm; padding-bottom: .3mm; border-bottom: .3mm solid #2f5d7c; }
.qh h2 { display: inline; margin: 0; padding: 0; border: 0; }
.q { font-size: 6.6pt; font-style: italic; color: #44525f; }
table.marks tbody td, table.eyes tbody td, table.marks tbody th, table.eyes tbody th { font-size: 6.7pt; }
ul.demand { margin: .6mm 0 0; padding-left: 4mm; }
ul.demand li { margin: .15mm 0; }
.guide { color: #2c3a47; }
table.tol td { white-space: nowrap; }
table.tol td.what { white-space: normal; font-size: 6.2pt; color: #44525f; }
.strong { font-weight: 700; }
.as { font-size: 6.4pt; font-style: italic; color: #8a5a00; border: .2mm solid #d9b66a; border-radius: .8mm; padding: 0 .6mm; white-space: nowrap; }
.src { color: #5b6874; font-size: 6.6pt; }
.fail, .out .vd { color: #a31616; font-weight: 700; }
.pass .vd { color: #1c6b2f; font-weight: 700; }
.small { font-size: 7pt; margin: .8mm 0 0; }
.k { display: inline-block; width: 4mm; height: 0; margin-right: 1mm; vertical-align: middle; border-top: .6mm solid; }
.k-exact { border-color: #c46d00; }
.k-prentice { border-color: #b4327a; border-top-style: dashed; }
.k-paraxial { border-color: #1b8596; border-top-style: dotted; }
.k-focimeter { border-color: #3f8a22; border-top-style: dashed; }
.figs { margin-top: 1.4mm; }
.figrow { display: grid; grid-template-columns: 71fr 29fr; column-gap: 2mm; align-items: center; }
.figrow .cap { margin: 0; font-size: 6.4pt; }
.figs .grid { display: grid; grid-template-columns: 150fr 212fr 150fr 212fr; column-gap: 2.5mm; }
svg.fig { width: 100%; height: auto; display: block; font-family: inherit; }
svg .fig-title { font-size: 9.5px; font-weight: 600; fill: #1d3f57; }
svg .lbl, svg .end, svg .tick { font-size: 8.6px; fill: #33414e; }
svg .end { fill: #6b7785; }
svg .warn { font-size: 9px; fill: #a31616; font-weight: 600; }
svg .axis { stroke: #8d9aa6; stroke-width: .6; stroke-dasharray: 5 2 1 2; }
svg .eye { fill: #f6f1e8; stroke: #c9bfae; stroke-width: .7; }
svg .cr { fill: #33414e; }
svg .oc { fill: #fff; stroke: #1d3f57; stroke-width: 1; }
svg .lens { fill: #cfe8f3; stroke: #2f6f91; stroke-width: .9; }
svg .ray { stroke: #c46d00; stroke-width: 1.3; fill: none; }
svg .ray-glass { stroke: #7a3f00; stroke-width: 1.9; fill: none; }
svg .ray-none { stroke: #8d9aa6; stroke-width: .7; stroke-dasharray: 3 2; fill: none; }
svg .ray-lbl { fill: #8a4c00; }
svg .vp { fill: #ffd24a; stroke: #7a3f00; stroke-width: .8; }
svg .bar { stroke: #33414e; stroke-width: 1.2; }
svg .grid { stroke: #e3e8ed; stroke-width: .6; }
svg .frame { stroke: #6b7785; stroke-width: .8; }
svg .here { stroke: #6b7785; stroke-width: .7; stroke-dasharray: 2 2; }
svg path, svg line.c-exact, svg line.c-prentice, svg line.c-paraxial, svg line.c-focimeter { fill: none; }
svg .c-exact { stroke: #c46d00; stroke-width: 1.8; }
svg .c-prentice { stroke: #b4327a; stroke-width: 1.2; stroke-dasharray: 5 3; }
svg .c-paraxial { stroke: #1b8596; stroke-width: 1.2; stroke-dasharray: 1.5 2; }
svg .c-focimeter { stroke: #3f8a22; stroke-width: 1.2; stroke-dasharray: 7 2 2 2; }
svg .legend { fill: #fff; fill-opacity: .9; stroke: #dde4ea; stroke-width: .6; }
svg circle.dot { stroke-dasharray: none; fill: #fff; stroke-width: 1.2; }
.caution { border-left: .8mm solid #a31616; padding-left: 2mm; }
.made { color: #55626f; }
.foot h2 { margin-top: 1.6mm; }
`;
