// Stops of the audited network within walking distance of a station of another feed given as context
// (--context): each is a transfer point to that mode and is kept, its note naming the nearest station and
// the distance. The radius, 150 m, is a design choice of this tool [D]: about two minutes' walk at the
// model's walking speed, the same reach as a local's stop counting as serving a limited-stop gap.
// contextStops is the one way every command that takes --context (audit, whatif, check, compare) reads the
// context feeds and matches them to its stops; the stations themselves are also evidence for additions.

import type { Feed } from '../gtfs/types.js';
import type { PatternSet } from './types.js';
import { readContextFeeds, type ContextFeed } from '../gtfs/readContext.js';
import type { FetchOptions } from '../gtfs/download.js';
import { WarningSink } from '../common/warnings.js';
import { haversineM } from './geodesy.js';

/** A stop within this distance of a context station is a transfer point to it. */
export const CONTEXT_STATION_RADIUS_M = 150;
const CELL_DEG = 0.002; // grid cell, about 220 m north-south: the radius never reaches past the next cell
const M_PER_DEG_LAT = 111_000; // a little under the metres per degree anywhere, so the pre-filter never drops a station inside the radius

/** A context station as the audit uses it: its name, the label of its feed, its place. */
export interface StationPoint {
  name: string;
  label: string;
  lat: number;
  lon: number;
}

/** Every station of the context feeds, labelled by its feed. */
export function stationPoints(contexts: readonly ContextFeed[]): StationPoint[] {
  return contexts.flatMap((c) => c.stations.map((s) => ({ name: s.name, label: c.label, lat: s.lat, lon: s.lon })));
}

/** How a stop or site names a context station: "station 59 St (nyct-subway), 60 m". */
export function stationNote(s: StationPoint, distanceM: number): string {
  return `station ${s.name} (${s.label}), ${Math.round(distanceM)} m`;
}

/** Stop index -> note ("station 59 St (nyct-subway), 60 m") for every served stop near a context station. */
export function stopsNearStations(
  feed: Feed,
  patterns: PatternSet,
  contexts: ContextFeed[],
  radiusM = CONTEXT_STATION_RADIUS_M,
): Map<number, string> {
  const out = new Map<number, string>();
  if (contexts.length === 0) return out;
  const cell = (lat: number, lon: number) => `${Math.floor(lat / CELL_DEG)},${Math.floor(lon / CELL_DEG)}`;
  const grid = new Map<string, StationPoint[]>();
  for (const p of stationPoints(contexts)) {
    const key = cell(p.lat, p.lon);
    let list = grid.get(key);
    if (!list) grid.set(key, (list = []));
    list.push(p);
  }
  const reach = Math.ceil(radiusM / (CELL_DEG * M_PER_DEG_LAT * 0.5)); // cells to search each way (longitude cells shrink with latitude)
  const seen = new Set<number>();
  for (const p of patterns.patterns) {
    for (const s of p.stopIdx) {
      if (seen.has(s)) continue;
      seen.add(s);
      const st = feed.stops[s];
      if (!st || !Number.isFinite(st.lat) || !Number.isFinite(st.lon)) continue;
      const ci = Math.floor(st.lat / CELL_DEG);
      const cj = Math.floor(st.lon / CELL_DEG);
      const maxDLat = (1.01 * radiusM) / M_PER_DEG_LAT;
      const maxDLon = maxDLat / Math.max(1e-6, Math.cos((st.lat * Math.PI) / 180));
      let best: { d: number; q: StationPoint } | null = null;
      for (let di = -reach; di <= reach; di++) {
        for (let dj = -reach; dj <= reach; dj++) {
          for (const q of grid.get(`${ci + di},${cj + dj}`) ?? []) {
            if (Math.abs(q.lat - st.lat) > maxDLat || Math.abs(q.lon - st.lon) > maxDLon) continue;
            const d = haversineM(st.lat, st.lon, q.lat, q.lon);
            if (d <= radiusM && (best === null || d < best.d)) best = { d, q };
          }
        }
      }
      if (best) out.set(s, stationNote(best.q, best.d));
    }
  }
  return out;
}

/** What the context feeds give a run: the served stops near their stations (transfer points), and the stations. */
export interface ContextStops {
  /** Stop index -> note naming the nearest context station within CONTEXT_STATION_RADIUS_M. */
  near: Map<number, string>;
  /** Every context station (evidence of where people are, for additions). */
  stations: StationPoint[];
  /** Each context feed read: its label, its stations, its services on the date (null without a date). */
  feeds: { label: string; source: string; stations: number; servicesOnDate: number | null }[];
}

/**
 * The context feeds given (--context) read on the feed's analysis date, their warnings added to the feed's,
 * the served stops near their stations and the stations themselves: how every command that takes --context
 * gets them (audit, whatif, check, compare), so they all read the same stations by the same rule.
 */
export async function contextStops(
  feed: Feed,
  patterns: PatternSet,
  sources: readonly string[],
  fetch: FetchOptions = {},
): Promise<ContextStops> {
  if (sources.length === 0) return { near: new Map(), stations: [], feeds: [] };
  const warnings = new WarningSink();
  // the user's extra headers (an API key for the feed's host) are not sent to the context feeds' hosts
  const contexts = await readContextFeeds(sources, {
    date: feed.date ?? (patterns.date || undefined),
    warnings,
    fetch: { ...fetch, headers: undefined },
  });
  feed.warnings.push(...warnings.list());
  return {
    near: stopsNearStations(feed, patterns, contexts),
    stations: stationPoints(contexts),
    feeds: contexts.map((c) => ({ label: c.label, source: c.source, stations: c.stations.length, servicesOnDate: c.servicesOnDate })),
  };
}
