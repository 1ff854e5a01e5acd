// The page's inline stylesheet: calm, legible, printable; system fonts only (no network).

export const PAGE_STYLE = `
:root { --ink:#1e2a31; --muted:#5b6870; --paper:#fbfaf7; --card:#ffffff; --rule:#d9d6cf;
  --close:#b5532a; --wide:#2a6a9a; --ok:#7d8f80; --fixed:#33393d; --band:#e3efe2; --accent:#4a6b3f; }
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
@media print { .controls, .table-wrap { max-height:none; } details.pattern { break-inside:avoid; } }
`;
