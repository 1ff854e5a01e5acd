// Fleet and frequency from run time saved: per route, the run time a change saves per round trip, the peak
// vehicles that frees at the route's peak headway, or instead the shorter headway the same fleet could run
// and the waiting time that saves riders, and the operating cost saved when a cost per vehicle-hour is set.
// Vehicles needed = round trip / headway, rounded up (a bus per headway along the cycle); waiting = half the
// headway per boarding (common planning practice for frequent service; riders who time their arrival to
// a long headway wait less, so the waiting figure is an upper estimate there).

import type { Feed } from '../gtfs/types.js';
import type { PreparedPattern } from '../model/preparePattern.js';

/** The fleet arithmetic of one route: cycle and headway in, vehicles and headways out (seconds). */
export interface FleetFigures {
  vehiclesBefore: number;
  vehiclesAfter: number; // at the same headway
  vehiclesFreed: number; // whole vehicles
  vehicleShareFreed: number; // saved / headway: the fraction of a vehicle the saving is worth
  headwaySameFleetS: number; // the same fleet on the shorter cycle: headway x new cycle / old cycle
  waitSavedPerBoardingS: number; // half the headway change
}

const EPS = 1e-9;

/** Vehicles, and the headway the same fleet could run, for a cycle of roundTripS shortened by savedS at headwayS. */
export function fleetFigures(roundTripS: number, savedS: number, headwayS: number): FleetFigures {
  const vehiclesBefore = Math.max(1, Math.ceil(roundTripS / headwayS - EPS));
  const after = roundTripS - savedS;
  const vehiclesAfter = Math.max(1, Math.ceil(after / headwayS - EPS));
  // the same vehicles on a cycle shorter by savedS come round proportionally sooner (60 min at 10 min is
  // 6 vehicles; on a 54 min cycle they come every 9 min)
  const headwaySameFleetS = (headwayS * after) / roundTripS;
  return {
    vehiclesBefore,
    vehiclesAfter,
    vehiclesFreed: vehiclesBefore - vehiclesAfter,
    vehicleShareFreed: savedS / headwayS,
    headwaySameFleetS: Math.min(headwayS, headwaySameFleetS),
    waitSavedPerBoardingS: Math.max(0, (headwayS - headwaySameFleetS) / 2),
  };
}

export interface RouteFleet {
  routeId: string;
  roundTripS: number; // scheduled run time out and back (busiest pattern's direction means), no layover
  runTimeSavedPerRoundTripS: number;
  peakHeadwayS: number | null; // from the busiest hour of departures in the busier direction; null when under 2 trips
  peakVehiclesBefore: number | null;
  peakVehiclesFreed: number | null;
  vehicleShareFreed: number | null;
  headwaySameFleetS: number | null;
  boardingsPerDay: number;
  waitSavedPaxMinPerDay: number | null; // at the day's mean headway, every boarding, half the headway change
  vehicleHoursPerDay: number;
  operatingCostSavedPerDay: number | null; // vehicle-hours x operating_cost_per_vehicle_hour, when set
}

/** Departure seconds of a pattern's trips on the analysis date (first stop), ascending. */
function departures(feed: Feed, prep: PreparedPattern): number[] {
  const out: number[] = [];
  for (const t of prep.pattern.tripIds) {
    const st = feed.stopTimes.get(t);
    if (!st || st.depS.length === 0) continue;
    const d = st.depS[0] >= 0 ? st.depS[0] : st.arrS[0];
    if (d >= 0) out.push(d);
  }
  return out.sort((a, b) => a - b);
}

/** The shortest mean headway over any hour of departures, and the day's mean headway. */
export function headways(deps: number[]): { peakS: number; meanS: number } | null {
  if (deps.length < 2) return null;
  let best = 1;
  for (let i = 0, j = 0; i < deps.length; i++) {
    while (deps[i] - deps[j] >= 3600) j++;
    best = Math.max(best, i - j + 1);
  }
  const meanS = (deps[deps.length - 1] - deps[0]) / (deps.length - 1);
  return { peakS: Math.max(3600 / best, 60), meanS: Math.max(meanS, 60) };
}

/**
 * Per route touched by a change: effects give each changed pattern's run time saved per trip and
 * vehicle-hours; preps are every pattern (a route's unchanged patterns count in its means).
 */
export function routeFleet(
  feed: Feed,
  preps: PreparedPattern[],
  effects: { patternId: string; routeId: string; runTimeSavedPerTripS: number; vehicleHoursPerDay: number }[],
  costPerVehicleHour: number | null,
): RouteFleet[] {
  const saved = new Map(effects.map((e) => [e.patternId, e.runTimeSavedPerTripS]));
  const routes = [...new Set(effects.map((e) => e.routeId))].sort();
  return routes.map((routeId) => {
    const mine = preps.filter((p) => p.pattern.routeId === routeId);
    const byDir = new Map<number, PreparedPattern[]>();
    for (const p of mine) byDir.set(p.pattern.directionId, [...(byDir.get(p.pattern.directionId) ?? []), p]);
    let roundTripS = 0;
    let savedS = 0;
    let busiest: PreparedPattern[] = [];
    let busiestTrips = -1;
    for (const list of byDir.values()) {
      const trips = list.reduce((s, p) => s + p.pattern.tripsPerDay, 0);
      if (!(trips > 0)) continue;
      roundTripS += list.reduce((s, p) => s + p.pattern.runTimeS * p.pattern.tripsPerDay, 0) / trips;
      savedS += list.reduce((s, p) => s + (saved.get(p.pattern.id) ?? 0) * p.pattern.tripsPerDay, 0) / trips;
      if (trips > busiestTrips) ((busiestTrips = trips), (busiest = list));
    }
    const h = headways(busiest.flatMap((p) => departures(feed, p)).sort((a, b) => a - b));
    const f = h && roundTripS > 0 ? fleetFigures(roundTripS, savedS, h.peakS) : null;
    const boardings = mine.reduce((s, p) => s + p.demand.ridersPerDay, 0);
    const wait = h && roundTripS > 0 ? fleetFigures(roundTripS, savedS, h.meanS).waitSavedPerBoardingS : null;
    const vh = effects.filter((e) => e.routeId === routeId).reduce((s, e) => s + e.vehicleHoursPerDay, 0);
    return {
      routeId,
      roundTripS,
      runTimeSavedPerRoundTripS: savedS,
      peakHeadwayS: h?.peakS ?? null,
      peakVehiclesBefore: f?.vehiclesBefore ?? null,
      peakVehiclesFreed: f?.vehiclesFreed ?? null,
      vehicleShareFreed: f?.vehicleShareFreed ?? null,
      headwaySameFleetS: f?.headwaySameFleetS ?? null,
      boardingsPerDay: boardings,
      waitSavedPaxMinPerDay: wait === null ? null : (wait * boardings) / 60,
      vehicleHoursPerDay: vh,
      operatingCostSavedPerDay: costPerVehicleHour === null ? null : vh * costPerVehicleHour,
    };
  });
}
