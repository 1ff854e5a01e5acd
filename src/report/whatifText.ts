// The what-if result as plain text for a terminal: one table of figures with a column per affected
// pattern and a total column (wrapped into blocks when there are many patterns), the sensitivity line,
// the largest gaps against the walking policy, and the cautions. Feed text goes through terminalText, so it
// cannot move the cursor, break lines or reorder them.

import { terminalText as safe } from '../common/terminalText.js';
import type { ScenarioPatternEffect, ScenarioResult, ScenarioTotals, StopChange } from '../whatif/whatif.js';
import { changesNearStations } from '../model/scenario.js';
import { groupedFixed } from './numberText.js';
import { checkUnits, metresToFeet, type Units } from './units.js';

export interface WhatifTextOptions {
  feedSource?: string;
  /** What each pattern is (e.g. "route 1 to Eastgate"), listed under the table whose columns are pattern ids. */
  labels?: Map<string, string>;
  columnsPerBlock?: number;
  /** Route short names by route_id, for the fleet lines. */
  routeNames?: Map<string, string>;
  width?: number;
  /** Distances in metres (default) or feet; the figures in passenger-minutes and seconds are the same. */
  units?: Units;
}

const n0 = (v: number): string => (Number.isFinite(v) ? groupedFixed(Math.round(v)) : '-');
const n1 = (v: number): string => (Number.isFinite(v) ? v.toFixed(1) : '-');
const n2 = (v: number): string => (Number.isFinite(v) ? (Math.abs(v) < 0.005 ? 0 : v).toFixed(2) : '-');
const pc = (v: number): string => (Number.isFinite(v) ? `${(v * 100).toFixed(1)}%` : '-');

function wrap(text: string, width: number): string[] {
  const out: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/).filter(Boolean)) {
    if (line && line.length + 1 + word.length > width) {
      out.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) out.push(line);
  return out;
}

/** A rider count as people quote it: two significant figures above 100. */
function roundRiders(v: number): number {
  if (!(v > 100)) return Math.round(v);
  const p = 10 ** (Math.floor(Math.log10(v)) - 1);
  return Math.round(v / p) * p;
}

type Cell = (e: ScenarioPatternEffect | null, t: ScenarioTotals) => string;

/** The result as terminal text (ends with a newline). */
export function whatifText(result: ScenarioResult, options: WhatifTextOptions = {}): string {
  const { feedSource = '', labels = new Map(), columnsPerBlock = 4, width = 100, routeNames } = options;
  const units = checkUnits(options.units ?? 'metric');
  const unit = units === 'imperial' ? 'ft' : 'm';
  const dist = (m: number): string => n0(units === 'imperial' ? metresToFeet(m) : m);
  const maxGapM = result.maxGapM;
  const t = result.totals;
  const w = n1(result.walkWeight);
  const newGap = (changes: StopChange[]): string => {
    const g = Math.max(0, ...changes.flatMap((c) => c.gapsAfterM));
    return g > 0 ? `${dist(g)}${changes.some((c) => c.overPolicy) ? ' !' : ''}` : '-';
  };
  const gapText = (gs: number[]): string => gs.map((g) => dist(g)).join(' + ');
  const rows: [string, Cell][] = [
    ['trips per day', (e) => (e ? n0(e.tripsPerDay) : n0(result.patterns.reduce((s, x) => s + x.tripsPerDay, 0)))],
    ['stops removed/moved/added', (e) => (e ? `${e.removedStopIds.length}/${e.movedStopIds.length}/${e.addedCount}` : '')],
    ['riders whose stop changes /day', (e) => n0((e ?? t).ridersAffectedPerDay)],
    ['walk added, real minutes/day', (e) => n0((e ?? t).walkAddedMinPerDay)],
    [`walk added, pax-min/day (x${w} walk weight)`, (e) => n0((e ?? t).walkAddedPaxMinPerDay)],
    ['walk saved, pax-min/day', (e) => n0((e ?? t).walkSavedPaxMinPerDay)],
    ['ride time saved, pax-min/day', (e) => n0((e ?? t).rideSavedPaxMinPerDay)],
    ["neighbours' extra stopping, pax-min/day", (e) => n0((e ?? t).neighboursExtraPaxMinPerDay)],
    ['net, pax-min/day (- = riders save)', (e) => n0((e ?? t).netPaxMinPerDay)],
    ['run time saved per trip, s', (e) => n1((e ?? t).runTimeSavedPerTripS)],
    ['vehicle-hours saved per day', (e) => n2((e ?? t).vehicleHoursPerDay)],
    [
      `widest gap a change makes, ${unit} (policy ${dist(maxGapM)})`,
      (e) => newGap(e ? e.changes : result.patterns.flatMap((x) => x.changes)),
    ],
    [
      `within ${dist(maxGapM / 2)} ${unit} of a stop, before -> after`,
      (e) => (e ? `${pc(e.coverageBefore)} -> ${pc(e.coverageAfter)}` : ''),
    ],
    ['demand', (e) => (e ? e.demandSource : '')],
  ];
  const columns: { head: string; e: ScenarioPatternEffect | null }[] = [
    ...result.patterns.map((e) => ({ head: safe(e.patternId), e })),
    { head: 'total', e: null },
  ];
  const labelW = Math.max(...rows.map(([l]) => l.length));
  const lines: string[] = [];
  const assumed = result.patterns.some((e) => e.demandSource !== 'observed');
  const modelled = result.patterns.some((e) => e.demandSource === 'land-use')
    ? ' (demand assumed and placed by land use, not counted)'
    : ' (demand assumed, not counted)';
  lines.push(
    `what-if on ${safe(feedSource)} for ${result.date}: ${t.patternsAffected} pattern${t.patternsAffected === 1 ? '' : 's'} affected${assumed ? modelled : ''}`,
  );
  for (let b = 0; b < columns.length; b += columnsPerBlock) {
    const block = columns.slice(b, b + columnsPerBlock);
    const cells = block.map((c) => rows.map(([, f]) => f(c.e, t)));
    const widths = block.map((c, i) => Math.max(c.head.length, ...cells[i].map((s) => s.length)));
    lines.push('');
    lines.push(`${''.padEnd(labelW)}  ${block.map((c, i) => c.head.padStart(widths[i])).join('  ')}`);
    rows.forEach(([label], r) => lines.push(`${label.padEnd(labelW)}  ${block.map((_, i) => cells[i][r].padStart(widths[i])).join('  ')}`));
  }
  lines.push('');
  for (const e of result.patterns) {
    const what = labels.get(e.patternId);
    lines.push(safe(`${e.patternId}: ${what ?? ''}`));
    for (const c of e.changes) {
      const verb = c.action === 'remove' ? 'removes' : c.action === 'move' ? 'moves' : 'adds a stop';
      const who = c.stopId ? ` ${c.stopId} ${c.stopName}` : '';
      const gaps =
        c.action === 'add'
          ? `splits a ${gapText(c.gapsBeforeM)} ${unit} gap into ${gapText(c.gapsAfterM)} ${unit}`
          : `gaps ${gapText(c.gapsBeforeM)} ${unit} become ${gapText(c.gapsAfterM)} ${unit}`;
      const policy = c.gapsAfterM.some((g) => g > maxGapM)
        ? c.overPolicy
          ? `above the ${dist(maxGapM)} ${unit} policy !`
          : `above the ${dist(maxGapM)} ${unit} policy, as before`
        : `within the ${dist(maxGapM)} ${unit} policy`;
      lines.push(safe(`  ${verb}${who}: ${gaps}, ${policy}${c.nearStation ? `; beside ${c.nearStation} !` : ''}`));
    }
  }
  lines.push('');
  if (t.walkAddedPerRiderM > 0) {
    lines.push(
      `walking: each of about ${n0(roundRiders(t.ridersAffectedPerDay))} riders a day whose stop changes walks about ${dist(t.walkAddedPerRiderM)} ${unit}, ${n0(t.walkAddedPerRiderS)} s, further on average; ` +
        `${n0(t.walkAddedMinPerDay)} real minutes a day in all, counted as ${n0(t.walkAddedPaxMinPerDay)} passenger-minutes at walk weight ${w}`,
    );
  }
  const net = t.netPaxMinPerDay;
  const bus = t.runTimeSavedPerTripS;
  lines.push(
    `net: riders ${net <= 0 ? 'save' : 'lose'} ${n0(Math.abs(net))} passenger-minutes a day; buses ${bus >= 0 ? 'save' : 'lose'} ${n1(Math.abs(bus))} s per trip, ` +
      `${n2(Math.abs(t.vehicleHoursPerDay))} vehicle-hours a day`,
  );
  for (const f of result.fleet) {
    if (!(f.runTimeSavedPerRoundTripS > 0)) continue;
    const route = safe(routeNames?.get(f.routeId) ?? f.routeId);
    const head = `fleet, route ${route}: ${n0(f.runTimeSavedPerRoundTripS)} s saved per round trip of ${n1(f.roundTripS / 60)} min`;
    if (f.peakHeadwayS === null || f.headwaySameFleetS === null) {
      lines.push(`${head} (too few trips for a headway)`);
      continue;
    }
    const cost = f.operatingCostSavedPerDay !== null ? `; operating cost saved ${n0(f.operatingCostSavedPerDay)} a day` : '';
    lines.push(
      `${head}; at the peak headway of ${n1(f.peakHeadwayS / 60)} min that frees ${f.peakVehiclesFreed} of ${f.peakVehiclesBefore} peak vehicles (${n2(f.vehicleShareFreed ?? 0)} of a vehicle), ` +
        `or the same fleet runs every ${n1(f.headwaySameFleetS / 60)} min` +
        (f.waitSavedPaxMinPerDay !== null
          ? `, saving riders about ${n0(f.waitSavedPaxMinPerDay)} minutes of waiting a day (half the headway change per boarding, common planning practice)`
          : '') +
        cost,
    );
  }
  const lu = result.landUse;
  if (lu) {
    const change = lu.peopleCoveredAfter - lu.peopleCoveredBefore;
    lines.push(
      `land use: ${n0(lu.peopleCoveredBefore)} of ${n0(lu.people)} people within a walk of a stop before, ${n0(lu.peopleCoveredAfter)} after ` +
        `(${change < 0 ? `${n0(-change)} left uncovered` : change > 0 ? `${n0(change)} newly covered` : 'no change'})`,
    );
  }
  lines.push(`sensitivity (net pax-min/day): ${result.sensitivity.map((s) => `${s.label} ${n0(s.netPaxMinPerDay)}`).join(', ')}`);
  lines.push(
    t.overPolicyAfter > 0
      ? `walking policy: ${t.overPolicyAfter} pattern${t.overPolicyAfter === 1 ? '' : 's'} get a gap above ${dist(maxGapM)} ${unit} that was not there before (marked !)`
      : `walking policy: no new gap above ${dist(maxGapM)} ${unit}`,
  );
  const near = changesNearStations(result);
  if (near.length) {
    lines.push(
      safe(
        `other modes: ${near.length} stop${near.length === 1 ? '' : 's'} ${near.length === 1 ? 'this changes lies' : 'these change lie'} within walking distance of a station of a context feed, a transfer point the audit keeps (marked !): `,
      ) + near.map((x) => safe(`${x.stopId} ${x.stopName} (${x.nearStation})`)).join('; '),
    );
  }
  if (result.warnings.length) lines.push(`${result.warnings.length} feed warning${result.warnings.length === 1 ? '' : 's'} (see --json)`);
  lines.push('');
  lines.push(...wrap(`Cautions: ${result.cautions.join(' ')}`, width));
  return lines.join('\n') + '\n';
}
