// Which routes a report shows: --routes, --exclude-routes and --route-types choose what is reported, never
// what the figures are computed from. The whole network stays behind every figure (other routes' stops for
// transfers and trunks, their locals for limited-stop gaps), so a route's verdicts are the same whichever
// other routes were asked for.

import { StopspanError } from '../common/errors.js';
import type { Feed } from '../gtfs/types.js';
import { speedFamily, type SpeedFamily } from '../gtfs/routeTypes.js';

export interface RouteSelection {
  /** Only these routes (route_id, or route_short_name). */
  routes?: string[];
  /** Not these routes (route_id, or route_short_name). */
  excludeRoutes?: string[];
  /** Only routes of these types: a GTFS route_type number, or a family (bus, tram, metro, rail, ferry, cable, other). */
  routeTypes?: string[];
}

const FAMILIES: readonly SpeedFamily[] = ['bus', 'tram', 'metro', 'rail', 'ferry', 'cable', 'other'];

function routesNamed(feed: Feed, list: string[], option: string): Set<string> {
  const out = new Set<string>();
  for (const want of list) {
    if (typeof want !== 'string')
      throw new StopspanError('bad-option', `invalid option ${option}: expected route ids`, { value: String(want) });
    if (feed.routes.has(want)) {
      out.add(want);
      continue;
    }
    const hits = [...feed.routes.values()].filter((r) => r.shortName === want);
    if (hits.length === 0)
      throw new StopspanError('bad-option', `invalid option ${option}: no route has id or short name ${want}`, { value: want });
    for (const r of hits) out.add(r.id);
  }
  return out;
}

/** The route types asked for, as a test of a route_type; throws on a value that is neither a number nor a family. */
function typeTest(list: string[]): (routeType: number) => boolean {
  const numbers = new Set<number>();
  const families = new Set<SpeedFamily>();
  for (const raw of list) {
    const v = String(raw).trim().toLowerCase();
    if (/^\d{1,4}$/.test(v)) numbers.add(Number(v));
    else if ((FAMILIES as readonly string[]).includes(v)) families.add(v as SpeedFamily);
    else
      throw new StopspanError('bad-option', `invalid option --route-types: expected GTFS route_type numbers or ${FAMILIES.join(', ')}`, {
        value: String(raw),
      });
  }
  return (t) => numbers.has(t) || families.has(speedFamily(t));
}

/** The route ids to report, or null for every route (no filter given). */
export function selectedRoutes(feed: Feed, { routes, excludeRoutes, routeTypes }: RouteSelection = {}): Set<string> | null {
  const given = (l: string[] | undefined): l is string[] => Array.isArray(l) && l.length > 0;
  if (!given(routes) && !given(excludeRoutes) && !given(routeTypes)) return null;
  const only = given(routes) ? routesNamed(feed, routes, '--routes') : null;
  const not = given(excludeRoutes) ? routesNamed(feed, excludeRoutes, '--exclude-routes') : new Set<string>();
  const ofType = given(routeTypes) ? typeTest(routeTypes) : () => true;
  const out = new Set<string>();
  for (const r of feed.routes.values()) if ((only === null || only.has(r.id)) && !not.has(r.id) && ofType(r.type)) out.add(r.id);
  return out;
}
