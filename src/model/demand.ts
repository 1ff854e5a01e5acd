// Each pattern's demand: boardings and alightings per day at its (passenger) stops, the load on board
// departing each stop, and the mean in-vehicle trip length. From a ridership file, or assumed: trip ends
// spread evenly along the pattern, each origin before its destination, and riders' trip lengths following
// an exponential distribution whose mean is a typical figure for the route type (or the user's
// mean_trip_length_m), truncated by the pattern's ends: a pattern holds only the trips that fit on it, and
// the distribution's scale is solved so the trips that fit have the mean asked for. A pattern too short
// for that mean holds what fits (origins and destinations uniform, a mean of about a third of its length),
// and says so. Trip lengths then do not grow with the route.
//
// The exponential is chosen for what it makes exact and cheap: riders on board at a point have the same
// remaining trip length wherever they boarded (it has no memory), so the corridor's rule for riders
// passing a stop (riders on board taken alike) is exact on these counts, and the sums behind them take
// O(n) per pattern.

import type { WarningSink } from '../common/warnings.js';
import type { DemandSource } from './types.js';
import type { Pattern } from '../network/types.js';
import type { Ridership } from './ridership.js';
import { speedFamily } from '../gtfs/routeTypes.js';

const MILE_M = 1609.344;

/**
 * US national mean unlinked trip by mode, 2011: passenger-miles over unlinked trips. Passenger-miles
 * [S, US BTS National Transportation Statistics table 1-40, as quoted in BTS "Passenger Travel" table 2-1:
 * motor bus 19 883, heavy rail 17 317, light rail 2 198, commuter rail 11 314, ferry boat 389 million];
 * unlinked trips [M, APTA Public Transportation Fact Book, from memory: bus about 5 250, heavy rail about
 * 3 700, light rail about 460, commuter rail about 465, ferry about 78 million].
 */
export const NATIONAL_MEAN_TRIP_MI = {
  bus: 19_883 / 5_250,
  tram: 2_198 / 460,
  metro: 17_317 / 3_700,
  rail: 11_314 / 465,
  ferry: 389 / 78,
} as const;

/**
 * The typical mean in-vehicle trip on a city's local buses: about 2 miles (3.2 km) [M, from memory: large
 * US cities' local bus networks report passenger-miles over unlinked trips of about 1.8-2.5 mi]. The national
 * motor-bus mean (3.8 mi) is not used for buses: it is lifted by suburban and long-haul services, and on a
 * city's routes it does not fit (on one borough's buses it fitted on 1 pattern in 151, so every other one
 * fell back to trips a third of its length and the optimum followed route length again). A planner with the
 * agency's own figure sets mean_trip_length_m.
 */
export const CITY_BUS_MEAN_TRIP_M = 2 * MILE_M;

/**
 * The typical mean in-vehicle trip length (one boarding to its alighting, an unlinked trip) by the family of
 * the GTFS route_type: the city-bus figure for buses (and for cable cars, funiculars and the rest), the US
 * national figure by mode for the others.
 */
export function typicalTripLengthM(routeType: number): number {
  switch (speedFamily(routeType)) {
    case 'bus':
      return CITY_BUS_MEAN_TRIP_M;
    case 'tram':
      return NATIONAL_MEAN_TRIP_MI.tram * MILE_M;
    case 'metro':
      return NATIONAL_MEAN_TRIP_MI.metro * MILE_M;
    case 'rail':
      return NATIONAL_MEAN_TRIP_MI.rail * MILE_M;
    case 'ferry':
      return NATIONAL_MEAN_TRIP_MI.ferry * MILE_M;
    default:
      return CITY_BUS_MEAN_TRIP_M;
  }
}

/**
 * Riders between two stretches of a pattern: for stops i < j (catchment lengths len_i, len_j, positions
 * x_i, x_j) perM2 * len_i * len_j * exp(-(x_j - x_i) / decayM) riders a day, spread evenly over the two
 * catchments; decayM Infinity for origins and destinations uniform.
 */
export interface PairModel {
  decayM: number;
  perM2: number;
}

export interface PatternDemand {
  patternId: string;
  boardPerDay: number[]; // per model stop
  alightPerDay: number[];
  loadDepartingPerDay: number[];
  meanTripLengthM: number; // of the load profile: passenger-metres over boardings
  ridersPerDay: number;
  demandSource: DemandSource;
  /** Assumed demand only: the trips behind the counts (what the corridor's rule for riders passing a stop takes them to be). */
  pairs?: PairModel;
  /** Assumed demand only: the mean trip asked for, and whether the pattern is too short to hold it. */
  askedTripLengthM?: number;
  tooShortForTrip?: boolean;
}

/** Each stop's catchment length: midpoint to midpoint, at most catchmentHalfMaxM either side. */
export function catchmentLengths(posM: number[], catchmentHalfMaxM: number): number[] {
  const n = posM.length;
  return posM.map(
    (x, j) =>
      (j === n - 1 ? x : Math.min((x + posM[j + 1]) / 2, x + catchmentHalfMaxM)) -
      (j === 0 ? x : Math.max((posM[j - 1] + x) / 2, x - catchmentHalfMaxM)),
  );
}

/** For stops i < j weighted len_i * len_j * exp(-(x_j - x_i)/decay): the sum of weights and of weights times x_j - x_i. O(n). */
function pairSums(posM: number[], len: number[], decayM: number): { weight: number; moment: number } {
  const n = posM.length;
  let G = 0; // sum over j > i of len_j e^{-(x_j - x_i)/decay}
  let H = 0; // the same times (x_j - x_i)
  let weight = 0;
  let moment = 0;
  for (let i = n - 2; i >= 0; i--) {
    const d = posM[i + 1] - posM[i];
    const e = Number.isFinite(decayM) ? Math.exp(-d / decayM) : 1;
    H = e * (H + d * G + len[i + 1] * d);
    G = e * (G + len[i + 1]);
    weight += len[i] * G;
    moment += len[i] * H;
  }
  return { weight, moment };
}

/**
 * Assumed demand on a pattern whose model stops sit at `posM`: boardingsPerTripKm riders per trip and km,
 * trip ends spread evenly over the stops' catchments (midpoint to midpoint, at most catchmentHalfMaxM from a
 * stop, so a long gap holds no riders in its middle), riders from stop i to stop j > i in proportion to the
 * two catchment lengths times exp(-(x_j - x_i)/decay), the decay solved so the mean trip is meanTripM.
 * With peopleAtStops (a land-use layer's people in each stop's catchment, src/model/catchments.ts) the people
 * take the place of the catchment lengths: the pattern's riders are the same, their trip ends follow the
 * map, and the figures are marked land-use; a stop with nobody in its catchment has no trip ends.
 * Boardings and alightings are always consistent (nobody alights before boarding, the load never goes
 * negative). Where even uniform pairs (the longest mean this family holds, about a third of the length)
 * fall short of meanTripM by more than 1 %, uniform pairs are used and tooShortForTrip is set.
 */
export function assumedDemand(
  patternId: string,
  posM: number[],
  tripsPerDay: number,
  {
    boardingsPerTripKm,
    catchmentHalfMaxM = Infinity,
    meanTripM = typicalTripLengthM(3),
    peopleAtStops,
  }: { boardingsPerTripKm: number; catchmentHalfMaxM?: number; meanTripM?: number; peopleAtStops?: ArrayLike<number> },
): PatternDemand {
  const n = posM.length;
  const D = posM[n - 1] - posM[0];
  const riders = boardingsPerTripKm * (D / 1000) * tripsPerDay;
  // each stop's share of the trip ends: its catchment's length along the route, or the people in it
  const len = peopleAtStops ? Array.from(peopleAtStops) : catchmentLengths(posM, catchmentHalfMaxM);
  const meanOf = (decayM: number): number => {
    const { weight, moment } = pairSums(posM, len, decayM);
    return weight > 0 ? moment / weight : 0;
  };
  let decayM = Infinity;
  const longest = meanOf(Infinity);
  // a pattern with nobody in its catchments (land use) holds no trips at all, not trips too short
  const tooShortForTrip = longest < meanTripM * 0.99 && len.some((x) => x > 0);
  if (longest > meanTripM && meanTripM > 0) {
    // the mean grows with the decay (an exponential family): bisect on its logarithm. The decay stays at
    // least a fiftieth of the longest gap between neighbouring stops, so no neighbours' riders vanish in
    // underflow; where even that decay gives trips longer than asked (stops too far apart for such short
    // trips), it is used: the shortest trips the pattern holds.
    let maxGapM = 0;
    for (let j = 1; j < n; j++) maxGapM = Math.max(maxGapM, posM[j] - posM[j - 1]);
    const lowest = Math.max(meanTripM / 1000, maxGapM / 50);
    if (meanOf(lowest) >= meanTripM) decayM = lowest;
    else {
      let lo = Math.log(lowest);
      let hi = Math.log(Math.max(meanTripM, lowest) * 1000);
      while (meanOf(Math.exp(hi)) < meanTripM && hi < 700) hi += 5;
      for (let it = 0; it < 80 && hi - lo > 1e-9; it++) {
        const mid = (lo + hi) / 2;
        if (meanOf(Math.exp(mid)) < meanTripM) lo = mid;
        else hi = mid;
      }
      decayM = Math.exp((lo + hi) / 2);
    }
  }
  const { weight } = pairSums(posM, len, decayM);
  const c = weight > 0 && Number.isFinite(riders / weight) ? riders / weight : 0;
  // boardings: c len_i sum_{j>i} len_j K; alightings: c len_j sum_{i<j} len_i K
  const boardPerDay: number[] = new Array(n).fill(0);
  const alightPerDay: number[] = new Array(n).fill(0);
  let G = 0;
  for (let i = n - 2; i >= 0; i--) {
    const e = Number.isFinite(decayM) ? Math.exp(-(posM[i + 1] - posM[i]) / decayM) : 1;
    G = e * (G + len[i + 1]);
    boardPerDay[i] = c * len[i] * G;
  }
  let F = 0;
  for (let j = 1; j < n; j++) {
    const e = Number.isFinite(decayM) ? Math.exp(-(posM[j] - posM[j - 1]) / decayM) : 1;
    F = e * (F + len[j - 1]);
    alightPerDay[j] = c * len[j] * F;
  }
  const out = finish(patternId, posM, boardPerDay, alightPerDay, peopleAtStops ? 'land-use' : 'assumed', Math.min(meanTripM, D / 3));
  out.pairs = { decayM, perM2: c };
  out.askedTripLengthM = meanTripM;
  out.tooShortForTrip = tooShortForTrip;
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
      warnings.add('ridership-unserved-stop', `${ridership.file}:${row.line} ${row.stopId}`);
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
  if (missing > 0) warnings.add('ridership-stop-missing', undefined, missing);
  const out = new Map<string, PatternDemand>();
  patterns.forEach(({ pattern, posM }, p) => {
    const b = board[p];
    const a = alight[p];
    const sumB = b.reduce((s, x) => s + x, 0);
    const sumA = a.reduce((s, x) => s + x, 0);
    if (sumB > 0 && sumA > 0) {
      const scale = sumB / sumA;
      if (Math.abs(scale - 1) > 0.01) warnings.add('ridership-unbalanced', `${pattern.id} x${scale.toFixed(3)}`);
      for (let j = 0; j < a.length; j++) a[j] *= scale;
    } else if (sumB > 0 || sumA > 0) {
      warnings.add('ridership-one-sided', pattern.id);
      b.fill(0);
      a.fill(0);
    }
    const D = posM[posM.length - 1] - posM[0];
    out.set(pattern.id, finish(pattern.id, posM, b, a, 'observed', D / 3));
  });
  return out;
}

function finish(
  patternId: string,
  posM: number[],
  boardPerDay: number[],
  alightPerDay: number[],
  demandSource: DemandSource,
  fallbackTripM: number,
): PatternDemand {
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
