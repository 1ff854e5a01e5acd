// Express stretches: a gap of 2 km or more that the schedule runs at the route type's typical cruise speed
// or faster (25 mph for a bus) is a non-stop run no local makes (a local's average over a gap, with its
// starts, stops and signals, stays below its cruise), such as an express or commuter bus on a highway or a
// bridge. Every gap of a route typed express or coach in GTFS (route_type 702, 200-299) is one too. Such a
// gap is the service's design, not a hole in the network: it is not flagged wide and no stop is proposed in
// it (warning express-stretch). The distance and the speed are design choices of this tool [D].

import type { PreparedPattern } from '../model/preparePattern.js';
import { cruiseSpeedBoundsMps } from '../model/cruiseSpeed.js';

/** A gap at least this long, run at least at the route type's typical cruise speed, is an express stretch. */
export const EXPRESS_STRETCH_M = 2000;

/** GTFS extended route types of express and coach services: every gap of theirs is an express stretch. */
export function expressRouteType(routeType: number): boolean {
  return routeType === 702 || (routeType >= 200 && routeType < 300);
}

/** Per model gap of a prepared pattern: is it an express stretch? */
export function expressStretches(prep: PreparedPattern): boolean[] {
  const { pattern, modelStops, posM } = prep;
  const out: boolean[] = [];
  const allExpress = expressRouteType(prep.routeType);
  const typical = cruiseSpeedBoundsMps(prep.routeType).typicalMps;
  for (let m = 0; m + 1 < modelStops.length; m++) {
    if (allExpress) {
      out.push(true);
      continue;
    }
    const gapM = posM[m + 1] - posM[m];
    let runS = 0;
    let interpolated = false;
    for (let j = modelStops[m]; j < modelStops[m + 1]; j++) {
      runS += pattern.gapRunTimeS[j] ?? NaN;
      if (pattern.gapTimeInterpolated[j]) interpolated = true;
    }
    // a time interpolated by distance says nothing of the speed there
    out.push(gapM >= EXPRESS_STRETCH_M && !interpolated && runS > 0 && gapM / runS >= typical);
  }
  return out;
}
