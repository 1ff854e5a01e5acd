// The what-if page: one self-contained HTML file (inline style and SVG, no script, no network) showing a
// scenario's figures per affected pattern and in total, a before/after strip diagram per pattern, the
// sensitivity, assumptions and cautions. Every piece of feed and scenario text is escaped.

import type { ScenarioPatternEffect, ScenarioResult } from '../whatif/whatif.js';
import { changesNearStations } from '../model/scenario.js';
import { escapeHtml as h } from '../common/escapeHtml.js';
import { PAGE_STYLE } from './html/pageStyle.js';
import { checkUnits, formatShortDistance, type Units } from './units.js';
import type { StripStop, WhatifStrip } from './whatifStrips.js';

export interface WhatifHtmlOptions {
  feedSource?: string;
  units?: Units;
}

const STRIP_STYLE = `
.wf-strip .row-label { font-size:12px; fill:var(--muted); }
.wf-strip .kept { fill:#fff; stroke:var(--fixed); stroke-width:1.5; }
.wf-strip .removed { stroke:var(--close); stroke-width:2.5; }
.wf-strip .moved { fill:var(--wide); }
.wf-strip .added { fill:var(--accent); }
.wf-strip .gap-over { stroke:var(--close); stroke-width:5; stroke-opacity:.35; }
table.wf { border-collapse:collapse; font-size:14px; background:var(--card); }
table.wf th, table.wf td { border:1px solid var(--rule); padding:4px 8px; text-align:right; }
table.wf th:first-child, table.wf td:first-child { text-align:left; }
.net-save { color:var(--accent); font-weight:600; }
.net-cost { color:var(--close); font-weight:600; }
`;

const fmt0 = (v: number): string => (Number.isFinite(v) ? Math.round(v).toLocaleString('en-US') : '–');
const fmt1 = (v: number): string =>
  Number.isFinite(v) ? (Math.round(v * 10) / 10).toLocaleString('en-US', { minimumFractionDigits: 1 }) : '–';
const fmt2 = (v: number): string => (Number.isFinite(v) ? (Math.abs(v) < 0.005 ? 0 : v).toFixed(2) : '–');
const pct = (v: number): string => (Number.isFinite(v) ? `${(v * 100).toFixed(1)} %` : '–');

/** An inline SVG strip diagram: today's stops on the upper line, the stops after the change below. */
export function whatifStripSvg(strip: WhatifStrip, maxGapM: number, units: Units = 'metric'): string {
  const W = 900;
  const H = 96;
  const left = 60;
  const right = 14;
  const all = [...strip.before, ...strip.after].map((s) => s.posM);
  const lo = Math.min(0, ...all);
  const hi = Math.max(strip.lengthM, ...all, lo + 1);
  const x = (m: number): string => (left + ((m - lo) / (hi - lo)) * (W - left - right)).toFixed(1);
  const rows: [string, number, StripStop[]][] = [
    ['Today', 32, strip.before],
    ['After', 72, strip.after],
  ];
  const parts: string[] = [];
  for (const [label, y, stops] of rows) {
    parts.push(`<text class="row-label" x="4" y="${y + 4}">${label}</text>`);
    parts.push(`<line class="strip-line" x1="${x(lo)}" x2="${x(hi)}" y1="${y}" y2="${y}"/>`);
    const served = stops.filter((s) => s.change !== 'removed');
    for (let i = 0; i + 1 < served.length; i++) {
      const gapM = served[i + 1].posM - served[i].posM;
      if (gapM > maxGapM) {
        parts.push(
          `<line class="gap-over" x1="${x(served[i].posM)}" x2="${x(served[i + 1].posM)}" y1="${y}" y2="${y}"><title>${h(`gap ${formatShortDistance(gapM, units)}, above the policy's ${formatShortDistance(maxGapM, units)}`)}</title></line>`,
        );
      }
    }
    for (const s of stops) {
      const tip = `<title>${h(`${s.name}${s.stopId ? ` (${s.stopId})` : ''}: ${s.change}, ${formatShortDistance(s.posM, units)} along`)}</title>`;
      if (s.change === 'removed') {
        const cx = Number(x(s.posM));
        parts.push(
          `<g class="removed">${tip}<line x1="${cx - 5}" x2="${cx + 5}" y1="${y - 5}" y2="${y + 5}"/><line x1="${cx - 5}" x2="${cx + 5}" y1="${y + 5}" y2="${y - 5}"/></g>`,
        );
      } else {
        parts.push(`<circle class="${s.change}" cx="${x(s.posM)}" cy="${y}" r="${s.change === 'kept' ? 4 : 5.5}">${tip}</circle>`);
      }
    }
  }
  const aria = `Strip diagram of route ${strip.routeLabel} pattern ${strip.patternId}: ${strip.before.length} stops today, ${strip.after.length} after`;
  return `<svg class="chart strip wf-strip" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${h(aria)}">${parts.join('')}</svg>`;
}

type Row = [string, (e: ScenarioPatternEffect | null, t: ScenarioResult['totals']) => string];

function rows(maxGapM: number, units: Units): Row[] {
  const gap = (a: number, b: number): string =>
    `${formatShortDistance(a, units)} → ${formatShortDistance(b, units)}${b > maxGapM && b > a ? ' (over policy)' : ''}`;
  return [
    ['Riders whose stop changes, per day', (e, t) => fmt0((e ?? t).ridersAffectedPerDay)],
    ['Walk added, passenger-minutes per day', (e, t) => fmt0((e ?? t).walkAddedPaxMinPerDay)],
    ['Walk saved, passenger-minutes per day', (e, t) => fmt0((e ?? t).walkSavedPaxMinPerDay)],
    ['Ride time saved (riders on board), passenger-minutes per day', (e, t) => fmt0((e ?? t).rideSavedPaxMinPerDay)],
    ["Neighbours' extra stopping, passenger-minutes per day", (e, t) => fmt0((e ?? t).neighboursExtraPaxMinPerDay)],
    ['Net, passenger-minutes per day (negative: riders save)', (e, t) => fmt0((e ?? t).netPaxMinPerDay)],
    ['Run time saved per trip, s', (e, t) => fmt1((e ?? t).runTimeSavedPerTripS)],
    ['Vehicle-hours saved per day', (e, t) => fmt2((e ?? t).vehicleHoursPerDay)],
    [
      `Largest gap before → after (policy ${formatShortDistance(maxGapM, units)})`,
      (e, t) => gap((e ?? t).largestGapBeforeM, (e ?? t).largestGapAfterM),
    ],
    ["Share of length within the policy's walk, before → after", (e) => (e ? `${pct(e.coverageBefore)} → ${pct(e.coverageAfter)}` : '–')],
  ];
}

/** The what-if page for a result, with its strips (whatifStrips) and the feed it was computed on. */
export function whatifHtml(result: ScenarioResult, strips: WhatifStrip[], options: WhatifHtmlOptions = {}): string {
  const { feedSource = '', units = 'metric' } = options;
  checkUnits(units);
  const maxGapM = Number(result.params.max_gap_m?.value ?? 800);
  const t = result.totals;
  const net = t.netPaxMinPerDay;
  const assumed = result.patterns.some((e) => e.demandSource !== 'observed');
  const tag = assumed ? ' <span class="badge assumed">assumed demand</span>' : '';
  const stripBy = new Map(strips.map((s) => [s.patternId, s]));
  const label = (e: ScenarioPatternEffect): string => {
    const s = stripBy.get(e.patternId);
    return s ? `Route ${s.routeLabel}${s.headsign ? ` to ${s.headsign}` : ''} (${e.patternId})` : e.patternId;
  };
  const rs = rows(maxGapM, units);
  const table = `<table class="wf"><thead><tr><th></th>${result.patterns.map((e) => `<th>${h(label(e))}</th>`).join('')}<th>Total</th></tr></thead><tbody>
<tr><td>Trips per day</td>${result.patterns.map((e) => `<td>${fmt0(e.tripsPerDay)}</td>`).join('')}<td>${fmt0(result.patterns.reduce((s, e) => s + e.tripsPerDay, 0))}</td></tr>
<tr><td>Stops removed / moved / added</td>${result.patterns.map((e) => `<td>${e.removedStopIds.length} / ${e.movedStopIds.length} / ${e.addedCount}</td>`).join('')}<td></td></tr>
${rs.map(([name, f]) => `<tr><td>${h(name)}</td>${result.patterns.map((e) => `<td>${h(f(e, t))}</td>`).join('')}<td>${h(f(null, t))}</td></tr>`).join('\n')}
</tbody></table>`;
  const stripsHtml = result.patterns
    .map((e) => {
      const s = stripBy.get(e.patternId);
      if (!s) return '';
      const changed = s.before.filter((x) => x.change !== 'kept').map((x) => `${x.name} (${x.stopId}): ${x.change}`);
      const added = s.after.filter((x) => x.change === 'added').map((x) => `${x.name}: added at ${formatShortDistance(x.posM, units)}`);
      return `<h3>${h(label(e))}</h3>
${whatifStripSvg(s, maxGapM, units)}
<p class="note">${h([...changed, ...added].join('; '))}</p>`;
    })
    .join('\n');
  const bus = t.runTimeSavedPerTripS;
  const headline =
    `${net <= 0 ? 'Riders save' : 'Riders lose'} ${fmt0(Math.abs(net))} passenger-minutes a day in total; ` +
    `buses ${bus >= 0 ? 'save' : 'lose'} ${fmt1(Math.abs(bus))} s per trip (${fmt2(Math.abs(t.vehicleHoursPerDay))} vehicle-hours a day).`;
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>stopspan what-if: ${h(feedSource)} on ${h(result.date)}</title>
<style>${PAGE_STYLE}${STRIP_STYLE}</style>
</head>
<body>
<header class="top"><h1>What if: ${t.patternsAffected} pattern${t.patternsAffected === 1 ? '' : 's'} changed</h1><p><code>${h(feedSource)}</code> on ${h(result.date)}</p></header>
<main>
<section id="headline" aria-labelledby="headline-h">
<h2 id="headline-h">The answer</h2>
<p class="${net <= 0 ? 'net-save' : 'net-cost'}">${h(headline)}${tag}</p>
<p class="note">Sensitivity, net passenger-minutes per day: ${h(result.sensitivity.map((s) => `${s.label}: ${fmt0(s.netPaxMinPerDay)}`).join('; '))}.</p>${
    result.landUse
      ? `\n<p class="note">Land use: ${h(fmt0(result.landUse.peopleCoveredBefore))} of ${h(fmt0(result.landUse.people))} people within a walk of a stop before the change, ${h(fmt0(result.landUse.peopleCoveredAfter))} after.</p>`
      : ''
  }
</section>
<section class="cautions" id="cautions" aria-labelledby="cautions-h">
<h2 id="cautions-h">Before acting on this scenario</h2>
<ul>${changesNearStations(result)
    .map(
      (x) =>
        `<li class="near-station">${h(`${x.stopName || x.stopId} (${x.stopId}) ${x.action === 'remove' ? 'removed' : 'moved'} beside ${x.nearStation}: a transfer point to another mode, which the audit keeps.`)}</li>`,
    )
    .join('')}${result.cautions.map((c) => `<li>${h(c)}</li>`).join('')}</ul>
</section>
<section id="figures" aria-labelledby="figures-h">
<h2 id="figures-h">Per pattern and in total</h2>
<div class="strip-wrap">${table}</div>
</section>
<section id="strips" aria-labelledby="strips-h">
<h2 id="strips-h">Before and after</h2>
<p class="note">Open circles are stops kept, crosses stops removed, blue dots moved stops, green dots added stops; a shaded stretch is a gap above the walking policy.</p>
${stripsHtml}
</section>
<section id="assumptions" aria-labelledby="assumptions-h">
<h2 id="assumptions-h">Assumptions</h2>
<ul>${result.assumptions.map((a) => `<li>${h(a)}</li>`).join('')}</ul>
<p class="note">${result.warnings.length} feed warning${result.warnings.length === 1 ? '' : 's'}${result.warnings.length ? ': ' + h(result.warnings.map((w) => `${w.code} (${w.count})`).join(', ')) : ''}.</p>
</section>
</main>
</body>
</html>
`;
}
