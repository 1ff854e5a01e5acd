// Test helper: the minimal broken-corpus feed (fixtures/broken/minimal) rewritten so that its stop names,
// stop ids, route ids and names, headsigns, trip ids, shape ids and agency name and URL carry markup,
// spreadsheet formulas, path tricks and non-ASCII text. Tables are read with csv-parse and written with
// RFC 4180 quoting, so each hostile string reaches the tool exactly as listed here.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { ROOT, writeFeedFolder, type Tables } from '../fuzz/demoTables.js';

export const MINIMAL = join(ROOT, 'fixtures', 'broken', 'minimal');

/** The hostile strings, named. */
export const H = {
  img: '<img src=x onerror=alert(1)>',
  script: '</script><script>alert(1)</script>',
  attr: '"onmouseover="alert(1)',
  js: 'javascript:alert(1)',
  hyperlink: '=HYPERLINK("http://x")',
  plus: '+cmd',
  minus: '-2+3',
  at: '@SUM(A1)',
  path: '../../etc/passwd',
  unicode: 'Brückenstraße — 東口 ☃ Ωμέγα',
  lineSep: 'Quay\u2028Side\u2029Walk', // JavaScript line terminators that JSON allows raw
  quoteApos: `O'Brien "Row" & <Co>`,
} as const;
export const HOSTILE: string[] = Object.values(H);

// minimal feed ids -> hostile ids (distinct within each table)
export const STOP_IDS: Record<string, string> = {
  S1: H.img,
  S2: H.attr,
  S3: H.hyperlink,
  S4: H.path,
  S5: H.plus,
  S6: `${H.unicode}-S6`,
  T1: H.script,
  T2: H.at,
  T3: H.minus,
  T4: H.js,
};
export const STOP_NAMES: Record<string, string> = {
  S1: H.script,
  S2: H.img,
  S3: H.attr,
  S4: H.js,
  S5: H.hyperlink,
  S6: H.unicode,
  T1: H.plus,
  T2: H.minus,
  T3: H.at,
  T4: H.path,
};
export const ROUTE_IDS: Record<string, string> = { M1: H.attr, M2: H.minus };
export const ROUTE_SHORT: Record<string, string> = { M1: H.img, M2: H.at };
export const ROUTE_LONG: Record<string, string> = { M1: H.script, M2: H.unicode };
export const TRIP_IDS: Record<string, string> = { 'M1-1': H.script, 'M1-2': H.plus, 'M2-1': H.path, 'M2-2': H.hyperlink };
export const HEADSIGNS: Record<string, string> = { M1: H.attr, M2: `${H.lineSep} ${H.quoteApos}` };
export const SHAPE_IDS: Record<string, string> = { SH1: H.path, SH2: H.js };
export const AGENCY_NAME = `${H.img} ${H.quoteApos}`;
export const AGENCY_URL = H.js;

function read(name: string): { header: string[]; rows: string[][] } {
  const grid = parse(readFileSync(join(MINIMAL, name)), { bom: true }) as string[][];
  return { header: grid[0], rows: grid.slice(1) };
}

function remap(t: { header: string[]; rows: string[][] }, column: string, map: Record<string, string>): void {
  const i = t.header.indexOf(column);
  if (i < 0) throw new Error(`minimal feed lacks ${column}`);
  for (const r of t.rows) if (r[i] in map) r[i] = map[r[i]];
}

/** The hostile tables. */
export function hostileTables(): Tables {
  const agency = read('agency.txt');
  agency.rows[0][agency.header.indexOf('agency_name')] = AGENCY_NAME;
  agency.rows[0][agency.header.indexOf('agency_url')] = AGENCY_URL;
  const routes = read('routes.txt');
  const rShort = routes.header.indexOf('route_short_name');
  const rLong = routes.header.indexOf('route_long_name');
  const rId = routes.header.indexOf('route_id');
  for (const r of routes.rows) {
    r[rShort] = ROUTE_SHORT[r[rId]];
    r[rLong] = ROUTE_LONG[r[rId]];
  }
  remap(routes, 'route_id', ROUTE_IDS);
  const stops = read('stops.txt');
  const sId = stops.header.indexOf('stop_id');
  for (const r of stops.rows) r[stops.header.indexOf('stop_name')] = STOP_NAMES[r[sId]];
  remap(stops, 'stop_id', STOP_IDS);
  const trips = read('trips.txt');
  trips.header.push('trip_headsign');
  for (const r of trips.rows) r.push(HEADSIGNS[r[trips.header.indexOf('route_id')]]);
  remap(trips, 'route_id', ROUTE_IDS);
  remap(trips, 'trip_id', TRIP_IDS);
  remap(trips, 'shape_id', SHAPE_IDS);
  const stopTimes = read('stop_times.txt');
  remap(stopTimes, 'trip_id', TRIP_IDS);
  remap(stopTimes, 'stop_id', STOP_IDS);
  const shapes = read('shapes.txt');
  remap(shapes, 'shape_id', SHAPE_IDS);
  return {
    'agency.txt': agency,
    'routes.txt': routes,
    'stops.txt': stops,
    'calendar.txt': read('calendar.txt'),
    'trips.txt': trips,
    'stop_times.txt': stopTimes,
    'shapes.txt': shapes,
  };
}

/** Writes the hostile feed as a folder. */
export function writeHostileFeed(dir: string): void {
  writeFeedFolder(hostileTables(), dir);
}
