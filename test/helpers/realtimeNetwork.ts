// Hand-built static inputs for the realtime tests: a small invented Vellmoor network as a Feed and a
// PatternSet (the contract types), and the same network in the shape the demo generator simulates.

import type { Feed, Frequency, Route, Stop } from '../../src/gtfs/types.js';
import type { Pattern, PatternSet } from '../../src/network/types.js';
import { assembleFeed, handPattern, type TripRows } from './feedObject.js';

export interface LineSpec {
  routeId: string;
  gapsM: number[]; // distance between consecutive stops
  startsS: number[]; // scheduled first departures (seconds of the service day); ignored for frequency lines
  frequency?: { startS: number; endS: number; headwayS: number }; // exact_times=1
}

export interface TestNetwork {
  feed: Feed;
  patterns: PatternSet;
  /** The network as simulateArchive() takes it (trip instances, frequencies expanded). */
  sim: { timeZone: string; date: string; trips: unknown[] };
}

const M_PER_DEG_LAT = 111_195;

export function hms(s: number): string {
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const sec = s % 60;
  return `${String(h).padStart(2, '0')}:${String(m).padStart(2, '0')}:${String(sec).padStart(2, '0')}`;
}

export function buildNetwork(lines: LineSpec[], { timeZone = 'Etc/GMT-1', date = '20261104' } = {}): TestNetwork {
  const stops: Stop[] = [];
  const stopIndex = new Map<string, number>();
  const trips: TripRows[] = [];
  const frequencies: Frequency[] = [];
  const routes: Route[] = [];
  const patterns: Pattern[] = [];
  const simTrips: unknown[] = [];
  lines.forEach((line, li) => {
    routes.push({ id: line.routeId, agencyId: 'VTA', shortName: line.routeId, longName: `Vellmoor ${line.routeId}`, type: 3 });
    const n = line.gapsM.length + 1;
    const dist = [0];
    for (const g of line.gapsM) dist.push(dist[dist.length - 1] + g);
    const idx: number[] = [];
    for (let i = 0; i < n; i++) {
      const id = `${line.routeId}-S${String(i + 1).padStart(2, '0')}`;
      stopIndex.set(id, stops.length);
      idx.push(stops.length);
      // a straight line northwards, one line per 0.01 degree of longitude
      stops.push({
        id,
        code: '',
        name: `Vellmoor ${id}`,
        lat: 45 + dist[i] / M_PER_DEG_LAT,
        lon: 10 + li * 0.01,
        locationType: 0,
        parentStation: '',
      });
    }
    // schedule: 7 m/s between stops plus 20 s dwell at interior stops
    const rel: { arr: number[]; dep: number[] } = { arr: [], dep: [] };
    let t = 0;
    for (let i = 0; i < n; i++) {
      if (i > 0) t += Math.round(line.gapsM[i - 1] / 7);
      rel.arr.push(t);
      if (i > 0 && i < n - 1) t += 20;
      rel.dep.push(t);
    }
    const starts = line.frequency ? [line.frequency.startS] : line.startsS;
    const tripIds: string[] = [];
    starts.forEach((s0, k) => {
      const tripId = `${line.routeId}-T${String(k + 1).padStart(3, '0')}`;
      tripIds.push(tripId);
      trips.push({
        trip: { id: tripId, routeId: line.routeId, serviceId: 'WKDY', directionId: 0, headsign: 'North', shapeId: '' },
        stopIdx: idx,
        seq: idx.map((_, i) => (i + 1) * 10), // not consecutive, as GTFS allows
        arrS: rel.arr.map((x) => x + s0),
        depS: rel.dep.map((x) => x + s0),
        shapeDist: idx.map(() => NaN),
        timepoint: idx.map(() => 1),
        noService: idx.map(() => 0),
      });
      const instanceStarts = line.frequency
        ? Array.from(
            { length: Math.ceil((line.frequency.endS - line.frequency.startS) / line.frequency.headwayS) },
            (_, j) => line.frequency!.startS + j * line.frequency!.headwayS,
          )
        : [s0];
      for (const st of instanceStarts) {
        simTrips.push({
          tripId,
          routeId: line.routeId,
          startTime: line.frequency ? hms(st) : null,
          stops: idx.map((si, i) => ({
            stopId: stops[si].id,
            seq: (i + 1) * 10,
            lat: stops[si].lat,
            lon: stops[si].lon,
            distM: dist[i],
            schedArrS: rel.arr[i] + st,
            schedDepS: rel.dep[i] + st,
            noService: false,
          })),
        });
      }
    });
    if (line.frequency)
      frequencies.push({
        tripId: tripIds[0],
        startS: line.frequency.startS,
        endS: line.frequency.endS,
        headwayS: line.frequency.headwayS,
        exactTimes: 1,
      });
    patterns.push(
      handPattern({
        id: `${line.routeId}:0:1`,
        routeId: line.routeId,
        headsign: 'North',
        tripIds,
        tripsPerDay: simTrips.length,
        stopIdx: idx,
        distAlongM: dist,
        timepoint: idx.map(() => true),
        gapRunTimeS: line.gapsM.map((g) => Math.round(g / 7)),
        runTimeS: rel.arr[n - 1],
        scheduledDwellS: idx.map((_, i) => (i > 0 && i < n - 1 ? 20 : 0)),
      }),
    );
  });
  const feed: Feed = assembleFeed({
    source: 'vellmoor-test',
    date: null,
    contentHash: '',
    agencies: [{ id: 'VTA', name: 'Vellmoor Transit Authority', timezone: timeZone }],
    routes,
    stops,
    trips,
    shapes: [],
    calendar: [{ serviceId: 'WKDY', days: [true, true, true, true, true, false, false], start: '20261102', end: '20270331' }],
    frequencies,
    feedInfo: null,
  });
  const routesAtStop = new Map<number, Set<string>>();
  for (const p of patterns) for (const s of p.stopIdx) routesAtStop.set(s, new Set([p.id]));
  return {
    feed,
    patterns: { date: `${date.slice(0, 4)}-${date.slice(4, 6)}-${date.slice(6)}`, patterns, routesAtStop },
    sim: { timeZone, date, trips: simTrips },
  };
}
