// A small hand-made network in the invented city of Vellmoor, for model and audit tests: route V1 along
// one street (stops at the given distances), route V2 crossing it at one shared stop.
import type { Feed, Stop } from '../../src/gtfs/types.js';
import type { Pattern, PatternSet } from '../../src/network/types.js';
import { assembleFeed, handPattern, routesAtStopOf } from './feedObject.js';

const LAT0 = 52.1;
const M_PER_DEG_LAT = 111_320;

function stopAt(id: string, name: string, eastM: number, northM = 0): Stop {
  return {
    id,
    code: '',
    name,
    lat: LAT0 + northM / M_PER_DEG_LAT,
    lon: 4.3 + eastM / (M_PER_DEG_LAT * Math.cos((LAT0 * Math.PI) / 180)),
    locationType: 0,
    parentStation: '',
  };
}

export interface Handmade {
  feed: Feed;
  patterns: PatternSet;
}

/** V1: stops at `distM` along an east-west street; V2: a north-south route through V1's stop `sharedAt`. */
export interface HandmadeOptions {
  distM?: number[];
  tripsPerDay?: number;
  runTimeS?: number; // V1's whole run, seconds (default: its length at 4 m/s)
  timepoints?: number[];
  sharedAt?: number;
}

export function handmadeNetwork({
  distM = [0, 150, 260, 420, 520, 700, 860, 1000, 1120, 1300, 1550, 1700],
  tripsPerDay = 60,
  runTimeS,
  timepoints = [],
  sharedAt = 5,
}: HandmadeOptions = {}): Handmade {
  const stops: Stop[] = distM.map((d, j) => stopAt(`v1-${j}`, `Vellmoor Street ${j}`, d));
  const v2 = [stopAt('v2-n', 'North Gate', distM[sharedAt], 600), stopAt('v2-s', 'South Gate', distM[sharedAt], -600)];
  stops.push(...v2);
  const stopIndex = new Map(stops.map((s, i) => [s.id, i]));
  const n = distM.length;
  const mk = (id: string, routeId: string, stopIdx: number[], d: number[], trips: number, rt: number): Pattern =>
    handPattern({
      id,
      routeId,
      headsign: routeId === 'V1' ? 'Harbour' : 'South Gate',
      tripIds: Array.from({ length: trips }, (_, k) => `${id}-t${k}`),
      stopIdx,
      distAlongM: d,
      timepoint: d.map((_, j) => routeId === 'V1' && timepoints.includes(j)),
      gapRunTimeS: d.slice(1).map((x, j) => ((x - d[j]) / d[d.length - 1]) * rt),
      runTimeS: rt,
    });
  const v1 = mk(
    'V1:0:1',
    'V1',
    distM.map((_, j) => j),
    distM,
    tripsPerDay,
    runTimeS ?? distM[n - 1] / 4,
  );
  const v2p = mk('V2:0:1', 'V2', [stopIndex.get('v2-n')!, sharedAt, stopIndex.get('v2-s')!], [0, 600, 1200], 20, 300);
  const routesAtStop = routesAtStopOf([v1, v2p]);
  const feed: Feed = assembleFeed({
    source: 'vellmoor-handmade',
    date: '2026-10-14',
    contentHash: '0'.repeat(64),
    routes: [
      { id: 'V1', agencyId: 'VT', shortName: '1', longName: 'Harbour line', type: 3 },
      { id: 'V2', agencyId: 'VT', shortName: '2', longName: 'Gate line', type: 3 },
    ],
    stops,
    trips: [],
    shapes: [],
    calendar: [],
    feedInfo: { publisherName: 'Vellmoor Transit', version: 'hand-1', startDate: '20260901', endDate: '20261231' },
  });
  return { feed, patterns: { date: '2026-10-14', patterns: [v1, v2p], routesAtStop } };
}
