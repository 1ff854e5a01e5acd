// The history as a self-contained HTML page: one small inline-SVG line chart per figure that changed over
// the runs shown, x placed by run date, y spanning the values (from zero only when zero is near), one line
// per feed; then the table of runs. No scripts, no network; every piece of feed text is escaped.

import { escapeHtml } from '../common/escapeHtml.js';
import { feedKey, ranChecks, type RunRecord } from '../history/readHistory.js';

/** One figure over the runs: a value per run, null where the run did not measure it. */
export interface Series {
  title: string;
  values: (number | null)[];
}

/** Every figure of the runs, in page order; the caller drops those that do not vary. */
export function seriesOf(rows: RunRecord[]): Series[] {
  const codes = [...new Set(rows.flatMap((r) => Object.keys(r.findings)))].sort();
  const checked = (r: RunRecord, v: number) => (ranChecks(r) ? v : null);
  const out: Series[] = [
    { title: 'Patterns', values: rows.map((r) => r.headline.patterns) },
    { title: 'Stops served', values: rows.map((r) => r.headline.stops) },
    { title: 'Trips per day', values: rows.map((r) => r.headline.trips) },
    { title: 'Median gap between stops (m)', values: rows.map((r) => r.headline.medianGapM) },
    { title: 'Close stops', values: rows.map((r) => r.headline.closeStops) },
    { title: 'Wide gaps', values: rows.map((r) => r.headline.wideGaps) },
    { title: 'Passenger-minutes lost per day', values: rows.map((r) => r.headline.paxMinLostPerDay) },
    { title: 'Kinds of finding at error severity', values: rows.map((r) => checked(r, r.severities.error)) },
    { title: 'Kinds of finding at warning severity', values: rows.map((r) => checked(r, r.severities.warning)) },
  ];
  for (const code of codes)
    out.push({ title: `Finding ${code} (count)`, values: rows.map((r) => (ranChecks(r) ? (r.findings[code] ?? 0) : null)) });
  return out;
}

/** True when a series holds at least two different values (a flat line tells nothing a sentence cannot). */
export function varies(s: Series): boolean {
  const vals = s.values.filter((v): v is number => v !== null);
  return vals.some((v) => v !== vals[0]);
}

/** The y range: the values' span with a little room, from zero only when zero is nearer than the span itself. */
export function yRange(vals: number[]): { lo: number; hi: number } {
  let lo = Math.min(...vals);
  let hi = Math.max(...vals);
  if (lo === hi) return { lo: lo - 1, hi: hi + 1 };
  const span = hi - lo;
  if (lo >= 0 && lo <= span) lo = 0;
  else lo -= span * 0.1;
  hi += span * 0.1;
  return { lo, hi };
}

const DAY_MS = 86_400_000;
const dayOf = (iso: string): number => Date.parse(iso + 'T00:00:00Z') / DAY_MS;
const COLOURS = ['#1f6feb', '#c2410c', '#15803d', '#7e22ce', '#a16207', '#0e7490'];

/**
 * One line chart, width x height: x = run date (a day per unit, so runs a week apart sit a week apart),
 * y = yRange of the values; one polyline per feed, never joining runs of different feeds.
 */
export function lineChartSvg(series: Series, dates: string[], feeds: string[], width = 560, height = 170): string {
  const pad = { l: 64, r: 12, t: 24, b: 28 };
  const vals = series.values.filter((v): v is number => v !== null);
  if (vals.length === 0) return '';
  const { lo, hi } = yRange(vals);
  const days = dates.map(dayOf);
  const d0 = Math.min(...days);
  const d1 = Math.max(...days);
  const x = (i: number) => pad.l + (d1 === d0 ? (width - pad.l - pad.r) / 2 : ((days[i] - d0) * (width - pad.l - pad.r)) / (d1 - d0));
  const y = (v: number) => pad.t + (1 - (v - lo) / (hi - lo)) * (height - pad.t - pad.b);
  const order = [...new Set(feeds)];
  const lines: string[] = [];
  const dots: string[] = [];
  for (const [k, feed] of order.entries()) {
    const colour = COLOURS[k % COLOURS.length];
    const pts: string[] = [];
    series.values.forEach((v, i) => {
      if (v === null || feeds[i] !== feed) return;
      pts.push(`${x(i).toFixed(1)},${y(v).toFixed(1)}`);
      dots.push(
        `<circle cx="${x(i).toFixed(1)}" cy="${y(v).toFixed(1)}" r="3" fill="${colour}"><title>${escapeHtml(feed)}, ${escapeHtml(dates[i])}: ${escapeHtml(String(round(v)))}</title></circle>`,
      );
    });
    if (pts.length > 1) lines.push(`<polyline points="${pts.join(' ')}" class="ln" stroke="${colour}"/>`);
  }
  const fmt = (v: number) => escapeHtml(String(round(v)));
  const first = dates[days.indexOf(d0)];
  const last = dates[days.indexOf(d1)];
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="${escapeHtml(series.title)}">`,
    `<text x="${pad.l}" y="16" class="t">${escapeHtml(series.title)}</text>`,
    `<line x1="${pad.l}" y1="${height - pad.b}" x2="${width - pad.r}" y2="${height - pad.b}" class="ax"/>`,
    `<line x1="${pad.l}" y1="${pad.t}" x2="${pad.l}" y2="${height - pad.b}" class="ax"/>`,
    `<text x="${pad.l - 6}" y="${y(hi) + 4}" text-anchor="end">${fmt(hi)}</text>`,
    `<text x="${pad.l - 6}" y="${y(lo) + 4}" text-anchor="end">${fmt(lo)}</text>`,
    `<text x="${pad.l}" y="${height - 8}" text-anchor="start">${escapeHtml(first)}</text>`,
    d1 > d0 ? `<text x="${width - pad.r}" y="${height - 8}" text-anchor="end">${escapeHtml(last)}</text>` : '',
    ...lines,
    ...dots,
    '</svg>',
  ].join('');
}

function round(v: number): number {
  return Math.abs(v) >= 100 ? Math.round(v) : Math.round(v * 10) / 10;
}

export function historyHtml(rows: RunRecord[], options: { title?: string } = {}): string {
  const { title = 'stopspan: history of runs' } = options;
  const dates = rows.map((r) => r.runDate);
  const feeds = rows.map(feedKey);
  const all = rows.length ? seriesOf(rows) : [];
  const shown = all.filter(varies);
  const flat = all.filter((s) => !varies(s) && s.values.some((v) => v !== null));
  const order = [...new Set(feeds)];
  const legend =
    order.length > 1
      ? `<p class="legend">${order.map((f, k) => `<span style="color:${COLOURS[k % COLOURS.length]}">&#9679;</span> ${escapeHtml(f)}`).join(' &nbsp; ')}</p>`
      : '';
  const charts = !rows.length
    ? '<p>No runs recorded yet.</p>'
    : (shown.length
        ? legend + shown.map((s) => `<figure>${lineChartSvg(s, dates, feeds)}</figure>`).join('\n')
        : '<p>No figure changed over these runs.</p>') +
      (flat.length
        ? `\n<p class="flat">The same in every run: ${flat.map((s) => `${escapeHtml(s.title)} ${escapeHtml(String(round(s.values.find((v): v is number => v !== null)!)))}`).join('; ')}.</p>`
        : '');
  const cell = (r: RunRecord, v: number) => (ranChecks(r) ? String(v) : '');
  const tr = rows
    .map(
      (r) =>
        `<tr><td>${escapeHtml(r.runDate)}</td><td>${escapeHtml(r.command)}</td><td>${escapeHtml(feedKey(r))}</td><td>${escapeHtml(r.feed.version)}</td>` +
        `<td><code>${escapeHtml(r.feed.contentHash.slice(0, 12))}</code></td><td>${escapeHtml(r.headline.analysisDate ?? '')}</td>` +
        `<td class="n">${r.headline.medianGapM === null ? '' : r.headline.medianGapM.toFixed(1)}</td>` +
        `<td class="n">${cell(r, r.severities.error)}</td><td class="n">${cell(r, r.severities.warning)}</td><td class="n">${cell(r, r.severities.info)}</td></tr>`,
    )
    .join('\n');
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)}</title>
<style>
body{font:14px/1.4 system-ui,sans-serif;margin:2em;color:#222}
figure{display:inline-block;margin:0 1em 1em 0}
svg text{font-size:11px;fill:#444}svg text.t{font-size:13px;fill:#222;font-weight:600}
.ax{stroke:#999}.ln{fill:none;stroke-width:2}.flat,.legend{color:#555}
table{border-collapse:collapse}td,th{border-bottom:1px solid #ddd;padding:3px 8px;text-align:left}.n{text-align:right}
</style></head><body>
<h1>${escapeHtml(title)}</h1>
<p>${rows.length} run(s)${rows.length ? `, ${escapeHtml(rows[0].runDate)} to ${escapeHtml(rows[rows.length - 1].runDate)}` : ''}${order.length > 1 ? `, ${order.length} feeds` : ''}. Runs are placed by run date (the date a check judged the feed against, the date an audit analysed); errors and warnings are blank for runs that ran no feed checks.</p>
${charts}
<h2>Runs</h2>
<table><thead><tr><th>run date</th><th>command</th><th>feed</th><th>feed version</th><th>content hash</th><th>analysis date</th><th>median gap m</th><th>errors</th><th>warnings</th><th>info</th></tr></thead>
<tbody>
${tr}
</tbody></table>
</body></html>
`;
}
