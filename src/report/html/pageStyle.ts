// The page's inline stylesheet: calm, legible, printable; system fonts only (no network). On a phone
// (down to 375 px) the page never scrolls sideways: tables, strips and charts scroll inside their own
// box, and chart labels keep at least 10 px. Printed, it opens with one page for a meeting (headline,
// top candidates, cautions), then the charts and tables wrapped to the page, controls left out, and
// the pattern maps that were open.

export const PAGE_STYLE = `
:root { --ink:#1e2a31; --muted:#5b6870; --paper:#fbfaf7; --card:#ffffff; --rule:#d9d6cf;
  --close:#b5532a; --wide:#2a6a9a; --ok:#7d8f80; --fixed:#33393d; --band:#e3efe2; --accent:#4a6b3f; --cand:#7a2e8e; }
* { box-sizing: border-box; }
body { margin:0; background:var(--paper); color:var(--ink); font:15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif; }
header.top { background:#24343c; color:#f4f1ea; padding:18px 28px 14px; }
header.top h1 { margin:0; font-size:22px; font-weight:600; letter-spacing:.01em; }
header.top p { margin:4px 0 0; color:#cfd6d3; font-size:14px; }
header.top code { background:rgba(255,255,255,.12); color:#f4f1ea; }
main { max-width:1180px; margin:0 auto; padding:18px 24px 60px; }
section { margin:26px 0; }
h2 { font-size:18px; margin:0 0 8px; padding-bottom:4px; border-bottom:1px solid var(--rule); }
h3 { font-size:15px; margin:14px 0 6px; }
p.note, .note { color:var(--muted); font-size:13.5px; margin:4px 0 10px; }
.cards { display:grid; grid-template-columns:repeat(auto-fill, minmax(210px, 1fr)); gap:10px; }
.card { background:var(--card); border:1px solid var(--rule); border-radius:6px; padding:10px 12px; }
.card .k { color:var(--muted); font-size:12.5px; text-transform:uppercase; letter-spacing:.04em; }
.card .v { font-size:21px; font-weight:600; margin-top:2px; overflow-wrap:anywhere; }
.card .s { color:var(--muted); font-size:13px; overflow-wrap:anywhere; }
.badge { display:inline-block; font-size:11.5px; font-weight:600; padding:1px 6px; border-radius:9px; vertical-align:middle; }
.badge.assumed { background:#f6e7c8; color:#6d4a05; border:1px solid #e2c98e; }
.badge.observed { background:#dcebdc; color:#2f5230; border:1px solid #b5d0b5; }
.cautions { background:#fff6e6; border:1px solid #e7cf9f; border-left:5px solid #c9912b; border-radius:6px; padding:10px 16px; }
.cautions h2 { border:none; margin-bottom:2px; }
.cautions ul { margin:4px 0; padding-left:20px; }
ol.top-cands { margin:4px 0 0; padding-left:20px; }
svg.chart { width:100%; height:auto; max-width:900px; background:var(--card); border:1px solid var(--rule); border-radius:6px; }
svg text { font-family:inherit; fill:var(--ink); }
.tick, .axis-label, .marker-label, .band-label { font-size:11.5px; }
.tick, .axis-label { fill:var(--muted); }
.marker-label, .band-label { paint-order:stroke; stroke:#fff; stroke-width:3.5px; stroke-linejoin:round; }
.axis { stroke:#9aa3a6; stroke-width:1; }
.band { fill:var(--band); }
.band-label { fill:var(--accent); font-weight:600; }
.bar { fill:#a9b8ad; }
.bar.close { fill:var(--close); }
.bar.wide { fill:var(--wide); }
.opt-line { stroke:var(--accent); stroke-width:2; }
.median-line { stroke:var(--ink); stroke-width:1.5; stroke-dasharray:5 4; }
.curve { fill:none; stroke:var(--ink); stroke-width:2.2; }
.density { fill:var(--accent); }
.route-line { fill:none; stroke:#8c9aa0; stroke-width:2.5; stroke-linejoin:round; stroke-linecap:round; }
.strip-line { stroke:#8c9aa0; stroke-width:3; }
.gap-wide { stroke:var(--wide); stroke-width:7; stroke-opacity:.55; }
.gap-empty { stroke:var(--wide); stroke-width:7; stroke-opacity:.3; stroke-dasharray:6 4; }
.mk-close { fill:var(--close); }
.mk-wide { fill:var(--wide); }
.mk-ok { fill:#fff; stroke:var(--ok); stroke-width:2; }
.mk-fixed { fill:var(--fixed); }
.mk-tp { stroke:var(--fixed); stroke-width:1.5; }
g.stop:focus { outline:none; }
g.stop:focus > .shape, g.stop:hover > .shape { stroke:#f0b400; stroke-width:3; }
/* candidates (one purple, two shapes) and the optimiser's plan (ink crosses, green bars) */
.cand-ring { fill:none; stroke:var(--cand); stroke-width:2.5; }
.cand-add { fill:var(--cand); stroke:#fff; stroke-width:1; }
.cand-plus { stroke:#fff; stroke-width:2; }
.cand-label { fill:var(--cand); font-weight:600; }
g.cand:focus { outline:none; }
g.cand:focus > .shape circle, g.cand:hover > .shape circle { stroke:#f0b400; stroke-width:3.5; }
.plan-drop { stroke:var(--ink); stroke-width:1.8; pointer-events:none; }
.plan-keep { stroke:var(--accent); stroke-width:2; }
.pat-cands ul { margin:2px 0 6px; padding-left:20px; font-size:13.5px; }
nav.toc { display:flex; flex-wrap:wrap; gap:4px 14px; font-size:13.5px; margin:0 0 6px; }
details.route-index { margin:6px 0; }
details.route-index > summary { cursor:pointer; font-size:14px; }
details.route-index ul { columns:9rem; column-gap:14px; list-style:none; padding:4px 0; margin:0; font-size:13.5px; }
details.route-index li .s { color:var(--muted); font-size:12px; }
.legend { display:flex; flex-wrap:wrap; gap:14px; font-size:13px; color:var(--muted); margin:6px 0; align-items:center; }
.legend svg { vertical-align:middle; }
.controls { display:flex; flex-wrap:wrap; gap:12px; align-items:end; margin:8px 0; }
.controls label { font-size:13px; color:var(--muted); display:flex; flex-direction:column; gap:2px; }
select, input[type=search] { font:inherit; font-size:14px; padding:4px 6px; border:1px solid #b9b5ac; border-radius:4px; background:#fff; color:var(--ink); }
.table-wrap { overflow-x:auto; background:var(--card); border:1px solid var(--rule); border-radius:6px; max-height:560px; overflow-y:auto; }
table { border-collapse:collapse; width:100%; font-size:13.5px; }
th, td { padding:5px 8px; border-bottom:1px solid #ebe8e1; text-align:left; vertical-align:top; }
td.num, th.num { text-align:right; font-variant-numeric:tabular-nums; }
thead th { position:sticky; top:0; background:#f1efe9; z-index:1; }
th button { all:unset; cursor:pointer; font-weight:600; display:inline-flex; gap:4px; align-items:center; }
th button:focus-visible, summary:focus-visible, a:focus-visible, select:focus-visible, input:focus-visible { outline:3px solid #f0b400; outline-offset:2px; }
th[aria-sort=ascending] button::after { content:"▲"; font-size:10px; }
th[aria-sort=descending] button::after { content:"▼"; font-size:10px; }
tr:hover td { background:#f7f5ef; }
.neg { color:#2f5e2f; }
.pos { color:#8a3b1b; }
details.pattern { background:var(--card); border:1px solid var(--rule); border-radius:6px; margin:6px 0; }
details.pattern > summary { cursor:pointer; padding:8px 12px; font-weight:600; }
details.pattern > summary .s { font-weight:400; color:var(--muted); }
details.pattern .body { padding:4px 12px 12px; }
details.stop-list > summary { cursor:pointer; margin:8px 0 4px; color:var(--ink); font-size:14px; }
details.stop-list .table-wrap { max-height:420px; }
.strip-wrap { overflow-x:auto; }
.pat-grid { display:grid; grid-template-columns: minmax(260px, 430px) 1fr; gap:14px; align-items:start; }
@media (max-width:820px) { .pat-grid { grid-template-columns:1fr; } }
.info { min-height:1.5em; font-size:13.5px; background:#f4f2ec; border-radius:4px; padding:3px 8px; margin:4px 0; }
.kv { display:grid; grid-template-columns:auto 1fr; gap:2px 12px; font-size:13.5px; margin:0; }
.kv dt { color:var(--muted); }
.kv dd { margin:0; }
code { font-size:12.5px; background:#f1efe9; padding:0 3px; border-radius:3px; }
footer { color:var(--muted); font-size:12.5px; border-top:1px solid var(--rule); padding-top:10px; margin-top:30px; }
select, input[type=search] { max-width:100%; }
.controls label { max-width:100%; }
.chart-scroll { overflow-x:auto; }
button.show-more { font:inherit; font-size:13.5px; margin:6px 0; padding:4px 10px; border:1px solid #b9b5ac; border-radius:4px; background:#fff; color:var(--ink); cursor:pointer; }
button.show-more:focus-visible { outline:3px solid #f0b400; outline-offset:2px; }
a.pat-link { font-size:12.5px; white-space:nowrap; }
.table-wrap:focus-visible, .strip-wrap:focus-visible, .chart-scroll:focus-visible { outline:3px solid #f0b400; outline-offset:2px; }
@media (max-width:700px) {
  header.top { padding:12px 14px 10px; }
  header.top p { overflow-wrap:anywhere; }
  main { padding:12px 12px 40px; }
  /* below 700 px nothing's own width may widen the page, whatever fonts the browser has: grid tracks may
     shrink below their content, words break where they must, and a control takes the full row */
  .cards { grid-template-columns:minmax(0, 1fr) minmax(0, 1fr); }
  .card .v { font-size:18px; }
  .card .k, h1, h2, h3, h4, p, li, dt, dd, summary, .legend > * { overflow-wrap:anywhere; }
  .controls > * { min-width:0; }
  .controls label { flex:1 1 100%; }
  .controls select, .controls input[type=search] { width:100%; }
  .pat-grid > * { min-width:0; }
  .kv { grid-template-columns:1fr; }
  code { overflow-wrap:anywhere; }
  /* charts keep a readable width and scroll in their box; labels 14 units x (640 / 760) = 11.8 px */
  .chart-scroll > svg.chart { min-width:640px; }
  .strip-wrap > svg.chart.strip { width:auto; height:auto; } /* its own size (width and height attributes), scrolled in its box */
  svg.chart:not(.strip) .tick, svg.chart:not(.strip) .axis-label, svg.chart:not(.strip) .marker-label, svg.chart:not(.strip) .band-label { font-size:14px; }
}
@media print {
  @page { size:A4; margin:12mm 11mm; }
  body { background:#fff; font-size:10pt; line-height:1.35; }
  header.top { background:none; color:var(--ink); padding:0 0 4pt; border-bottom:1.5pt solid var(--ink); }
  header.top h1 { font-size:15pt; }
  header.top p, header.top code { color:var(--muted); background:none; font-size:8.5pt; }
  main { max-width:none; padding:0; }
  section { margin:10pt 0; }
  h2 { font-size:12.5pt; break-after:avoid; }
  h3 { break-after:avoid; }
  .controls, #cand-count, #pat-count, #pat-find-count, nav.toc, details.route-index, .legend, details.stop-list, input, select, button.show-more, a.pat-link, button::after { display:none !important; }
  th button { all:unset; font-weight:600; }
  /* the first page: headline cards, top candidates and the cautions; everything else starts on page 2 */
  .cards { grid-template-columns:repeat(4, 1fr); gap:5pt; }
  .card { padding:4pt 6pt; break-inside:avoid; }
  .card .v { font-size:12.5pt; }
  .card .s, .card .k { font-size:7.5pt; }
  .card .s { overflow-wrap:anywhere; }
  ol.top-cands { font-size:9.5pt; }
  .cautions { break-inside:avoid; font-size:9pt; padding:5pt 10pt; }
  #gaps { break-before:page; }
  svg.chart { max-width:100%; break-inside:avoid; }
  .chart-scroll, .strip-wrap, .table-wrap { overflow:visible !important; max-height:none !important; border:none; }
  .strip-wrap svg.chart.strip { width:100% !important; height:auto !important; }
  /* tables wrap to the page width instead of running off its right edge */
  table { table-layout:auto; width:100%; font-size:8pt; }
  th, td { padding:2pt 4pt; overflow-wrap:anywhere; word-break:break-word; }
  thead { display:table-header-group; }
  thead th { position:static; }
  tr { break-inside:avoid; }
  /* long tables print their first rows, as sorted on screen; the CSV files hold every row */
  #cand-table tbody tr:nth-child(n+41), #pat-table tbody tr:nth-child(n+41) { display:none; }
  #candidates .table-wrap::after, #patterns .table-wrap::after { content:"Printed: at most the first 40 rows, in the order shown on screen; candidates.csv and patterns.csv hold every row."; display:block; font-size:8pt; color:var(--muted); margin-top:3pt; }
  /* pattern sections: only those opened (their map and strip diagram drawn) are printed */
  details.pattern:not([open]) { display:none; }
  details.pattern { break-inside:avoid; border:none; }
  .pat-grid { grid-template-columns:55% 1fr; }
  a { color:inherit; text-decoration:none; }
}
`;
