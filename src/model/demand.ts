// Each pattern's demand: boardings and alightings per day at its (passenger) stops, the load on board
// departing each stop, and the mean in-vehicle trip length. From a ridership file, or assumed: origins
// and destinations uniform along the pattern with origin before destination (boardings per metre fall
// linearly from the start, alightings rise linearly, the mean trip is a third of the length).

import type { WarningSink } from '../common/warnings.js';
import type { DemandSource } from '../audit/types.js';
import type { Pattern } from '../network/types.js';
import type { Ridership } from './ridership.js';

export interface PatternDemand {
  patternId: string;
  boardPerDay: number[]; // per model stop
  alightPerDay: number[];
  loadDepartingPerDay: number[];
  meanTripLengthM: number;
  ridersPerDay: number;
  demandSource: DemandSource;
}

/**
 * Assumed uniform demand on a pattern whose model stops sit at `posM`. Trip ends are uniform along the
 * line and origins precede destinations; discretised to stops, riders from stop i to stop j > i number in
 * proportion to the two catchment lengths, so a stop's boardings and alightings are always consistent
 * (nobody alights before boarding, the load never goes negative). Catchments reach at most
 * catchmentHalfMaxM from a stop, so a long gap holds no riders in its middle. Mean trip length reported as D/3.
 */
export function assumedDemand(
  patternId: string,
  posM: number[],
  tripsPerDay: number,
  { boardingsPerTripKm, catchmentHalfMaxM = Infinity }: { boardingsPerTripKm: number; catchmentHalfMaxM?: number },
): PatternDemand {
  const n = posM.length;
  const D = posM[n - 1] - posM[0];
  const riders = boardingsPerTripKm * (D / 1000) * tripsPerDay;
  const len = posM.map(
    (x, j) => (j === n - 1 ? x : Math.min((x + posM[j + 1]) / 2, x + catchmentHalfMaxM)) - (j === 0 ? x : Math.max((posM[j - 1] + x) / 2, x - catchmentHalfMaxM)),
  );
  const after: number[] = new Array(n).fill(0); // catchment length of the stops after j
  for (let j = n - 2; j >= 0; j--) after[j] = after[j + 1] + len[j + 1];
  let pairs = 0;
  for (let j = 0; j < n; j++) pairs += len[j] * after[j];
  const c = pairs > 0 ? riders / pairs : 0;
  const boardPerDay = len.map((l, j) => c * l * after[j]);
  const alightPerDay: number[] = new Array(n).fill(0);
  let before = 0;
  for (let j = 0; j < n; j++) {
    alightPerDay[j] = c * len[j] * before;
    before += len[j];
  }
  const out = finish(patternId, posM, boardPerDay, alightPerDay, 'assumed', D / 3);
  out.meanTripLengthM = D / 3;
  return out;
}

/**
 * Demand from a ridership file. A row with a route (and direction) applies to that route's patterns at
 * the stop, one without to every pattern at the stop; a stop's counts are split between the patterns that
 * serve it by trips per day. Alightings are scaled to match boardings per pattern (warned above 1 %).
 */
export function ridershipDemand(
  ridership: Ridership,
  patterns: { pattern: Pattern; modelStops: number[]; posM: number[] }[],
  { warnings }: { warnings: WarningSink },
): Map<string, PatternDemand> {
  // occurrences of each feed stop among the patterns' model stops
  const at = new Map<number, { p: number; j: number }[]>();
  patterns.forEach(({ pattern, modelStops }, p) => {
    modelStops.forEach((j, m) => {
      const s = pattern.stopIdx[j];
      let list = at.get(s);
      if (!list) at.set(s, (list = []));
      list.push({ p, j: m });
    });
  });
  const board = patterns.map(({ posM }) => new Array(posM.length).fill(0));
  const alight = patterns.map(({ posM }) => new Array(posM.length).fill(0));
  const used = new Set<number>();
  for (const row of ridership.rows) {
    const occ = (at.get(row.stopIdx) ?? []).filter(({ p }) => {
      const pat = patterns[p].pattern;
      return (row.routeId === null || pat.routeId === row.routeId) && (row.directionId === null || pat.directionId === row.directionId);
    });
    if (occ.length === 0) {
      warnings.add('ridership-unserved-stop', 'ridership rows for a stop no pattern (of the named route) serves on the analysis date were not used', `${ridership.file}:${row.line} ${row.stopId}`);
      continue;
    }
    used.add(row.stopIdx);
    const tripsTotal = occ.reduce((s, { p }) => s + Math.max(patterns[p].pattern.tripsPerDay, 0), 0);
    for (const { p, j } of occ) {
      const share = tripsTotal > 0 ? patterns[p].pattern.tripsPerDay / tripsTotal : 1 / occ.length;
      board[p][j] += row.boardingsPerDay * share;
      alight[p][j] += row.alightingsPerDay * share;
    }
  }
  let missing = 0;
  for (const s of at.keys()) if (!used.has(s)) missing++;
  if (missing > 0) warnings.add('ridership-stop-missing', 'stops served by a pattern but absent from the ridership file were given zero boardings and alightings', undefined, missing);
  const out = new Map<string, PatternDemand>();
  patterns.forEach(({ pattern, posM }, p) => {
    const b = board[p];
    const a = alight[p];
    const sumB = b.reduce((s, x) => s + x, 0);
    const sumA = a.reduce((s, x) => s + x, 0);
    if (sumB > 0 && sumA > 0) {
      const scale = sumB / sumA;
      if (Math.abs(scale - 1) > 0.01) warnings.add('ridership-unbalanced', 'patterns whose boardings and alightings differ by more than 1 %: alightings were scaled to match boardings', `${pattern.id} x${scale.toFixed(3)}`);
      for (let j = 0; j < a.length; j++) a[j] *= scale;
    } else if (sumB > 0 || sumA > 0) {
      warnings.add('ridership-one-sided', 'patterns with boardings but no alightings (or the reverse) in the ridership file: the load profile cannot be built, demand set to zero', pattern.id);
      b.fill(0);
      a.fill(0);
    }
    const D = posM[posM.length - 1] - posM[0];
    out.set(pattern.id, finish(pattern.id, posM, b, a, 'observed', D / 3));
  });
  return out;
}

function finish(patternId: string, posM: number[], boardPerDay: number[], alightPerDay: number[], demandSource: DemandSource, fallbackTripM: number): PatternDemand {
  const n = posM.length;
  const loadDepartingPerDay: number[] = new Array(n).fill(0);
  let load = 0;
  let paxM = 0;
  for (let j = 0; j < n; j++) {
    load = Math.max(0, load + boardPerDay[j] - alightPerDay[j]);
    loadDepartingPerDay[j] = j === n - 1 ? 0 : load;
    if (j + 1 < n) paxM += load * (posM[j + 1] - posM[j]);
  }
  const ridersPerDay = boardPerDay.reduce((s, x) => s + x, 0);
  const meanTripLengthM = ridersPerDay > 0 ? paxM / ridersPerDay : fallbackTripM;
  return { patternId, boardPerDay, alightPerDay, loadDepartingPerDay, meanTripLengthM, ridersPerDay, demandSource };
}
