// The comparison of two feeds rendered for people: a plain-text summary for the terminal, a
// self-contained HTML page (inline CSS, no scripts, no network; all feed text escaped), and the trips a
// day that changed per route and pattern as CSV.

import type { Comparison, PatternTripChange, RouteTripChange, SpacingPicture, StationLink } from '../compare/compare.js';
import { escapeHtml as esc } from '../common/escapeHtml.js';
import { renderCsv, type CsvColumn } from './csv.js';
import { terminalText as term } from '../common/terminalText.js';
const n1 = (v: number | null): string => (v === null ? '-' : v.toFixed(1));
const n0 = (v: number | null): string => (v === null ? '-' : Math.round(v).toString());
/** A change in percent with its sign, or 'new' for a route that had no trips. */
const pct = (v: number | null): string => (v === null ? 'new' : `${v > 0 ? '+' : ''}${v.toFixed(1)} %`);
/** A whole-number change with its sign: +12, -300, 0. */
const signed = (v: number): string => {
  const r = Math.round(v);
  return r > 0 ? `+${r}` : String(r === 0 ? 0 : r);
};
const routeName = (r: RouteTripChange): string => (r.shortName && r.shortName !== r.routeId ? `${r.routeId} (${r.shortName})` : r.routeId);
const idList = (ids: string[], count: number): string =>
  count === 0 ? '' : ids.join(' ') + (count > ids.length ? ` ... (${count} in all)` : '');
const span = (x: PatternTripChange, side: 'before' | 'after'): string => `${x.firstDeparture[side] ?? '-'}-${x.lastDeparture[side] ?? '-'}`;

const SPACING_ROWS: [string, keyof SpacingPicture, (v: number | null) => string][] = [
  ['patterns', 'patterns', n0],
  ['stops served', 'stopsServed', n0],
  ['trips per day', 'tripsPerDay', n0],
  ['median gap m', 'medianGapM', n1],
  ['close stops', 'closeStops', n0],
  ['wide gaps', 'wideGaps', n0],
  ['pax-min lost per day', 'paxMinLostPerDay', n0],
];

export function comparisonText(c: Comparison, options: { maxRows?: number } = {}): string {
  const { maxRows = 20 } = options;
  const out: string[] = [];
  out.push(`old ${term(c.old.source)} (${term(c.old.version) || 'no version'}, ${c.old.contentHash.slice(0, 8)})`);
  out.push(`new ${term(c.new.source)} (${term(c.new.version) || 'no version'}, ${c.new.contentHash.slice(0, 8)})`);
  out.push('');
  const s = c.stops;
  out.push(
    `stops: ${s.added.length} added, ${s.removed.length} removed, ${s.moved.length} moved more than ${c.moveThresholdM} m, ${s.renamed.length} renamed`,
  );
  const list = <T>(items: T[], fmt: (x: T) => string) => {
    for (const x of items.slice(0, maxRows)) out.push('  ' + term(fmt(x)));
    if (items.length > maxRows) out.push(`  ... and ${items.length - maxRows} more`);
  };
  list(s.added, (x) => `+ ${x.stopId}  ${x.name}`);
  list(s.removed, (x) => `- ${x.stopId}  ${x.name}`);
  list(s.moved, (x) => `~ ${x.stopId}  ${x.name}  moved ${x.movedM.toFixed(1)} m`);
  list(s.renamed, (x) => `" ${x.stopId}  ${x.oldName} -> ${x.newName}`);
  const p = c.patterns;
  const tp = c.trips.byPattern;
  out.push(
    `patterns: ${p.added.length} added, ${p.removed.length} removed, ${p.changed.length} changed, ${tp.length} with changed trips, ${p.unchanged} unchanged`,
  );
  list(p.added, (x) => `+ ${x.patternId}  ${x.headsign}  ${x.stopCount} stops, ${x.tripsPerDay} trips/day`);
  list(p.removed, (x) => `- ${x.patternId}  ${x.headsign}  ${x.stopCount} stops, ${x.tripsPerDay} trips/day`);
  list(
    p.changed,
    (x) =>
      `~ ${x.oldPatternId} -> ${x.newPatternId}${x.merged ? ' (merged)' : ''}` +
      (x.inserted.length ? `  inserted ${x.inserted.join(' ')}` : '') +
      (x.dropped.length ? `  dropped ${x.dropped.join(' ')}` : ''),
  );
  out.push(`trips per day: ${c.trips.byRoute.length} route(s) changed`);
  list(
    c.trips.byRoute,
    (r) => `${r.tripsAfter < r.tripsBefore ? '-' : '+'} route ${routeName(r)}  ${r.tripsBefore} -> ${r.tripsAfter} (${pct(r.changePct)})`,
  );
  list(
    tp,
    (x) =>
      `~ ${x.oldPatternId === x.newPatternId ? x.newPatternId : `${x.oldPatternId} -> ${x.newPatternId}`}  ${x.tripsBefore} -> ${x.tripsAfter} trips, ${span(x, 'before')} -> ${span(x, 'after')}` +
      (x.tripIdsAddedCount ? `  added ${idList(x.tripIdsAdded, x.tripIdsAddedCount)}` : '') +
      (x.tripIdsRemovedCount ? `  removed ${idList(x.tripIdsRemoved, x.tripIdsRemovedCount)}` : ''),
  );
  out.push('');
  out.push(`${'spacing'.padEnd(22)}${'before'.padStart(12)}${'after'.padStart(12)}`);
  for (const [label, key, f] of SPACING_ROWS) {
    out.push(`${label.padEnd(22)}${f(c.spacing.before[key]).padStart(12)}${f(c.spacing.after[key]).padStart(12)}`);
  }
  if (c.coverage) {
    const v = c.coverage;
    out.push(
      `coverage: people within a ${v.walkRadiusM} m walk of a stop served (land use ${term(v.file)}, ${n0(v.people)} people in all)`,
    );
    out.push(`${''.padEnd(22)}${'before'.padStart(12)}${'after'.padStart(12)}${'change'.padStart(12)}`);
    out.push(`${'people covered'.padEnd(22)}${n0(v.before).padStart(12)}${n0(v.after).padStart(12)}${signed(v.change).padStart(12)}`);
    for (const col of v.columns)
      out.push(
        `${term(`  ${col.name}`).padEnd(22)}${n0(col.before).padStart(12)}${n0(col.after).padStart(12)}${signed(col.change).padStart(12)}`,
      );
  }
  if (c.candidates) {
    out.push(`candidates: ${c.candidates.appeared.length} appeared, ${c.candidates.disappeared.length} disappeared`);
    list(c.candidates.appeared, (x) => `+ ${x.action} ${x.stopId || x.stopName}  ${x.netPaxMinPerDay.toFixed(0)} pax-min/day`);
    list(c.candidates.disappeared, (x) => `- ${x.action} ${x.stopId || x.stopName}`);
  } else {
    out.push('candidates: not compared (no audit of either version)');
  }
  if (c.stationLinks) {
    const why = (x: StationLink, side: string) => (x.reason === 'moved' ? `moved away ${side}` : `not served ${side}`);
    out.push(
      `links to other modes (stops beside a context station): ${c.stationLinks.lost.length} lost, ${c.stationLinks.gained.length} gained`,
    );
    list(c.stationLinks.lost, (x) => `- ${x.stopId}  ${x.name}  was beside ${x.station}; ${why(x, 'in the new version')}`);
    list(
      c.stationLinks.gained,
      (x) => `+ ${x.stopId}  ${x.name}  now beside ${x.station}; ${x.reason === 'moved' ? 'moved there' : 'not served in the old version'}`,
    );
  }
  return out.join('\n') + '\n';
}

export function comparisonHtml(c: Comparison): string {
  const table = (head: string[], rows: string[][]): string =>
    rows.length === 0
      ? '<p class="none">none</p>'
      : `<table><thead><tr>${head.map((h) => `<th>${esc(h)}</th>`).join('')}</tr></thead><tbody>${rows
          .map((r) => `<tr>${r.map((x) => `<td>${esc(x)}</td>`).join('')}</tr>`)
          .join('\n')}</tbody></table>`;
  const s = c.stops;
  const p = c.patterns;
  const sections = [
    `<h2>Stops added (${s.added.length})</h2>`,
    table(
      ['stop_id', 'name', 'lat', 'lon'],
      s.added.map((x) => [x.stopId, x.name, x.lat.toFixed(6), x.lon.toFixed(6)]),
    ),
    `<h2>Stops removed (${s.removed.length})</h2>`,
    table(
      ['stop_id', 'name', 'lat', 'lon'],
      s.removed.map((x) => [x.stopId, x.name, x.lat.toFixed(6), x.lon.toFixed(6)]),
    ),
    `<h2>Stops moved more than ${esc(String(c.moveThresholdM))} m (${s.moved.length})</h2>`,
    table(
      ['stop_id', 'name', 'moved m'],
      s.moved.map((x) => [x.stopId, x.name, x.movedM.toFixed(1)]),
    ),
    `<h2>Stops renamed (${s.renamed.length})</h2>`,
    table(
      ['stop_id', 'old name', 'new name'],
      s.renamed.map((x) => [x.stopId, x.oldName, x.newName]),
    ),
    `<h2>Patterns added (${p.added.length})</h2>`,
    table(
      ['pattern', 'headsign', 'stops', 'trips per day'],
      p.added.map((x) => [x.patternId, x.headsign, String(x.stopCount), String(x.tripsPerDay)]),
    ),
    `<h2>Patterns removed (${p.removed.length})</h2>`,
    table(
      ['pattern', 'headsign', 'stops', 'trips per day'],
      p.removed.map((x) => [x.patternId, x.headsign, String(x.stopCount), String(x.tripsPerDay)]),
    ),
    `<h2>Patterns changed (${p.changed.length}; ${p.unchanged} unchanged)</h2>`,
    table(
      ['old pattern', 'new pattern', 'inserted', 'dropped', 'merged'],
      p.changed.map((x) => [x.oldPatternId, x.newPatternId, x.inserted.join(' '), x.dropped.join(' '), x.merged ? 'yes' : '']),
    ),
    `<h2>Trips per day by route, where they changed (${c.trips.byRoute.length})</h2>`,
    table(
      ['route', 'short name', 'trips before', 'trips after', 'change'],
      c.trips.byRoute.map((r) => [r.routeId, r.shortName, String(r.tripsBefore), String(r.tripsAfter), pct(r.changePct)]),
    ),
    `<h2>Patterns whose trips changed (${c.trips.byPattern.length})</h2>`,
    table(
      [
        'old pattern',
        'new pattern',
        'trips before',
        'trips after',
        'departures before',
        'departures after',
        'trip_ids added',
        'trip_ids removed',
      ],
      c.trips.byPattern.map((x) => [
        x.oldPatternId,
        x.newPatternId,
        String(x.tripsBefore),
        String(x.tripsAfter),
        span(x, 'before'),
        span(x, 'after'),
        idList(x.tripIdsAdded, x.tripIdsAddedCount),
        idList(x.tripIdsRemoved, x.tripIdsRemovedCount),
      ]),
    ),
    '<h2>Spacing before and after</h2>',
    table(
      ['', 'before', 'after'],
      SPACING_ROWS.map(([label, key, f]) => [label, f(c.spacing.before[key]), f(c.spacing.after[key])]),
    ),
    ...(c.coverage
      ? [
          '<h2>Coverage before and after</h2>',
          `<p>People within a ${esc(String(c.coverage.walkRadiusM))} m walk of a stop served on each version, from the land-use layer ${esc(c.coverage.file)} (${esc(n0(c.coverage.people))} people in all).</p>`,
          table(
            ['', 'in the layer', 'covered before', 'covered after', 'change'],
            [
              ['people', n0(c.coverage.people), n0(c.coverage.before), n0(c.coverage.after), signed(c.coverage.change)],
              ...c.coverage.columns.map((col) => [
                `${col.name} (weight ${col.weight})`,
                n0(col.total),
                n0(col.before),
                n0(col.after),
                signed(col.change),
              ]),
            ],
          ),
        ]
      : []),
    '<h2>Candidates</h2>',
    c.candidates
      ? table(
          ['', 'action', 'stop', 'net pax-min per day'],
          [
            ...c.candidates.appeared.map((x) => ['appeared', x.action, x.stopId || x.stopName, x.netPaxMinPerDay.toFixed(0)]),
            ...c.candidates.disappeared.map((x) => ['disappeared', x.action, x.stopId || x.stopName, x.netPaxMinPerDay.toFixed(0)]),
          ],
        )
      : '<p class="none">not compared (no audit of either version)</p>',
    ...(c.stationLinks
      ? [
          `<h2>Links to other modes lost (${c.stationLinks.lost.length}) and gained (${c.stationLinks.gained.length})</h2>`,
          table(
            ['', 'stop_id', 'name', 'context station', 'why'],
            [
              ...c.stationLinks.lost.map((x) => [
                'lost',
                x.stopId,
                x.name,
                x.station,
                x.reason === 'moved' ? 'moved away' : 'not served in the new version',
              ]),
              ...c.stationLinks.gained.map((x) => [
                'gained',
                x.stopId,
                x.name,
                x.station,
                x.reason === 'moved' ? 'moved there' : 'not served in the old version',
              ]),
            ],
          ),
        ]
      : []),
  ];
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>stopspan: what changed between two feeds</title>
<style>
body{font:14px/1.4 system-ui,sans-serif;margin:2em;color:#222;max-width:70em}
table{border-collapse:collapse;margin-bottom:1em}td,th{border-bottom:1px solid #ddd;padding:3px 8px;text-align:left}
.none{color:#777}code{font-size:12px}
</style></head><body>
<h1>What changed between two feeds</h1>
<p>Old: ${esc(c.old.source)} (version ${esc(c.old.version || 'none')}, <code>${esc(c.old.contentHash.slice(0, 12))}</code>)<br>
New: ${esc(c.new.source)} (version ${esc(c.new.version || 'none')}, <code>${esc(c.new.contentHash.slice(0, 12))}</code>)</p>
${sections.join('\n')}
</body></html>
`;
}

/** One row of compare-trips.csv: a route's or a pattern's trips a day before and after. */
interface TripRow {
  level: 'route' | 'pattern';
  routeId: string;
  oldPatternId: string;
  newPatternId: string;
  tripsBefore: number;
  tripsAfter: number;
  changePct: number | null;
  added: number | null;
  removed: number | null;
  firstBefore: string | null;
  firstAfter: string | null;
  lastBefore: string | null;
  lastAfter: string | null;
}

const TRIP_COLUMNS: CsvColumn<TripRow>[] = [
  { name: 'level', kind: 'text', get: (r) => r.level },
  { name: 'route_id', kind: 'text', get: (r) => r.routeId },
  { name: 'old_pattern_id', kind: 'text', get: (r) => r.oldPatternId },
  { name: 'new_pattern_id', kind: 'text', get: (r) => r.newPatternId },
  { name: 'trips_before', kind: 'number', get: (r) => r.tripsBefore },
  { name: 'trips_after', kind: 'number', get: (r) => r.tripsAfter },
  { name: 'change_pct', kind: 'number', digits: 1, get: (r) => r.changePct },
  { name: 'trip_ids_added', kind: 'number', get: (r) => r.added },
  { name: 'trip_ids_removed', kind: 'number', get: (r) => r.removed },
  { name: 'first_departure_before', kind: 'text', get: (r) => r.firstBefore },
  { name: 'first_departure_after', kind: 'text', get: (r) => r.firstAfter },
  { name: 'last_departure_before', kind: 'text', get: (r) => r.lastBefore },
  { name: 'last_departure_after', kind: 'text', get: (r) => r.lastAfter },
];

/** compare-trips.csv: every route, then every pattern, whose trips a day changed. */
export function comparisonTripsCsv(c: Comparison): string {
  const rows: TripRow[] = [
    ...c.trips.byRoute.map((r): TripRow => ({
      level: 'route',
      routeId: r.routeId,
      oldPatternId: '',
      newPatternId: '',
      tripsBefore: r.tripsBefore,
      tripsAfter: r.tripsAfter,
      changePct: r.changePct,
      added: null,
      removed: null,
      firstBefore: null,
      firstAfter: null,
      lastBefore: null,
      lastAfter: null,
    })),
    ...c.trips.byPattern.map((x): TripRow => ({
      level: 'pattern',
      routeId: x.routeId,
      oldPatternId: x.oldPatternId,
      newPatternId: x.newPatternId,
      tripsBefore: x.tripsBefore,
      tripsAfter: x.tripsAfter,
      changePct: x.tripsBefore > 0 ? ((x.tripsAfter - x.tripsBefore) / x.tripsBefore) * 100 : null,
      added: x.tripIdsAddedCount,
      removed: x.tripIdsRemovedCount,
      firstBefore: x.firstDeparture.before,
      firstAfter: x.firstDeparture.after,
      lastBefore: x.lastDeparture.before,
      lastAfter: x.lastDeparture.after,
    })),
  ];
  return renderCsv(TRIP_COLUMNS, rows);
}
