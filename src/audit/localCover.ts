// Gaps of a limited-stop pattern that another pattern serves as a local (another route's, or a local of the
// same route_id and direction): the other pattern calls near both
// ends of the gap (within 150 m: limited-stop services often have stops of their own a few metres from the
// local's), in order, with at least one stop between them, and runs at least a quarter as many trips a day.
// Riders between those ends already have a stop on the local, so a long gap there is the limited service's
// design, not a hole in the network: it is not flagged wide and no stop is proposed in it. (A design choice
// of this tool; the radius, the share of trips and the reach of the search are documented defaults.)

import type { PatternSet } from '../network/types.js';
import type { Feed } from '../gtfs/types.js';
import type { PreparedPattern } from '../model/preparePattern.js';
import { haversineM } from '../network/geodesy.js';

/** A local must run at least this share of the limited pattern's trips a day to count. */
export const LOCAL_MIN_TRIP_SHARE = 0.25;
/** A local's stop within this distance of a gap's end counts as calling there. */
export const LOCAL_NEAR_M = 150;
/** How many of the local's stops past the gap's first end are searched for its second end. */
const MAX_LOCAL_STOPS_IN_GAP = 15;
const CELL_DEG = 0.002; // grid cell of the stop index, about 220 m north-south
const M_PER_DEG_LAT = 111_000; // a little under the metres per degree of latitude anywhere (110.6-111.7 km), so the pre-filter never drops a stop inside the radius

/**
 * Per prepared pattern, a function of the model gap: the short name (else id) of a route serving it as a
 * local, or null. The stops are indexed here; each gap is searched when first asked for (the audit asks
 * only for gaps above the band, a small share), and the answer kept.
 */
export function localCoverByGap(feed: Feed, patternSet: PatternSet, preps: PreparedPattern[]): ((m: number) => string | null)[] {
  const patterns = patternSet.patterns;
  const stops = feed.stops;
  // stop -> (pattern, position) pairs, passenger stops only; and a grid of the stops served
  const at = new Map<number, number[]>();
  const grid = new Map<string, number[]>();
  const cell = (lat: number, lon: number) => `${Math.floor(lat / CELL_DEG)},${Math.floor(lon / CELL_DEG)}`;
  patterns.forEach((q, qi) => {
    for (let j = 0; j < q.stopIdx.length; j++) {
      if (q.passengerStop[j] === false) continue;
      const s = q.stopIdx[j];
      let list = at.get(s);
      if (!list) {
        at.set(s, (list = []));
        const st = stops[s];
        if (st && Number.isFinite(st.lat) && Number.isFinite(st.lon)) {
          const key = cell(st.lat, st.lon);
          let g = grid.get(key);
          if (!g) grid.set(key, (g = []));
          g.push(s);
        }
      }
      list.push(qi, j);
    }
  });
  // the stops within LOCAL_NEAR_M of a stop (itself included), once per stop
  const nearMemo = new Map<number, number[]>();
  const near = (s: number): number[] => {
    let out = nearMemo.get(s);
    if (out) return out;
    out = [s];
    nearMemo.set(s, out);
    const st = stops[s];
    if (!st || !Number.isFinite(st.lat) || !Number.isFinite(st.lon)) return out;
    const ci = Math.floor(st.lat / CELL_DEG);
    const cj = Math.floor(st.lon / CELL_DEG);
    // a stop more than the radius away north-south or east-west (with a 1 % margin) is out without the
    // great-circle formula; the formula decides the rest
    const maxDLat = (1.01 * LOCAL_NEAR_M) / M_PER_DEG_LAT;
    const maxDLon = maxDLat / Math.max(1e-6, Math.cos((st.lat * Math.PI) / 180));
    for (let di = -1; di <= 1; di++) {
      for (let dj = -1; dj <= 1; dj++) {
        for (const o of grid.get(`${ci + di},${cj + dj}`) ?? []) {
          const q = stops[o];
          if (o === s || Math.abs(q.lat - st.lat) > maxDLat || Math.abs(q.lon - st.lon) > maxDLon) continue;
          if (haversineM(st.lat, st.lon, q.lat, q.lon) <= LOCAL_NEAR_M) out.push(o);
        }
      }
    }
    return out;
  };
  // membership of the two ends' neighbourhoods by stamp: stamp[s] === gen means "near this gap's end"
  const nearEndA = new Int32Array(stops.length).fill(-1);
  const nearEndB = new Int32Array(stops.length).fill(-1);
  let gen = 0;
  const search = (prep: PreparedPattern, ids: number[], m: number): string | null => {
    const p = prep.pattern;
    {
      gen++;
      const nearA = near(ids[m]);
      for (const a of nearA) nearEndA[a] = gen;
      for (const b of near(ids[m + 1])) nearEndB[b] = gen;
      let by: string | null = null;
      for (const a of nearA) {
        const list = at.get(a) ?? [];
        for (let k = 0; k < list.length && by === null; k += 2) {
          const q = patterns[list[k]];
          // any other pattern, of another route or of the same route (a limited variant under its local's route_id)
          if (q === p || q.tripsPerDay < LOCAL_MIN_TRIP_SHARE * p.tripsPerDay) continue;
          const i = list[k + 1];
          let between = 0;
          for (let j = i + 1; j < q.stopIdx.length && j <= i + MAX_LOCAL_STOPS_IN_GAP; j++) {
            if (q.passengerStop[j] === false) continue;
            const sj = q.stopIdx[j];
            if (nearEndB[sj] === gen) {
              if (between > 0)
                by =
                  q.routeId === p.routeId
                    ? `${feed.routes.get(q.routeId)?.shortName || q.routeId} (pattern ${q.id})`
                    : feed.routes.get(q.routeId)?.shortName || q.routeId;
              break;
            }
            if (nearEndA[sj] !== gen) between++;
          }
        }
        if (by !== null) break;
      }
      return by;
    }
  };
  return preps.map((prep) => {
    const ids = prep.modelStops.map((j) => prep.pattern.stopIdx[j]);
    const known = new Map<number, string | null>();
    return (m: number): string | null => {
      if (!(m >= 0 && m + 1 < ids.length)) return null;
      let by = known.get(m);
      if (by === undefined) known.set(m, (by = search(prep, ids, m)));
      return by;
    };
  });
}
