// index.html: the one page a planner opens first. Self-contained (inline CSS, script and SVG; no network,
// fonts or tiles). Static parts (headline, cautions, histogram, parameters, warnings) are rendered here
// with every piece of feed text escaped; the interactive parts are drawn by the inline script from one
// embedded JSON block, per-pattern sections only when opened, so large feeds stay a few MB.

import type { AuditResult, Candidate, PatternResult, StopResult } from '../../audit/types.js';
import { StopspanError } from '../../common/errors.js';
import { median } from '../../common/median.js';
import { CAUTIONS } from '../cautions.js';
import { groupedFixed } from '../numberText.js';
import { checkUnits, formatShortDistance, type Units } from '../units.js';
import { escapeHtml as h, jsonForScript } from '../../common/escapeHtml.js';
import { histogramSvg } from './histogramSvg.js';
import { PAGE_SCRIPT } from './pageScript.js';
import { VERDICTS } from '../../audit/verdictKinds.js';
import { PAGE_STYLE } from './pageStyle.js';
import { DENSITY_NEAR_M } from '../../model/catchments.js';

export interface HtmlOptions {
  units?: Units;
  maxPathPoints?: number; // per pattern map; longer paths are thinned (the map is schematic)
}

const SOURCE_TEXT: Record<string, string> = {
  C: 'confirmed in a named publication',
  S: 'secondary source',
  M: 'from memory / common practice',
  D: 'derived or assumed here',
  user: 'set by the user',
  estimated: 'estimated from the schedule',
  observed: 'observed (realtime data)',
};

const r1 = (v: number | null): number | null => (v === null || !Number.isFinite(v) ? null : Math.round(v * 10) / 10);
const r5 = (v: number): number => Math.round(v * 1e5) / 1e5;

function thin(path: [number, number][], max: number): [number, number][] {
  if (path.length <= max) return path;
  const step = (path.length - 1) / (max - 1);
  const out: [number, number][] = [];
  for (let i = 0; i < max; i++) out.push(path[Math.round(i * step)]);
  return out;
}

/** A path as whole 1e-5 degrees, the first point then each step from the one before: [lon0, lat0, dlon1, dlat1, ...] (a third of the text of [lon, lat] pairs). */
function deltaPath(path: [number, number][]): number[] {
  const out: number[] = [];
  let px = 0;
  let py = 0;
  for (const [lon, lat] of path) {
    if (!Number.isFinite(lon) || !Number.isFinite(lat)) continue;
    const x = Math.round(lon * 1e5);
    const y = Math.round(lat * 1e5);
    out.push(x - px, y - py);
    px = x;
    py = y;
  }
  return out;
}

/** A stop of a pattern in the data block: [stopTable position, dist, verdict letter, fixed reason (with its note), timepoint, removal net, boardings, alightings]. */
type PageStop = [number, number | null, string, string, 0 | 1, number | null, number, number];

/** A pattern in the data block (short keys: the block is written into the page). */
interface PagePattern {
  id: string;
  route: string;
  routeName: string;
  dir: number;
  headsign: string;
  len: number | null;
  trips: number | null;
  median: number | null;
  mean: number | null;
  opt: number | null;
  lo: number | null;
  hi: number | null;
  close: number;
  wide: number;
  optCount: number;
  lost: number | null;
  demand: PatternResult['demandSource'];
  lostTime: number | null;
  cruise: number | null;
  delay: number | null;
  stopping: PatternResult['stoppingModel'];
  distSource: PatternResult['distanceSource'];
  curve: (number | null)[][];
  curCost: number | null;
  optCost: number | null;
  path: number[];
  stops: PageStop[];
  gaps: number[][]; // [place of the gap's first stop in stops, gap, 1 wide or 2 under review]
  cands: [number, number][];
  drops: number[];
}

/** A candidate in the data block. */
interface PageCandidate {
  rank: number;
  action: Candidate['action'];
  id: string;
  name: string;
  routes: string[];
  net: number | null;
  riders: number | null;
  rt: number | null;
  vh: number;
  robust: boolean;
  pats: number[];
  at?: [number, number];
}

/** Stops written once, each pattern's stops referring to them by position. */
interface StopTable {
  table: [string, string, number, number][]; // [stop_id, name, lat, lon]
  refOf: (s: StopResult) => number;
}

/**
 * The data block the page's script draws from: compact arrays, numbers rounded. A stop served by several
 * patterns is written once (stopTable: [stop_id, name, lat, lon]) and each pattern's stops refer to it by
 * position; candidates name their patterns by position in patterns; each pattern lists the candidates on
 * it (to mark on its map and strip) and the stops the optimiser's plan drops. The script expands a
 * pattern's rows when its section is opened.
 */
export function pageData(result: AuditResult, units: Units, maxPathPoints: number): Record<string, unknown> {
  const stopsBy = passengerStopsByPattern(result);
  const wideBy = wideGapsByPattern(result);
  const stopTable = newStopTable();
  const patternPos = new Map(result.patterns.map((p, i) => [p.patternId, i]));
  const orderedStops = result.patterns.map((p) => (stopsBy.get(p.patternId) ?? []).slice().sort((a, b) => a.stopIndex - b.stopIndex));
  const candsOn = candidatesOnPatterns(result, orderedStops, patternPos);
  const patterns = result.patterns.map((p: PatternResult, pi) =>
    patternData(p, orderedStops[pi], wideBy.get(p.patternId) ?? [], candsOn[pi], stopTable.refOf, maxPathPoints),
  );
  const candidates = result.candidates.map((c) => candidateData(c, patternPos));
  return {
    units,
    assumed: result.demandSource !== 'observed',
    stopTable: stopTable.table,
    patterns,
    candidates,
    density: densityData(result),
  };
}

/** Each pattern's stops, without timing points where no one boards or alights. */
function passengerStopsByPattern(result: AuditResult): Map<string, StopResult[]> {
  const stopsBy = new Map<string, StopResult[]>();
  for (const s of result.stops) {
    // a timing point where no one boards or alights is no stop for spacing: the page's stop list, its
    // gaps and its strip run past it, as stops.csv's gaps do
    if (s.stopVerdict === 'timing-only') continue;
    let l = stopsBy.get(s.patternId);
    if (!l) stopsBy.set(s.patternId, (l = []));
    l.push(s);
  }
  return stopsBy;
}

/** Each pattern's wide gaps: [first stop's pattern index, gap, kind]. */
function wideGapsByPattern(result: AuditResult): Map<string, [number, number, number][]> {
  // a wide gap is 1, or 2 where it is listed for review (no evidence anyone is there: an empty stretch)
  const underReview = new Set(result.reviewGaps.flatMap((g) => g.patternIds.map((id) => `${id}\n${g.fromStopId}\n${g.toStopId}`)));
  const wideBy = new Map<string, [number, number, number][]>();
  for (const g of result.gaps) {
    let l = wideBy.get(g.patternId);
    if (!l) wideBy.set(g.patternId, (l = []));
    if (g.wide) l.push([g.fromStopIndex, r1(g.gapM) ?? 0, underReview.has(`${g.patternId}\n${g.fromStopId}\n${g.toStopId}`) ? 2 : 1]);
  }
  return wideBy;
}

/** An empty stop table; refOf adds a stop the first time it is asked for. */
function newStopTable(): StopTable {
  const stopRef = new Map<string, number>();
  const table: [string, string, number, number][] = [];
  const refOf = (s: StopResult): number => {
    let i = stopRef.get(s.stopId);
    if (i === undefined) {
      stopRef.set(s.stopId, (i = table.length));
      table.push([s.stopId, s.stopName, r5(s.stopLat), r5(s.stopLon)]);
    }
    return i;
  };
  return { table, refOf };
}

/** The candidates on each pattern: [candidate's position, the stop removed or the stop before the added one (-1: not found)]. */
function candidatesOnPatterns(result: AuditResult, orderedStops: StopResult[][], patternPos: Map<string, number>): [number, number][][] {
  const candsOn: [number, number][][] = result.patterns.map(() => []);
  // each pattern's places by stop id, built when a candidate first names the pattern: a scan of the
  // pattern per candidate made a pattern of thousands of close stops quadratic in them
  const placesOf = new Map<number, Map<string, number[]>>();
  const places = (pi: number): Map<string, number[]> => {
    let at = placesOf.get(pi);
    if (!at) {
      at = new Map();
      orderedStops[pi].forEach((s, i) => {
        const list = at!.get(s.stopId);
        if (list) list.push(i);
        else at!.set(s.stopId, [i]);
      });
      placesOf.set(pi, at);
    }
    return at;
  };
  result.candidates.forEach((c, ci) => {
    for (const id of new Set(c.patternIds)) {
      const pi = patternPos.get(id);
      if (pi === undefined) continue;
      const stops = orderedStops[pi];
      const at = places(pi).get(c.action === 'remove' ? c.stopId : c.fromStopId) ?? [];
      if (c.action === 'remove') {
        for (const i of at) candsOn[pi].push([ci, i]);
        if (at.length === 0) candsOn[pi].push([ci, -1]);
      } else {
        // the first place where the gap's two stops follow each other
        candsOn[pi].push([ci, at.find((i) => stops[i + 1]?.stopId === c.toStopId) ?? -1]);
      }
    }
  });
  return candsOn;
}

/** One pattern's entry: its figures, path, stops (by stop table position), wide gaps, candidates and the plan's drops. */
function patternData(
  p: PatternResult,
  stops: StopResult[],
  wide: [number, number, number][],
  cands: [number, number][],
  refOf: (s: StopResult) => number,
  maxPathPoints: number,
): PagePattern {
  // a wide gap names its first stop by its place in this list
  const place = new Map(stops.map((s, i) => [s.stopIndex, i]));
  return {
    id: p.patternId,
    route: p.routeId,
    routeName: p.routeShortName || p.routeId,
    dir: p.directionId,
    headsign: p.headsign,
    len: r1(p.lengthM),
    trips: r1(p.tripsPerDay),
    median: r1(p.medianGapM),
    mean: r1(p.meanGapM),
    opt: r1(p.optimalSpacingM),
    lo: r1(p.bandLowM),
    hi: r1(p.bandHighM),
    close: p.closeStops,
    wide: p.wideGaps,
    optCount: p.optimalStopCount,
    lost: r1(p.paxMinLostPerDay),
    demand: p.demandSource,
    lostTime: r1(p.lostTimePerStopS),
    cruise: r1(p.cruiseSpeedMps),
    delay: p.trafficDelayS === null ? null : Math.round(p.trafficDelayS),
    stopping: p.stoppingModel,
    distSource: p.distanceSource,
    curve: p.costCurve.map((c) => [r1(c.spacingM), r1(c.costPerRiderS)]),
    curCost: r1(p.currentCostPerRiderS),
    optCost: r1(p.optimalCostPerRiderS),
    path: deltaPath(thin(p.path, maxPathPoints)),
    // [stopTable position, dist, verdict letter, fixed reason (with its note), timepoint, removal net, boardings, alightings]
    stops: stops.map((s): PageStop => [
      refOf(s),
      r1(s.distAlongM),
      VERDICTS[s.verdict].letter,
      s.fixedNote ? `${s.fixedReason}: ${s.fixedNote}` : s.fixedReason,
      s.timepoint ? 1 : 0,
      r1(s.removalNetPaxMinPerDay),
      Math.round(s.boardingsPerDay), // shown as whole riders
      Math.round(s.alightingsPerDay),
    ]),
    gaps: wide.flatMap(([j, gapM, kind]) => (place.has(j) ? [[place.get(j)!, gapM, kind]] : [])),
    cands,
    // the optimiser's plan: positions of the stops it drops (every other stop it keeps)
    drops: stops.flatMap((s, i) => (s.keptByOptimiser ? [] : [i])),
  };
}

/** One candidate's entry; an addition's site where it is known. */
function candidateData(c: Candidate, patternPos: Map<string, number>): PageCandidate {
  return {
    rank: c.rank,
    action: c.action,
    id: c.stopId,
    name: c.stopName,
    routes: c.routeIds,
    net: r1(c.netPaxMinPerDay),
    riders: r1(c.ridersAffectedPerDay),
    rt: r1(c.runTimeSavedPerTripS),
    vh: Math.round(c.vehicleHoursPerDay * 1000) / 1000,
    robust: c.robust,
    pats: c.patternIds.flatMap((id) => patternPos.get(id) ?? []), // positions in patterns, to link a row to its pattern's section
    ...(c.action === 'add' && Number.isFinite(c.lat) && Number.isFinite(c.lon) ? { at: [r5(c.lat), r5(c.lon)] as [number, number] } : {}),
  };
}

/** Most squares of the land-use layer one pattern's map draws; the script merges squares into wider ones beyond it. */
export const MAP_DENSITY_CELLS = 300;

/**
 * The land-use layer's people in squares near the stops served (LandUseSummary.density, at most
 * MAX_DENSITY_CELLS of them in the page), for the maps to draw lightly under each route; null without a
 * layer. `top`: the people in a square at the top of the light-to-dark scale, the 95th percentile of the
 * squares, so a few very dense squares do not leave the rest blank.
 */
function densityData(result: AuditResult): Record<string, unknown> | null {
  const g = result.landUse?.density;
  if (!g) return null;
  const people: number[] = [];
  for (let k = 2; k < g.cells.length; k += 3) people.push(g.cells[k]);
  people.sort((a, b) => a - b);
  const top = people.length ? Math.max(1, people[Math.min(people.length - 1, Math.floor(people.length * 0.95))]) : 1;
  const r9 = (v: number): number => Math.round(v * 1e9) / 1e9;
  return {
    m: g.cellM,
    near: DENSITY_NEAR_M,
    max: MAP_DENSITY_CELLS,
    step: [r9(g.latStep), r9(g.lonStep)],
    o: [g.lat0, g.lon0],
    top,
    cells: g.cells,
  };
}

// why a wide gap has no proposed stop, in words without units (summary.json's detail says it in metric)
const REVIEW_REASON: Record<AuditResult['reviewGaps'][number]['reason'], string> = {
  'fast-stretch': 'the schedule runs it faster than a local bus on streets (a bridge or an expressway)',
  'long-straight-empty': 'a long straight run with no stop of another route within a short walk of its middle',
  'no-stop-near': "no stop of another route within a short walk of its middle, away from the gap's ends",
  'no-people-near': 'too few people in the land-use layer within a short walk of its middle, nearer to it than to a stop served today',
};

// en-US digits as Intl.NumberFormat prints them, without loading ICU's number formatting (numberText.ts)
function fmt(v: number, digits = 0): string {
  return Number.isFinite(v) ? groupedFixed(v, digits) : '–';
}

function th(key: string, label: string, numeric = false): string {
  return `<th data-key="${h(key)}"${numeric ? ' class="num"' : ''} scope="col"><button type="button">${h(label)}</button></th>`;
}

/** The headline's top candidates: removals and additions listed apart, five of each. */
function topCandidatesHtml(result: AuditResult, assumedNote: string): string {
  // removals and additions are different decisions: each has its own ranked list
  const topOf = (action: 'remove' | 'add') => result.candidates.filter((c) => c.action === action).slice(0, 5);
  const topItem = (c: AuditResult['candidates'][number]): string =>
    `<li>${h(c.action === 'remove' ? 'Remove' : 'Add a stop')} <strong>${h(c.stopName)}</strong>${c.stopId ? ` <code>${h(c.stopId)}</code>` : ''}, route${c.routeIds.length > 1 ? 's' : ''} ${h(c.routeIds.join(', '))}: ${h(fmt(c.netPaxMinPerDay, 1))} passenger-min/day${assumedNote}${c.robust ? '' : ' <span class="note">(not robust to the sensitivity cases)</span>'}${c.evidence ? ` <span class="note">(evidence: ${h(c.evidence)})</span>` : ''}</li>`;
  const topRemovals = topOf('remove');
  const topAdditions = topOf('add');
  return topRemovals.length || topAdditions.length
    ? `<h4>Stops to remove</h4>${topRemovals.length ? `<ol class="top-cands">${topRemovals.map(topItem).join('')}</ol>` : '<p class="note">No removal saves riders time under these parameters.</p>'}` +
        `<h4>Stops to add</h4>${topAdditions.length ? `<ol class="top-cands">${topAdditions.map(topItem).join('')}</ol>` : '<p class="note">No addition with evidence that people are there saves riders time under these parameters.</p>'}`
    : '<p class="note">No stop change saves riders time under these parameters.</p>';
}

/** The wide gaps listed for review (no stop proposed), longest first, the first 50; '' when there are none. */
function reviewGapsHtml(result: AuditResult, d: (m: number | null) => string): string {
  const reviewShown = result.reviewGaps.slice(0, 50);
  return result.reviewGaps.length
    ? `<p class="note">${h(fmt(result.reviewGaps.length))} wide gap${result.reviewGaps.length === 1 ? '' : 's'} without evidence that people are there or that a bus can stop there (a bridge, an expressway, a park, an airfield): no stop is proposed and no passenger-minute figure given. Longest first${result.reviewGaps.length > reviewShown.length ? `, the first ${reviewShown.length} (all in summary.json)` : ''}.</p><div class="table-wrap"><table><thead><tr><th scope="col">gap</th><th scope="col">routes</th><th scope="col" class="num">length</th><th scope="col">why no stop is proposed</th></tr></thead><tbody>${reviewShown
        .map(
          (g) =>
            `<tr><td>${h(g.name)}</td><td>${h(g.routeIds.join(', '))}</td><td class="num">${h(d(g.gapM))}</td><td>${h(REVIEW_REASON[g.reason])}</td></tr>`,
        )
        .join('')}</tbody></table></div>`
    : '';
}

/** The parameters' table rows: value, source and note. */
function parametersHtml(result: AuditResult): string {
  return Object.entries(result.params)
    .map(
      ([name, p]) =>
        `<tr><td><code>${h(name)}</code></td><td class="num">${h(p.value === null ? '—' : String(p.value))}</td><td title="${h(SOURCE_TEXT[p.source] ?? p.source)}">${h(p.source)}: ${h(SOURCE_TEXT[p.source] ?? '')}</td><td>${h(p.note)}</td></tr>`,
    )
    .join('');
}

/** The warnings table, or a line saying there were none. */
function warningsHtml(result: AuditResult): string {
  return result.warnings.length
    ? `<div class="table-wrap"><table><thead><tr><th scope="col">warning</th><th scope="col" class="num">count</th><th scope="col">what it means</th><th scope="col">examples</th></tr></thead><tbody>${result.warnings
        .map(
          (w) =>
            `<tr><td><code>${h(w.code)}</code></td><td class="num">${h(fmt(w.count))}</td><td>${h(w.message)}</td><td>${w.examples.map((e) => `<code>${h(e)}</code>`).join(' ')}</td></tr>`,
        )
        .join('')}</tbody></table></div>`
    : '<p class="note">The feed was read without warnings.</p>';
}

/** The sensitivity cases' table, or a line saying none were run. */
function sensitivityHtml(result: AuditResult, d: (m: number | null) => string, assumedNote: string): string {
  return result.sensitivity.length
    ? `<div class="table-wrap"><table><thead><tr><th scope="col">case</th><th scope="col" class="num">walk weight</th><th scope="col" class="num">band tolerance</th><th scope="col" class="num">mean optimum</th><th scope="col" class="num">close stops</th><th scope="col" class="num">wide gaps</th><th scope="col" class="num">passenger-min lost/day</th><th scope="col" class="num">top candidates kept</th><th scope="col" class="num">listed candidates still saving</th></tr></thead><tbody>${result.sensitivity
        .map(
          (s) =>
            `<tr><td>${h(s.label)}</td><td class="num">${h(fmt(s.walkWeight, 2))}</td><td class="num">${h(fmt(s.bandTolerance * 100, 0))} %</td><td class="num">${h(d(s.meanOptimalSpacingM))}</td><td class="num">${h(fmt(s.closeStops))}</td><td class="num">${h(fmt(s.wideGaps))}</td><td class="num">${h(fmt(s.paxMinLostPerDay))}${assumedNote}</td><td class="num">${h(fmt(s.candidatesKept))}</td><td class="num">${h(fmt(s.programmeStillSaving))} of ${h(fmt(result.candidates.length))}</td></tr>`,
        )
        .join('')}</tbody></table></div>`
    : '<p class="note">No sensitivity cases were run.</p>';
}

export function indexHtml(result: AuditResult, options: HtmlOptions = {}): string {
  const { units = 'metric', maxPathPoints = 400 } = options;
  checkUnits(units);
  if (!Number.isInteger(maxPathPoints) || maxPathPoints < 2) {
    throw new StopspanError('bad-option', `invalid option maxPathPoints: expected an integer >= 2, got ${maxPathPoints}`, {
      value: String(maxPathPoints),
    });
  }
  const d = (m: number | null): string => formatShortDistance(m, units);
  const hl = result.headline;
  // modelled demand (assumed, or assumed riders placed by a land-use layer) is badged as such beside every figure
  const assumed = result.demandSource !== 'observed';
  const demandBadge = assumed
    ? `<span class="badge assumed">${result.demandSource} demand</span>`
    : '<span class="badge observed">observed demand</span>';
  const assumedNote = assumed ? ` <span class="badge assumed">${result.demandSource}</span>` : '';
  const bandLow = median(result.patterns.map((p) => p.bandLowM).filter(Number.isFinite), 0);
  const bandHigh = median(result.patterns.map((p) => p.bandHighM).filter(Number.isFinite), 0);
  const hist = histogramSvg(
    {
      gapsM: result.gaps.map((g) => g.gapM),
      verdicts: result.gaps.map((g) => g.verdict),
      bandLowM: bandLow,
      bandHighM: bandHigh,
      optimalM: hl.meanOptimalSpacingM,
      medianGapM: hl.medianGapM,
    },
    units,
  );
  const belowBand = result.gaps.filter((g) => g.verdict === 'short').length;
  const wideRows = result.gaps.filter((g) => g.verdict === 'wide').length; // = hl.wideGapsOnPatterns
  const topList = topCandidatesHtml(result, assumedNote);
  const reviewGaps = reviewGapsHtml(result, d);
  const params = parametersHtml(result);
  const warnings = warningsHtml(result);
  const sensitivity = sensitivityHtml(result, d, assumedNote);
  const feedName = result.feed.publisher || result.feed.source;
  const title = `Stop spacing audit: ${feedName}, ${result.date}`;
  const paxHeader = `passenger-min/day${assumed ? ' (assumed)' : ''}`;

  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; script-src 'unsafe-inline'; img-src data:">
<title>${h(title)}</title>
<style>${PAGE_STYLE}</style>
</head>
<body>
<header class="top">
<h1>Stop spacing audit: ${h(feedName)}</h1>
<p>Analysis date ${h(result.date)} · feed <code>${h(result.feed.source)}</code>${result.feed.version ? ` · version ${h(result.feed.version)}` : ''} · generated ${h(result.generatedAt)} by ${h(result.tool.name)} ${h(result.tool.version)}</p>
</header>
<main>
<section id="headline" aria-labelledby="headline-h">
<h2 id="headline-h">At a glance</h2>
<div class="cards">
<div class="card"><div class="k">Feed</div><div class="v">${h(feedName)}</div><div class="s">${h(result.feed.source)}${result.feed.contentHash ? ` · ${h(result.feed.contentHash)}` : ''}</div></div>
<div class="card"><div class="k">Analysis date</div><div class="v">${h(result.date)}</div><div class="s">${h(fmt(hl.trips))} trips that day</div></div>
<div class="card"><div class="k">Patterns</div><div class="v">${h(fmt(hl.patterns))}</div><div class="s">route, direction and stop sequence</div></div>
<div class="card"><div class="k">Stops served</div><div class="v">${h(fmt(hl.stops))}</div><div class="s">${h(fmt(hl.closeStops))} close stops, ${h(fmt(hl.wideGaps))} wide gap${hl.wideGaps === 1 ? '' : 's'} (each pair of stops once; ${h(fmt(hl.wideGapsOnPatterns))} counted on each pattern that runs them)</div></div>
<div class="card"><div class="k">Median gap</div><div class="v">${h(d(hl.medianGapM))}</div><div class="s">modelled optimum ${h(d(hl.meanOptimalSpacingM))} (mean over patterns); near-optimal band about ${h(d(bandLow))} to ${h(d(bandHigh))}</div></div>
<div class="card"><div class="k">Passenger-minutes at stake per day</div><div class="v">${h(fmt(hl.paxMinAtStakePerDay))}</div><div class="s">${h(fmt(hl.paxMinLostPerDay))} by removals (today against the optimised stop pattern) + ${h(fmt(hl.paxMinAdditionsPerDay))} by the proposed additions${assumedNote}</div></div>
<div class="card"><div class="k">Demand</div><div class="v">${assumed ? 'assumed' : 'observed'}</div><div class="s">${demandBadge} ${assumed ? 'spread evenly along each pattern; figures are estimates' : 'from a stop-level ridership file'}</div></div>
<div class="card"><div class="k">Lost time per stop</div><div class="v">${result.lostTimeSource === 'observed' ? 'observed' : 'defaults'}</div><div class="s">${result.lostTimeSource === 'observed' ? 'dwell and stopping from realtime data' : 'door, braking and re-entry defaults (see parameters)'}</div></div>
</div>
<h3>Top candidates</h3>
${topList}
</section>

<section class="cautions" id="cautions" aria-labelledby="cautions-h">
<h2 id="cautions-h">Before acting on this report</h2>
<ul>${CAUTIONS.map((c) => `<li>${h(c)}</li>`).join('')}</ul>
${assumed ? '<p><strong>Demand in this report is assumed, not counted:</strong> every passenger-minute figure is marked <span class="badge assumed">assumed</span>.</p>' : ''}
</section>

<section id="gaps" aria-labelledby="gaps-h">
<h2 id="gaps-h">How far apart the stops are</h2>
<p class="note">Every gap between consecutive stops of every pattern. The shaded band is where riders' total time stays within the tolerance of the optimum; the band shown is the median over patterns, and each gap is judged against its own pattern's band: ${h(fmt(belowBand))} lie below it (rust, stops closer than worthwhile) and ${h(fmt(wideRows))} are wide (blue, long walks with no local serving them): the ${h(fmt(hl.wideGaps))} wide gap${hl.wideGaps === 1 ? '' : 's'} of the headline, counted on each pattern that runs ${hl.wideGaps === 1 ? 'it' : 'them'}. Timing points where no one boards or alights are passed over.</p>
${hist}
</section>

<section id="curve" aria-labelledby="curve-h">
<h2 id="curve-h">Riders' time against stop spacing</h2>
<p class="note">Closer stops mean shorter walks but more stopping; the curve adds both for one rider. Its bottom is flat, so only spacing well outside the band costs much.</p>
<div class="controls"><label for="curve-pattern">Pattern<select id="curve-pattern"></select></label></div>
<div id="curve-host"></div>
</section>

<section id="candidates" aria-labelledby="cand-h">
<h2 id="cand-h">Candidates</h2>
<p class="note">Stops whose removal, or gaps where an added stop, would lower riders' total time, summed over every pattern serving the stop. Negative passenger-minutes are a saving. Click a column heading to sort.</p>
<div class="controls">
<label for="cand-route">Route<select id="cand-route"><option value="">all routes</option></select></label>
<label for="cand-action">Action<select id="cand-action"><option value="">remove and add</option><option value="remove">remove a stop</option><option value="add">add a stop</option></select></label>
<label for="cand-search">Stop name or id<input id="cand-search" type="search" placeholder="search"></label>
<label for="cand-robust" style="flex-direction:row;align-items:center;gap:6px"><input id="cand-robust" type="checkbox"> robust to the sensitivity cases only</label>
</div>
<p class="note" id="cand-count" aria-live="polite"></p>
<div class="table-wrap"><table id="cand-table"><thead><tr>${th('rank', 'rank', true)}${th('action', 'action')}${th('stop', 'stop')}${th('routes', 'routes')}${th('net', `net ${paxHeader}`, true)}${th('riders', 'riders affected/day', true)}${th('rt', 'run time saved/trip (s)', true)}${th('vh', 'vehicle-hours saved/day', true)}${th('robust', 'robust')}</tr></thead><tbody></tbody></table></div>
${reviewGaps ? `<h3>Wide gaps to review</h3>\n${reviewGaps}\n` : ''}</section>

<section id="patterns" aria-labelledby="pat-h">
<h2 id="pat-h">Patterns</h2>
<div class="controls">
<label for="pat-route">Route<select id="pat-route"><option value="">all routes</option></select></label>
<label for="pat-verdict">Verdict<select id="pat-verdict"><option value="">all patterns</option><option value="close">with close stops</option><option value="wide">with wide gaps</option><option value="ok">all gaps within the band</option></select></label>
</div>
<p class="note" id="pat-count" aria-live="polite"></p>
<div class="table-wrap"><table id="pat-table"><thead><tr>${th('pattern', 'pattern')}${th('route', 'route')}${th('headsign', 'headsign')}${th('stops', 'stops', true)}${th('length', 'length', true)}${th('median', 'median gap', true)}${th('opt', 'optimum', true)}${th('close', 'close stops', true)}${th('wide', 'wide gaps', true)}${th('lost', `passenger-min lost/day${assumed ? ' (assumed)' : ''}`, true)}</tr></thead><tbody></tbody></table></div>
</section>

<section id="pattern-detail" aria-labelledby="detail-h">
<h2 id="detail-h">Each pattern: map and stops along the route</h2>
<p class="note">Open a pattern to draw its schematic map and strip diagram (ordered by passenger-minutes lost). Triangles are close stops, diamonds sit beside wide gaps, squares are fixed stops (terminals, timepoints), open circles are within the band; T marks a timepoint. A ring marks a candidate stop to remove and a plus a candidate stop to add, with its rank in the candidate list; a cross marks a stop the optimiser's plan drops.</p>
<div class="controls"><label for="pat-find">Find a pattern: route, headsign or pattern id<input id="pat-find" type="search" placeholder="route name"></label></div>
<div id="route-index"></div>
<p class="note" id="pat-find-count" aria-live="polite"></p>
<div id="pattern-sections"></div>
</section>

<section id="sensitivity" aria-labelledby="sens-h">
<h2 id="sens-h">How much the conclusions depend on the parameters</h2>
${sensitivity}
</section>

<section id="parameters" aria-labelledby="params-h">
<h2 id="params-h">Parameters and their sources</h2>
<div class="table-wrap"><table><thead><tr><th scope="col">parameter</th><th scope="col" class="num">value</th><th scope="col">source</th><th scope="col">note</th></tr></thead><tbody>${params}</tbody></table></div>
<h3>Assumptions</h3>
<ul>${result.assumptions.map((a) => `<li>${h(a)}</li>`).join('')}</ul>
</section>

<section id="warnings" aria-labelledby="warn-h">
<h2 id="warn-h">Warnings from reading the feed</h2>
${warnings}
</section>

<footer>Distances are along each pattern's path in ${units === 'imperial' ? 'feet and miles (computed in metres)' : 'metres'}. The CSV, GeoJSON and summary.json files beside this page hold the same figures.</footer>
</main>
<script type="application/json" id="report-data">${jsonForScript(pageData(result, units, maxPathPoints))}</script>
<script>${PAGE_SCRIPT}</script>
</body>
</html>
`;
}
