// The history as a self-contained HTML page: one small inline-SVG line chart per figure, and the table
// of runs. No scripts, no network; every piece of feed text is escaped.

import { escapeHtml } from '../report/html/escape.js';
import type { RunRecord } from './readHistory.js';


interface Series {
  title: string;
  values: (number | null)[];
}

function seriesOf(rows: RunRecord[]): Series[] {
  const codes = [...new Set(rows.flatMap((r) => Object.keys(r.findings)))].sort();
  const out: Series[] = [
    { title: 'Median gap between stops (m)', values: rows.map((r) => r.headline.medianGapM) },
    { title: 'Close stops', values: rows.map((r) => r.headline.closeStops) },
    { title: 'Wide gaps', values: rows.map((r) => r.headline.wideGaps) },
    { title: 'Passenger-minutes lost per day', values: rows.map((r) => r.headline.paxMinLostPerDay) },
    { title: 'Kinds of finding at error severity', values: rows.map((r) => r.severities.error) },
    { title: 'Kinds of finding at warning severity', values: rows.map((r) => r.severities.warning) },
  ];
  for (const code of codes) out.push({ title: `Finding ${code} (count)`, values: rows.map((r) => r.findings[code] ?? null) });
  return out.filter((s) => s.values.some((v) => v !== null));
}

/** One line chart, width x height, x = run order, y from 0 (or the minimum if negative) to the maximum. */
export function lineChartSvg(series: Series, labels: string[], width = 560, height = 160): string {
  const pad = { l: 56, r: 12, t: 24, b: 28 };
  const vals = series.values.filter((v): v is number => v !== null);
  const lo = Math.min(0, ...vals);
  const hi0 = Math.max(...vals);
  const hi = hi0 === lo ? lo + 1 : hi0;
  const n = series.values.length;
  const x = (i: number) => pad.l + (n === 1 ? (width - pad.l - pad.r) / 2 : (i * (width - pad.l - pad.r)) / (n - 1));
  const y = (v: number) => pad.t + (1 - (v - lo) / (hi - lo)) * (height - pad.t - pad.b);
  const pts: string[] = [];
  const dots: string[] = [];
  series.values.forEach((v, i) => {
    if (v === null) return;
    pts.push(`${x(i).toFixed(1)},${y(v).toFixed(1)}`);
    dots.push(`<circle cx="${x(i).toFixed(1)}" cy="${y(v).toFixed(1)}" r="3"><title>${escapeHtml(labels[i])}: ${escapeHtml(String(round(v)))}</title></circle>`);
  });
  const fmt = (v: number) => escapeHtml(String(round(v)));
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="${escapeHtml(series.title)}">`,
    `<text x="${pad.l}" y="16" class="t">${escapeHtml(series.title)}</text>`,
    `<line x1="${pad.l}" y1="${height - pad.b}" x2="${width - pad.r}" y2="${height - pad.b}" class="ax"/>`,
    `<line x1="${pad.l}" y1="${pad.t}" x2="${pad.l}" y2="${height - pad.b}" class="ax"/>`,
    `<text x="${pad.l - 6}" y="${y(hi) + 4}" text-anchor="end">${fmt(hi)}</text>`,
    `<text x="${pad.l - 6}" y="${y(lo) + 4}" text-anchor="end">${fmt(lo)}</text>`,
    `<text x="${x(0)}" y="${height - 8}" text-anchor="start">${escapeHtml(labels[0] ?? '')}</text>`,
    n > 1 ? `<text x="${x(n - 1)}" y="${height - 8}" text-anchor="end">${escapeHtml(labels[n - 1])}</text>` : '',
    pts.length > 1 ? `<polyline points="${pts.join(' ')}" class="ln"/>` : '',
    ...dots,
    '</svg>',
  ].join('');
}

function round(v: number): number {
  return Math.abs(v) >= 100 ? Math.round(v) : Math.round(v * 10) / 10;
}

export function historyHtml(rows: RunRecord[], options: { title?: string } = {}): string {
  const { title = 'stopspan: history of runs' } = options;
  const labels = rows.map((r) => r.runDate);
  const charts = rows.length ? seriesOf(rows).map((s) => `<figure>${lineChartSvg(s, labels)}</figure>`).join('\n') : '<p>No runs recorded yet.</p>';
  const tr = rows
    .map((r) =>
      `<tr><td>${escapeHtml(r.runDate)}</td><td>${escapeHtml(r.command)}</td><td>${escapeHtml(r.feed.version)}</td>` +
      `<td><code>${escapeHtml(r.feed.contentHash.slice(0, 12))}</code></td><td>${escapeHtml(r.feed.source)}</td>` +
      `<td class="n">${r.headline.medianGapM === null ? '' : r.headline.medianGapM.toFixed(1)}</td>` +
      `<td class="n">${r.severities.error}</td><td class="n">${r.severities.warning}</td><td class="n">${r.severities.info}</td></tr>`,
    )
    .join('\n');
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)}</title>
<style>
body{font:14px/1.4 system-ui,sans-serif;margin:2em;color:#222}
figure{display:inline-block;margin:0 1em 1em 0}
svg text{font-size:11px;fill:#444}svg text.t{font-size:13px;fill:#222;font-weight:600}
.ax{stroke:#999}.ln{fill:none;stroke:#1f6feb;stroke-width:2}circle{fill:#1f6feb}
table{border-collapse:collapse}td,th{border-bottom:1px solid #ddd;padding:3px 8px;text-align:left}.n{text-align:right}
</style></head><body>
<h1>${escapeHtml(title)}</h1>
<p>${rows.length} run(s)${rows.length ? `, ${escapeHtml(rows[0].runDate)} to ${escapeHtml(rows[rows.length - 1].runDate)}` : ''}.</p>
${charts}
<h2>Runs</h2>
<table><thead><tr><th>run date</th><th>command</th><th>feed version</th><th>content hash</th><th>source</th><th>median gap m</th><th>errors</th><th>warnings</th><th>info</th></tr></thead>
<tbody>
${tr}
</tbody></table>
</body></html>
`;
}
