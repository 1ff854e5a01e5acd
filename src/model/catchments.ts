// Catchments and coverage from a land-use layer. Each person (a weighted point of the layer) walks to the
// nearest stop within a walk of WALK_RADIUS_M at WALK_DETOUR times the straight line (src/model/walkReach.ts):
// on one pattern, to that pattern's nearest stop (the people of a pattern's stop are its catchment, which
// sets its share of the pattern's trip ends); on the network, to the nearest stop served at all (coverage).
// People beyond every stop's walk are uncovered; a feature none of whose points is within a walk of a stop
// touches no catchment and is counted. A point 25 km or more from every stop of the feed is an error (a
// layer of another place, or latitude and longitude swapped), naming the row or feature. For the page's
// maps, the layer's people are also summed into squares near the stops served (densityGrid), bounded in
// number so the page stays small.

import { StopspanError } from '../common/errors.js';
import type { Feed } from '../gtfs/types.js';
import { haversineM } from '../network/geodesy.js';
import type { LandUseLayer } from '../landuse/readLandUse.js';
import { PointGrid } from '../landuse/pointGrid.js';
import { WALK_RADIUS_M, WALK_REACH_M } from './walkReach.js';

/** A land-use point this far (metres, straight line) from every stop of the feed is refused [D]. */
export const LAND_USE_FAR_M = 25_000;

/** A pattern's passenger stops as feed stop indices, in order (one per model stop). */
export interface CatchmentPattern {
  patternId: string;
  stops: number[];
}

export interface Catchments {
  layer: LandUseLayer;
  /** People (weighted) whose nearest stop of the pattern, within a walk, is each model stop. */
  peopleAtStops: Map<string, Float64Array>;
  /** People (weighted) within a walk of a stop of the pattern. */
  coveredByPattern: Map<string, number>;
  /** People (weighted) and each column's amount within a walk of a stop served. */
  coveredPeople: number;
  coveredAmounts: number[];
  /** Features with no point within a walk of a stop served. */
  featuresOutside: number;
  /** People (weighted) within a walk of this feed stop and of no other stop served: what its closing leaves uncovered. */
  onlyStop: Map<number, number>;
  /** Straight-line metres from each point to its nearest stop served within the reach; Infinity beyond every one. */
  nearestM: Float64Array;
  /** The stops served, on a grid, and every feed stop's coordinates. */
  stopGrid: PointGrid;
  stopLat: number[];
  stopLon: number[];
  served: Set<number>;
  /** The layer's points on a grid (made when first asked for). */
  pointGrid(): PointGrid;
}

/** Refuses a layer with a point 25 km or more from every stop of the feed, naming its row or feature. */
function checkNearStops(layer: LandUseLayer, feed: Feed): void {
  const COARSE = 0.25; // degrees: at least 27 km north-south
  const cells = new Map<string, number[]>();
  feed.stops.forEach((s, i) => {
    if (!Number.isFinite(s.lat) || !Number.isFinite(s.lon) || (s.lat === 0 && s.lon === 0)) return;
    const key = `${Math.floor(s.lat / COARSE)},${Math.floor(s.lon / COARSE)}`;
    let c = cells.get(key);
    if (!c) cells.set(key, (c = []));
    c.push(i);
  });
  const known = new Map<string, boolean>(); // fine cells (about 1 km) already found near a stop
  for (let i = 0; i < layer.lat.length; i++) {
    const lat = layer.lat[i];
    const lon = layer.lon[i];
    const fine = `${Math.floor(lat * 100)},${Math.floor(lon * 100)}`;
    if (known.get(fine)) continue;
    const ci = Math.floor(lat / COARSE);
    const cj = Math.floor(lon / COARSE);
    const spanJ = Math.ceil(1 / Math.max(0.01, Math.cos(Math.min(89.9, Math.abs(lat) + COARSE) * (Math.PI / 180))));
    let near = false;
    for (let a = ci - 1; a <= ci + 1 && !near; a++) {
      for (let b = cj - spanJ; b <= cj + spanJ && !near; b++) {
        for (const s of cells.get(`${a},${b}`) ?? []) {
          // within the distance less the fine cell's size (about 1.6 km at most), so the whole fine cell is near
          if (haversineM(lat, lon, feed.stops[s].lat, feed.stops[s].lon) <= LAND_USE_FAR_M - 1600) {
            near = true;
            known.set(fine, true);
            break;
          }
        }
      }
    }
    if (!near) {
      // the shortcut refused a point it may accept: measure to every stop of the window
      let best = Infinity;
      for (let a = ci - 1; a <= ci + 1; a++)
        for (let b = cj - spanJ; b <= cj + spanJ; b++)
          for (const s of cells.get(`${a},${b}`) ?? []) best = Math.min(best, haversineM(lat, lon, feed.stops[s].lat, feed.stops[s].lon));
      if (best < LAND_USE_FAR_M) continue;
      const k = layer.featureOf[i];
      const ref = layer.format === 'csv' ? { line: layer.featureRef[k] } : {};
      const at = layer.format === 'csv' ? '' : `feature ${layer.featureRef[k]}: `;
      throw new StopspanError(
        'bad-land-use',
        `${at}coordinates ${LAND_USE_FAR_M / 1000} km or more from every stop of the feed (a layer of another place, or lat and lon swapped?)`,
        {
          file: layer.file,
          ...ref,
          column: layer.format === 'csv' ? 'lat' : 'geometry',
          value: `${lat.toFixed(6)},${lon.toFixed(6)}`,
        },
      );
    }
  }
}

/** Catchments of every pattern's stops and the network's coverage, from a land-use layer. */
export function buildCatchments(layer: LandUseLayer, feed: Feed, patterns: readonly CatchmentPattern[]): Catchments {
  checkNearStops(layer, feed);
  const served = new Set<number>();
  const at = new Map<number, { p: number; m: number }[]>(); // feed stop -> (pattern, model stop)
  patterns.forEach(({ stops }, p) => {
    stops.forEach((s, m) => {
      served.add(s);
      let list = at.get(s);
      if (!list) at.set(s, (list = []));
      list.push({ p, m });
    });
  });
  const stopLat = feed.stops.map((s) => s.lat);
  const stopLon = feed.stops.map((s) => s.lon);
  const stopGrid = new PointGrid(stopLat, stopLon, served);
  const peopleAt = patterns.map(({ stops }) => new Float64Array(stops.length));
  const coveredP = new Float64Array(patterns.length);
  const n = layer.lat.length;
  const nearestM = new Float64Array(n).fill(Infinity);
  const onlyStop = new Map<number, number>();
  const coveredAmounts = layer.columns.map(() => 0);
  let coveredPeople = 0;
  const touched = new Uint8Array(layer.features);
  // per point: the best stop of each pattern within reach (stamped, so nothing is cleared between points)
  const bestD = new Float64Array(patterns.length);
  const bestM = new Int32Array(patterns.length);
  const stamp = new Int32Array(patterns.length).fill(-1);
  const seen: number[] = [];
  // the stops within reach of a point, in the grid's order: each pattern takes its nearest, the first of equals
  const nearS: number[] = [];
  const nearD: number[] = [];
  const visit = (s: number, d: number): void => {
    nearS.push(s);
    nearD.push(d);
  };
  for (let i = 0; i < n; i++) {
    nearS.length = 0;
    nearD.length = 0;
    stopGrid.near(layer.lat[i], layer.lon[i], WALK_REACH_M, visit);
    if (nearS.length === 0) continue;
    const people = layer.people[i];
    touched[layer.featureOf[i]] = 1;
    let nearest = Infinity;
    for (const d of nearD) if (d < nearest) nearest = d;
    nearestM[i] = nearest;
    coveredPeople += people;
    for (let c = 0; c < coveredAmounts.length; c++) coveredAmounts[c] += layer.amounts[c][i];
    if (nearS.length === 1) onlyStop.set(nearS[0], (onlyStop.get(nearS[0]) ?? 0) + people);
    seen.length = 0;
    for (let q = 0; q < nearS.length; q++) {
      const d = nearD[q];
      for (const { p, m } of at.get(nearS[q]) ?? []) {
        if (stamp[p] !== i) {
          stamp[p] = i;
          bestD[p] = d;
          bestM[p] = m;
          seen.push(p);
        } else if (d < bestD[p]) {
          bestD[p] = d;
          bestM[p] = m;
        }
      }
    }
    for (const p of seen) {
      peopleAt[p][bestM[p]] += people;
      coveredP[p] += people;
    }
  }
  let featuresOutside = 0;
  for (let k = 0; k < touched.length; k++) if (!touched[k]) featuresOutside++;
  let grid: PointGrid | null = null;
  return {
    layer,
    peopleAtStops: new Map(patterns.map((pt, p) => [pt.patternId, peopleAt[p]])),
    coveredByPattern: new Map(patterns.map((pt, p) => [pt.patternId, coveredP[p]])),
    coveredPeople,
    coveredAmounts,
    featuresOutside,
    onlyStop,
    nearestM,
    stopGrid,
    stopLat,
    stopLon,
    served,
    pointGrid: () => (grid ??= new PointGrid(layer.lat, layer.lon)),
  };
}

/**
 * People a new stop at lat, lon would serve: those within a walk of it who are nearer to it than to any stop
 * served today (`newlyCovered`: those of them beyond every stop's walk today).
 */
export function peopleForNewStop(c: Catchments, lat: number, lon: number): { people: number; newlyCovered: number } {
  let people = 0;
  let newlyCovered = 0;
  c.pointGrid().near(lat, lon, WALK_REACH_M, (i, d) => {
    if (d < c.nearestM[i]) {
      people += c.layer.people[i];
      if (c.nearestM[i] === Infinity) newlyCovered += c.layer.people[i];
    }
  });
  return { people, newlyCovered };
}

/**
 * People (weighted) within a walk of a stop served after a change: the stops in `closed` no longer served
 * (by any pattern), the places in `opened` served besides.
 */
export function coveredAfter(c: Catchments, closed: ReadonlySet<number>, opened: readonly { lat: number; lon: number }[]): number {
  const { layer } = c;
  const openGrid = new PointGrid(
    opened.map((o) => o.lat),
    opened.map((o) => o.lon),
  );
  let covered = 0;
  for (let i = 0; i < layer.lat.length; i++) {
    let ok = false;
    if (c.nearestM[i] !== Infinity) {
      c.stopGrid.near(layer.lat[i], layer.lon[i], WALK_REACH_M, (s) => {
        if (!closed.has(s)) ok = true;
      });
    }
    if (!ok && opened.length > 0) openGrid.near(layer.lat[i], layer.lon[i], WALK_REACH_M, () => (ok = true));
    if (ok) covered += layer.people[i];
  }
  return covered;
}

/**
 * The side of the squares the layer's people are summed into for the page's maps, metres [D, a design
 * choice]: about half a walk's straight reach, fine enough to show which blocks along a route hold people,
 * coarse enough that a city's layer is a few thousand squares.
 */
export const DENSITY_CELL_M = 150;
/** Squares are kept only with a stop served within this straight line of their centre [D]: twice a walk, the maps' view around a route. */
export const DENSITY_NEAR_M = 2 * WALK_RADIUS_M;
/** Most squares kept for the page; beyond it the squares are made twice as wide until they fit [D]. About 12 bytes each in the page. */
export const MAX_DENSITY_CELLS = 6_000;

/** The layer's people summed into squares near the stops served: what the page's maps draw under each route. */
export interface DensityGrid {
  /** The squares' side, metres (DENSITY_CELL_M, doubled while more than MAX_DENSITY_CELLS would be kept). */
  cellM: number;
  /** Square (i, j) spans latitudes lat0 + i latStep to lat0 + (i + 1) latStep, longitudes likewise with lonStep. */
  latStep: number;
  lonStep: number;
  lat0: number;
  lon0: number;
  /** The squares with people in them: [i, j, people] triples, flat, people (weighted) to the whole person; squares with none left out. */
  cells: number[];
}

const KEY_OFFSET = 1 << 20;
const KEY_ROW = 1 << 21;

/** Metres per degree of latitude on the sphere the distances are measured on (haversineM's radius, 6 371 008.8 m) [D: pi R / 180]. */
const M_PER_DEG_LAT = (Math.PI * 6_371_008.8) / 180;

/** The layer's people in squares of DENSITY_CELL_M (or wider, see MAX_DENSITY_CELLS) near the stops served. */
export function densityGrid(c: Catchments): DensityGrid {
  const { layer } = c;
  let sumLat = 0;
  let sumLon = 0;
  let n = 0;
  for (let i = 0; i < layer.lat.length; i++) {
    sumLat += layer.lat[i];
    sumLon += layer.lon[i];
    n++;
  }
  // the origin on a round 0.01 degree near the layer's middle, so the squares' numbers stay small
  const lat0 = n > 0 ? Math.round((sumLat / n) * 100) / 100 : 0;
  const lon0 = n > 0 ? Math.round((sumLon / n) * 100) / 100 : 0;
  const cos = Math.max(0.01, Math.cos(lat0 * (Math.PI / 180)));
  for (let cellM = DENSITY_CELL_M; ; cellM *= 2) {
    const latStep = cellM / M_PER_DEG_LAT;
    const lonStep = latStep / cos;
    // a square's key: its row and column, each offset by 2^20 (more squares than the Earth is wide), as one number
    const sums = new Map<number, number>();
    for (let i = 0; i < layer.lat.length; i++) {
      if (!(layer.people[i] > 0)) continue;
      const key =
        (Math.floor((layer.lat[i] - lat0) / latStep) + KEY_OFFSET) * KEY_ROW + Math.floor((layer.lon[i] - lon0) / lonStep) + KEY_OFFSET;
      sums.set(key, (sums.get(key) ?? 0) + layer.people[i]);
    }
    // the squares near a stop served: around each stop, those whose centre is within the reach (metres in the
    // layer's local frame, as the squares are laid out)
    const reachM = DENSITY_NEAR_M + cellM * Math.SQRT1_2; // the centre's distance, so a square any part of which is near
    const span = Math.ceil(reachM / cellM) + 1;
    const reach2 = (reachM / cellM) * (reachM / cellM);
    const near = new Set<number>();
    for (const s of c.served) {
      const stop = { lat: c.stopLat[s], lon: c.stopLon[s] };
      if (!Number.isFinite(stop.lat) || !Number.isFinite(stop.lon)) continue;
      const si = Math.floor((stop.lat - lat0) / latStep);
      const sj = Math.floor((stop.lon - lon0) / lonStep);
      const fi = (stop.lat - lat0) / latStep - 0.5; // the stop in squares, measured from the squares' centres
      const fj = (stop.lon - lon0) / lonStep - 0.5;
      for (let i = si - span; i <= si + span; i++) {
        for (let j = sj - span; j <= sj + span; j++) {
          if ((i - fi) * (i - fi) + (j - fj) * (j - fj) <= reach2) near.add((i + KEY_OFFSET) * KEY_ROW + j + KEY_OFFSET);
        }
      }
    }
    const cells: number[] = [];
    let kept = 0;
    for (const [key, people] of sums) {
      const whole = Math.round(people);
      if (whole === 0 || !near.has(key)) continue;
      cells.push(Math.floor(key / KEY_ROW) - KEY_OFFSET, (key % KEY_ROW) - KEY_OFFSET, whole);
      kept++;
    }
    if (kept <= MAX_DENSITY_CELLS) return { cellM, latStep, lonStep, lat0, lon0, cells };
  }
}
