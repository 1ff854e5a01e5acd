// Writes the demo city of Vellmoor: fixtures/demo/demo-feed.zip (GTFS), fixtures/demo/ridership.csv
// (stop-level boardings and alightings per weekday), fixtures/demo/demo-feed-next.zip (the next
// feed version: a few stops removed, one moved about 60 m, one renamed) for the compare demo, and
// fixtures/demo/land-use.geojson (where Vellmoor's people live and work: square blocks with residents and
// jobs along the routes, none on the estuary the bridge crosses, and Brackwater Park, a polygon with nobody).
// Deterministic: a seeded PRNG, a fixed zip timestamp and a fixed time zone, so the bytes are the same
// on every run (the test regenerates and compares).
//
// Usage: node scripts/make-demo.mjs [--out DIR]     (default fixtures/demo)

process.env.TZ = 'UTC'; // yazl writes the DOS timestamp in local time; pin it so the bytes never vary

import { createWriteStream, mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import yazl from 'yazl';
import geodesicPkg from 'geographiclib-geodesic';
import { prng, hms, hmsToS } from './lib/seeded.mjs';

const WGS84 = geodesicPkg.Geodesic.WGS84;
const ZIP_MTIME = new Date(Date.UTC(2026, 10, 1, 0, 0, 0)); // 2026-11-01 00:00 UTC, every entry
const ORIGIN_LAT = 45.02; // an unremarkable mid-latitude for an invented city
const ORIGIN_LON = 10.03;
const M_PER_DEG_LAT = 111_132;
const M_PER_DEG_LON = 111_320 * Math.cos((ORIGIN_LAT * Math.PI) / 180);
const SERVICE_START = '20261102';
const SERVICE_END = '20270331';

// ---------------------------------------------------------------------------------------------------
// Small helpers

/** FNV-1a over a string: a seed per route, so editing one route leaves the others' draws alone. */
function seedOf(text) {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) h = Math.imul(h ^ text.charCodeAt(i), 0x01000193) >>> 0;
  return h;
}

const toLatLon = ([x, y]) => [ORIGIN_LAT + y / M_PER_DEG_LAT, ORIGIN_LON + x / M_PER_DEG_LON];
const geodesicM = (a, b) => WGS84.Inverse(a[0], a[1], b[0], b[1]).s12;
const fmt6 = (v) => v.toFixed(6);

function csvCell(v) {
  const s = v === undefined || v === null ? '' : String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function table(header, rows) {
  return [header.join(','), ...rows.map((r) => header.map((h) => csvCell(r[h])).join(','))].join('\r\n') + '\r\n';
}

/** A polyline in local metres (x east, y north) with its cumulative planar length. */
function polyline(points) {
  const cum = [0];
  for (let i = 1; i < points.length; i++) {
    cum.push(cum[i - 1] + Math.hypot(points[i][0] - points[i - 1][0], points[i][1] - points[i - 1][1]));
  }
  return { points, cum, length: cum[cum.length - 1] };
}

/** Point at planar distance d along the line, the segment index and the unit direction there. */
function pointAt(line, d) {
  const { points, cum } = line;
  let i = 0;
  while (i < points.length - 2 && cum[i + 1] < d) i++;
  const segLen = cum[i + 1] - cum[i];
  const t = segLen > 0 ? Math.min(1, Math.max(0, (d - cum[i]) / segLen)) : 0;
  const [x0, y0] = points[i];
  const [x1, y1] = points[i + 1];
  const ux = segLen > 0 ? (x1 - x0) / segLen : 1;
  const uy = segLen > 0 ? (y1 - y0) / segLen : 0;
  return { xy: [x0 + t * (x1 - x0), y0 + t * (y1 - y0)], seg: i, ux, uy };
}

/** Adds points every stepM along straight segments so shapes look like traced roads. */
function densify(points, stepM) {
  const out = [points[0]];
  for (let i = 1; i < points.length; i++) {
    const [x0, y0] = points[i - 1];
    const [x1, y1] = points[i];
    const n = Math.max(1, Math.ceil(Math.hypot(x1 - x0, y1 - y0) / stepM));
    for (let k = 1; k <= n; k++) out.push([x0 + ((x1 - x0) * k) / n, y0 + ((y1 - y0) * k) / n]);
  }
  return out;
}

function circle(cx, cy, r, startDeg, n, clockwise) {
  const pts = [];
  for (let k = 0; k <= n; k++) {
    const a = ((startDeg + ((clockwise ? -1 : 1) * (360 * k)) / n) * Math.PI) / 180;
    pts.push([cx + r * Math.cos(a), cy + r * Math.sin(a)]);
  }
  return pts;
}

// ---------------------------------------------------------------------------------------------------
// The city: invented street names and the ten routes

const CROSS_STREETS = [
  'Linden Ave',
  'Brackwater Ln',
  'Fenwick St',
  'Oriel St',
  'Pellham Rd',
  'Tallow Row',
  'Quill St',
  'Sorrel Way',
  'Ashgrove Rd',
  'Candlemere St',
  'Dunmarsh Ave',
  'Elverly Rd',
  'Foxhollow Ln',
  'Gannet St',
  'Harrowgate Ave',
  'Ivybridge Rd',
  'Juniper Walk',
  'Kestrel St',
  'Larkspur Ave',
  'Millrace Rd',
  'Nettlefold St',
  'Orchard Vale',
  'Pennywort Ln',
  'Quarry Hill Rd',
  'Rookery St',
  'Saltmarsh Rd',
  'Thistledown Ave',
  'Upperton St',
  'Vicarage Ln',
  'Wheelwright St',
  'Yarrow Rd',
  'Alderholt Ave',
  'Bellfounder St',
  'Copperbeech Rd',
  'Dovecote Ln',
  'Eastwold Rd',
  'Fallowfield St',
  'Glebe Rd',
  'Hazelmere Ave',
  'Inkpen St',
  'Kingfisher Rd',
  'Lanternhill St',
  'Maltings Ln',
  'Northcross Rd',
  'Oakapple St',
  'Pilgrim Way',
  'Ropewalk St',
  'Stonechat Ave',
  'Tannery Ln',
  'Underhill Rd',
  'Weavers Row',
  'Withy Bed Ln',
  'Beacon Rise',
  'Chandlers Ct',
  'Drovers Rd',
  'Ferrymans Ln',
  'Gorse Hill Rd',
];

// Shared stops: the same stop_id is served by several routes (transfers).
const SHARED = {
  CSQ: { id: 'CSQ', name: 'Central Square', xy: [6, 6], parent: 'VELL-CENTRAL' },
  CSTN: { id: 'CSTN', name: 'Vellmoor Central Station', xy: [-300, 600], parent: 'VELL-STATION' },
  HRBCATH: { id: 'HRBCATH', name: 'Harbour Rd / Cathedral Ave', xy: [8, -2008] },
};
const STATIONS = [
  { id: 'VELL-CENTRAL', name: 'Central Square Interchange', xy: [0, 0] },
  { id: 'VELL-STATION', name: 'Vellmoor Central Station (station)', xy: [-310, 610] },
];

// zones: [fromM, toM, minGapM, maxGapM, kind?] (a zone with maxGap 0 has no stops: the bridge; kind 'old':
// the old-town grid, where stops sit a block apart and busy corners alternate with quiet side streets)
// shapeDist: 'm' metres, 'km' kilometres, null: shapes without shape_dist_traveled; noShape: no shape at all
const ROUTES = [
  {
    id: 'R1',
    ends: ['Westgate Terminus', 'Eastgate Terminus'],
    short: '1',
    long: 'Market Street Crosstown',
    code: 'MKT',
    street: 'Market St',
    color: 'C0392B',
    path: [
      [-4200, 0],
      [4200, 0],
    ],
    zones: [
      [0, 3300, 320, 420],
      [3300, 5100, 70, 130, 'old'],
      [5100, 8400, 320, 420],
    ],
    shared: [{ stop: 'CSQ', at: 4200 }],
    shapeDist: 'm',
    cruiseMps: 8.5,
    headways: 'trunk',
    shortTurnAtM: 6000,
    seqStep: 1,
  },
  {
    id: 'R2',
    ends: ['Northfield Terminus', 'Southmead Terminus'],
    short: '2',
    long: 'Cathedral Avenue',
    code: 'CAT',
    street: 'Cathedral Ave',
    color: '2471A3',
    path: [
      [0, 3400],
      [0, -3600],
    ],
    zones: [
      [0, 2500, 300, 380],
      [2500, 4300, 70, 130, 'old'],
      [4300, 7000, 300, 400],
    ],
    shared: [
      { stop: 'CSQ', at: 3400 },
      { stop: 'HRBCATH', at: 5400 },
    ],
    shapeDist: null,
    cruiseMps: 8,
    headways: 'trunk',
    seqStep: 5,
  },
  {
    id: 'R10',
    ends: ['Harbour West Terminus', 'Saltings Terminus'],
    short: '10',
    long: 'Harbour Road',
    code: 'HRB',
    street: 'Harbour Rd',
    color: '148F77',
    path: [
      [-10500, -2400],
      [-7000, -2100],
      [-3000, -2000],
      [4500, -2000],
      [5200, -1600],
    ],
    zones: [[0, 16000, 260, 460]],
    shared: [{ stop: 'HRBCATH', at: 10514 }],
    shapeDist: 'km',
    cruiseMps: 10,
    headways: 'trunk',
    timepointEvery: 5,
    holdAtTimepointsS: 60,
    seqStep: 1,
  },
  {
    id: 'R20',
    ends: [null, 'Northbank Terminus'],
    short: '20',
    long: 'Estuary Bridge to Northbank',
    code: 'BRG',
    street: 'Bridge Approach',
    color: 'D68910',
    path: [
      [6, 6],
      [2200, 3700],
      [2300, 6300],
      [2300, 8200],
    ],
    zones: [
      [0, 4300, 280, 340],
      [4300, 6900, 0, 0],
      [6900, 8800, 320, 380],
    ],
    shared: [{ stop: 'CSQ', at: 0 }],
    shapeDist: 'm',
    cruiseMps: 10,
    headways: 'regular',
    markTimepoints: true,
    seqStep: 1,
  },
  {
    id: 'R30',
    short: '30',
    long: 'Ring Loop (clockwise)',
    code: 'RNG',
    street: 'Ring Rd',
    color: '7D3C98',
    loop: { cx: 0, cy: 0, r: 1600, startDeg: 0, n: 96 },
    zones: [[0, 10100, 280, 360]],
    shared: [],
    shapeDist: null,
    cruiseMps: 8,
    headways: 'regular',
    oneDirection: true,
    seqStep: 1,
  },
  {
    id: 'R40',
    ends: [null, 'University Campus'],
    short: '40',
    long: 'University Line',
    code: 'UNI',
    street: 'College Rd',
    color: '1F618D',
    path: [
      [-300, 600],
      [-2400, 1300],
      [-5500, 2500],
    ],
    zones: [[0, 6000, 300, 450]],
    shared: [{ stop: 'CSTN', at: 0 }],
    shapeDist: null,
    cruiseMps: 9,
    frequency: {
      exactTimes: 1,
      periods: [
        ['06:00:00', '20:00:00', 600],
        ['20:00:00', '23:00:00', 1200],
      ],
    },
    seqStep: 1,
  },
  {
    id: 'R41',
    ends: [null, 'Vellmoor Infirmary'],
    short: '41',
    long: 'Infirmary Road (hospital)',
    code: 'INF',
    street: 'Infirmary Rd',
    color: '117864',
    path: [
      [-300, 600],
      [900, 400],
      [2000, -300],
      [3500, -900],
    ],
    zones: [[0, 5000, 280, 400]],
    shared: [{ stop: 'CSTN', at: 0 }],
    shapeDist: null,
    cruiseMps: 8.5,
    frequency: { exactTimes: 0, periods: [['06:00:00', '22:00:00', 720]] },
    seqStep: 1,
  },
  {
    id: 'R50',
    ends: ['Old Town Gate', 'Abbey Steps'],
    short: '50',
    long: 'Old Town Hopper',
    code: 'OLD',
    street: 'Old Town',
    color: 'A04000',
    path: [
      [-900, -200],
      [-900, -1200],
      [-200, -1200],
      [-200, -400],
    ],
    zones: [[0, 2600, 200, 260]],
    shared: [],
    noShape: true,
    cruiseMps: 6,
    headways: 'regular',
    seqStep: 1,
  },
  {
    id: 'R60',
    ends: ['Eastfield Gate', 'Eastfield Depot Yard'],
    short: '60',
    long: 'Eastfield Industrial Estate',
    code: 'EFD',
    street: 'Eastfield Rd',
    color: '566573',
    path: [
      [900, -600],
      [6000, -600],
      [6000, -3000],
    ],
    zones: [[0, 7600, 380, 600]],
    shared: [],
    shapeDist: null,
    cruiseMps: 11,
    headways: 'regular',
    closedStopOnOneTrip: 6,
    seqStep: 1,
  },
  {
    id: 'R70',
    ends: [null, 'Winter Fairground'],
    short: '70',
    long: 'Winter Fair Shuttle',
    code: 'FAR',
    street: 'Fairground Rd',
    color: 'CB4335',
    path: [
      [6, 6],
      [-2500, -3500],
    ],
    zones: [[0, 4400, 450, 550]],
    shared: [{ stop: 'CSQ', at: 0 }],
    shapeDist: null,
    cruiseMps: 9,
    services: ['FAIR'],
    seqStep: 1,
  },
];

// next-version edits (for the compare demo)
const NEXT_REMOVED = ['MKT-12-a', 'MKT-22-a', 'MKT-22-b', 'CAT-11-a']; // quiet old-town stops the planners took out
const NEXT_MOVED = { id: 'MKT-17-a', alongM: 60 };
const NEXT_RENAMED = { id: 'HRB-20-a', name: 'Harbour Rd / Saltmarsh Market' };

// Headways per service: [fromS, toS, headwayS]
const H = (h, m = 0) => h * 3600 + m * 60;
const HEADWAYS = {
  trunk: {
    WKDY: [
      [H(5, 30), H(7), 1200],
      [H(7), H(9, 30), 600],
      [H(9, 30), H(15, 30), 900],
      [H(15, 30), H(18, 30), 600],
      [H(18, 30), H(24, 40), 1800],
    ],
    SAT: [[H(6, 30), H(23, 30), 1200]],
    SUN: [[H(7, 30), H(23), 1800]],
  },
  regular: {
    WKDY: [
      [H(6), H(9), 900],
      [H(9), H(16), 1200],
      [H(16), H(19), 900],
      [H(19), H(23, 30), 2400],
    ],
    SAT: [[H(7), H(22), 1800]],
    SUN: [[H(8), H(21), 2400]],
  },
  fair: { FAIR: [[H(10), H(20), 1200]] },
};

// ---------------------------------------------------------------------------------------------------
// Building the feed

function zoneAt(zones, d) {
  return zones.find((z) => d >= z[0] && d < z[1]) ?? zones[zones.length - 1];
}

/** Distances of the stops along a route's road: drawn from the zones' gap ranges, shared stops pinned. */
function placeStops(route, line, rand) {
  const L = line.length;
  const pinned = route.shared.map((s) => ({ d: Math.min(L, s.at), shared: s.stop }));
  const ds = [];
  let d = 0;
  while (d < L) {
    ds.push(d);
    const z = zoneAt(route.zones, d);
    if (z[3] === 0) {
      d = z[1];
      continue;
    }
    let gap = z[2] + rand() * (z[3] - z[2]);
    // entering a stopless zone: the next stop is at its far side
    const next = zoneAt(route.zones, d + gap);
    if (next[3] === 0) gap = next[1] - d;
    d += gap;
  }
  // the last stop is the terminal: close the remainder
  if (L - ds[ds.length - 1] < 120) ds.pop();
  ds.push(L);
  const kept = ds.filter((x) => pinned.every((p) => Math.abs(p.d - x) > 110));
  const all = kept.map((x) => ({ d: x, shared: null })).concat(pinned);
  all.sort((a, b) => a.d - b.d);
  return all;
}

function roadLine(route) {
  if (route.loop) {
    const { cx, cy, r, startDeg, n } = route.loop;
    return polyline(circle(cx, cy, r, startDeg, n, true));
  }
  return polyline(densify(route.path, 250));
}

/** Builds every table of one feed version. */
function buildFeed({ next }) {
  const stops = new Map(); // id -> row
  const shapes = [];
  const trips = [];
  const stopTimes = [];
  const frequencies = [];
  const ridership = new Map(); // key stop|route|dir -> {b, a}
  const routesRows = [];
  const usedNames = new Set();
  let stopCode = 1000;

  for (const st of STATIONS) {
    const [lat, lon] = toLatLon(st.xy);
    stops.set(st.id, {
      stop_id: st.id,
      stop_code: '',
      stop_name: st.name,
      stop_lat: fmt6(lat),
      stop_lon: fmt6(lon),
      location_type: 1,
      parent_station: '',
      wheelchair_boarding: 1,
    });
  }

  for (const route of ROUTES) {
    // each route draws from its own streams (stop gaps and demand; cross-street names)
    const rand = prng(seedOf(`${route.id}:20261102`));
    const streetPick = prng(seedOf(`${route.id}:names`));
    routesRows.push({
      route_id: route.id,
      agency_id: 'VTA',
      route_short_name: route.short,
      route_long_name: route.long,
      route_type: 3,
      route_color: route.color,
      route_text_color: 'FFFFFF',
    });
    const line = roadLine(route);
    const placed = placeStops(route, line, rand);
    const dirs = route.oneDirection ? [0] : [0, 1];
    const L = line.length;

    // stop identity along the road (per side); names from the street and an invented cross street
    const roadStops = placed.map((p, i) => {
      if (p.shared) return { ...p, name: SHARED[p.shared].name };
      let cross;
      do cross = CROSS_STREETS[Math.floor(streetPick() * CROSS_STREETS.length)];
      while (usedNames.has(`${route.street} / ${cross}`));
      usedNames.add(`${route.street} / ${cross}`);
      let name = `${route.street} / ${cross}`;
      if (route.ends && route.ends[0] && i === 0) name = route.ends[0];
      if (route.ends && i === placed.length - 1) name = route.ends[1];
      return { ...p, name, seq: i };
    });
    if (route.loop) roadStops[roadStops.length - 1] = { ...roadStops[0], d: L }; // the loop closes on its first stop
    let oldRun = 0; // position within the current old-town stretch
    const weights = roadStops.map((s) => {
      const { xy } = pointAt(line, s.d);
      const r = Math.hypot(xy[0], xy[1]);
      const base = r < 950 ? 3 : r < 2500 ? 1.6 : 0.8;
      const bonus = s.shared ? 3 : 1;
      // old town: two busy corners, then a quiet side-street stop a block from each (a removal that pays)
      let street = 1;
      if (zoneAt(route.zones, s.d)[4] === 'old' && !s.shared) {
        street = oldRun % 3 === 2 ? 0.12 : 1.4;
        oldRun += 1;
      }
      return base * bonus * street * (0.5 + rand());
    });

    for (const dir of dirs) {
      const shapeId = route.noShape ? '' : `${route.id}-shp-${dir}`;
      // travel order and lateral offset: stops 9 m to the right of travel
      const order = dir === 0 ? roadStops.map((_, i) => i) : roadStops.map((_, i) => roadStops.length - 1 - i);
      const pathPts = dir === 0 ? line.points : [...line.points].reverse();
      const dirLine = polyline(pathPts);
      const patternStops = [];
      for (const k of order) {
        const rs = roadStops[k];
        const dAlong = dir === 0 ? rs.d : L - rs.d;
        let id;
        let name = rs.name;
        let xy;
        let alongPlanar = dAlong;
        if (rs.shared) {
          const sh = SHARED[rs.shared];
          id = sh.id;
          xy = sh.xy;
          if (!stops.has(id)) {
            const [lat, lon] = toLatLon(xy);
            stops.set(id, {
              stop_id: id,
              stop_code: '',
              stop_name: sh.name,
              stop_lat: fmt6(lat),
              stop_lon: fmt6(lon),
              location_type: 0,
              parent_station: sh.parent ?? '',
              wheelchair_boarding: 1,
            });
          }
        } else {
          const side = route.loop ? 'a' : dir === 0 ? 'a' : 'b';
          id = `${route.code}-${String(rs.seq + 1).padStart(2, '0')}-${side}`;
          if (next && NEXT_MOVED.id === id) alongPlanar = Math.min(L, dAlong + NEXT_MOVED.alongM);
          const p = pointAt(dirLine, alongPlanar);
          const offM = route.loop ? -9 : 9; // clockwise loop: stops on the outer kerb
          xy = [p.xy[0] + p.uy * offM, p.xy[1] - p.ux * offM];
          if (next && NEXT_RENAMED.id === id) name = NEXT_RENAMED.name;
          // code and accessibility drawn for every stop, so removing one in the next version changes nothing else
          stopCode += 1;
          const wheelchair = rand() < 0.85 ? 1 : 2;
          if (!stops.has(id) && !(next && NEXT_REMOVED.includes(id))) {
            const [lat, lon] = toLatLon(xy);
            stops.set(id, {
              stop_id: id,
              stop_code: String(stopCode),
              stop_name: name,
              stop_lat: fmt6(lat),
              stop_lon: fmt6(lon),
              location_type: 0,
              parent_station: '',
              wheelchair_boarding: wheelchair,
            });
          }
        }
        if (next && NEXT_REMOVED.includes(id)) continue;
        patternStops.push({ id, k, name, alongPlanar, weight: weights[k] });
      }

      // geodesic distance along the shape for every stop: cumulative geodesic length to the foot point
      const ll = dirLine.points.map(toLatLon);
      const cumGeo = [0];
      for (let i = 1; i < ll.length; i++) cumGeo.push(cumGeo[i - 1] + geodesicM(ll[i - 1], ll[i]));
      for (const ps of patternStops) {
        const p = pointAt(dirLine, ps.alongPlanar);
        ps.distM = cumGeo[p.seg] + geodesicM(ll[p.seg], toLatLon(p.xy));
      }
      if (shapeId) {
        const unit = route.shapeDist === 'km' ? 1000 : 1;
        ll.forEach(([lat, lon], i) => {
          shapes.push({
            shape_id: shapeId,
            shape_pt_lat: fmt6(lat),
            shape_pt_lon: fmt6(lon),
            shape_pt_sequence: i + 1,
            shape_dist_traveled: route.shapeDist ? (cumGeo[i] / unit).toFixed(route.shapeDist === 'km' ? 4 : 1) : '',
          });
        });
      }

      // running time offsets from the first stop: cruise + braking/accelerating + a dwell per stop
      const offsets = [0];
      for (let i = 1; i < patternStops.length; i++) {
        const gap = patternStops[i].distM - patternStops[i - 1].distM;
        const dwellS = 8 + Math.round(patternStops[i].weight * 4);
        offsets.push(offsets[i - 1] + gap / route.cruiseMps + route.cruiseMps / 1.2 + dwellS);
      }

      const headsign = route.loop ? `${route.long}` : dir === 0 ? roadStops[roadStops.length - 1].name : roadStops[0].name;
      const services = route.services ?? ['WKDY', 'SAT', 'SUN'];
      let tripsOnWeekday = 0;
      for (const svc of services) {
        const starts = [];
        if (route.frequency) {
          if (svc === 'SUN') continue; // the frequency lines do not run on Sundays
          starts.push(route.frequency.periods[0][0]);
        } else {
          const plan = route.services ? HEADWAYS.fair : HEADWAYS[route.headways];
          for (const [from, to, hw] of plan[svc]) for (let t = from + (dir === 1 ? 300 : 0); t < to; t += hw) starts.push(t);
        }
        starts.forEach((start, n) => {
          const tripId = `${route.id}-${svc}-${dir}-${String(n + 1).padStart(3, '0')}`;
          const startS = typeof start === 'string' ? hmsToS(start) : start;
          const peak = (startS >= H(7) && startS < H(9, 30)) || (startS >= H(15, 30) && startS < H(18, 30));
          const slow = svc === 'WKDY' && peak ? 1.12 : 1;
          // route 1: alternate weekday peak trips short-turn downtown (a second pattern)
          let sts = patternStops;
          if (route.shortTurnAtM && svc === 'WKDY' && peak && n % 2 === 1) {
            sts =
              dir === 0
                ? patternStops.filter((s) => s.alongPlanar <= route.shortTurnAtM)
                : patternStops.filter((s) => s.alongPlanar >= L - route.shortTurnAtM);
          }
          const base = patternStops.indexOf(sts[0]);
          const t0 = offsets[base];
          trips.push({
            route_id: route.id,
            service_id: svc,
            trip_id: tripId,
            trip_headsign: sts === patternStops ? headsign : sts[sts.length - 1].name,
            direction_id: dir,
            shape_id: shapeId,
            wheelchair_accessible: 1,
          });
          if (svc === 'WKDY') tripsOnWeekday += 1;
          let heldS = 0;
          sts.forEach((s, i) => {
            const idx = patternStops.indexOf(s);
            const at = Math.round(startS + (offsets[idx] - t0) * slow) + heldS;
            const last = i === sts.length - 1;
            let arr = hms(at);
            let dep = arr;
            let timepoint = '';
            if (route.timepointEvery) {
              const timed = i === 0 || last || i % route.timepointEvery === 0;
              timepoint = timed ? 1 : 0;
              if (!timed) arr = dep = '';
              else if (!last && i > 0 && route.holdAtTimepointsS) {
                dep = hms(at + route.holdAtTimepointsS);
                heldS += route.holdAtTimepointsS;
              }
            } else if (route.markTimepoints) {
              timepoint = i === 0 || last || i % 4 === 0 ? 1 : 0;
            }
            const closed =
              route.closedStopOnOneTrip !== undefined && svc === 'WKDY' && dir === 0 && n === 0 && i === route.closedStopOnOneTrip;
            stopTimes.push({
              trip_id: tripId,
              arrival_time: arr,
              departure_time: dep,
              stop_id: s.id,
              stop_sequence: (i + 1) * route.seqStep,
              pickup_type: closed ? 1 : '',
              drop_off_type: closed ? 1 : '',
              shape_dist_traveled: route.shapeDist
                ? (s.distM / (route.shapeDist === 'km' ? 1000 : 1)).toFixed(route.shapeDist === 'km' ? 4 : 1)
                : '',
              timepoint,
            });
          });
        });
        if (route.frequency) {
          for (const [from, to, hw] of route.frequency.periods) {
            frequencies.push({
              trip_id: `${route.id}-${svc}-${dir}-001`,
              start_time: from,
              end_time: to,
              headway_secs: hw,
              exact_times: route.frequency.exactTimes,
            });
          }
          if (svc === 'WKDY') {
            tripsOnWeekday = 0;
            for (const [from, to, hw] of route.frequency.periods) tripsOnWeekday += Math.ceil((hmsToS(to) - hmsToS(from)) / hw);
          }
        }
      }

      // ridership for a weekday (the FAIR shuttle runs on two days only: no counts)
      if (!route.services) {
        const n = patternStops.length;
        const boardPerTrip = (route.headways === 'trunk' ? 6 : 2.4) * (patternStops[n - 1].distM / 1000); // trunk routes carry more
        const bw = patternStops.map((s, i) => (i === n - 1 ? 0 : s.weight * (n - 1 - i)));
        const aw = patternStops.map((s, i) => (i === 0 ? 0 : s.weight * i));
        const sb = bw.reduce((x, y) => x + y, 0);
        const sa = aw.reduce((x, y) => x + y, 0);
        patternStops.forEach((s, i) => {
          const key = `${s.id}|${route.id}|${dir}`;
          const cur = ridership.get(key) ?? { stop_id: s.id, route_id: route.id, direction_id: dir, b: 0, a: 0 };
          cur.b += (bw[i] / sb) * boardPerTrip * tripsOnWeekday;
          cur.a += (aw[i] / sa) * boardPerTrip * tripsOnWeekday;
          ridership.set(key, cur);
        });
      }
    }
  }

  const agency = [
    {
      agency_id: 'VTA',
      agency_name: 'Vellmoor Transit Authority',
      agency_url: 'https://transit.vellmoor.example/',
      agency_timezone: 'Etc/GMT-1',
      agency_lang: 'en',
      agency_phone: '',
    },
  ];
  const calendar = [
    {
      service_id: 'WKDY',
      monday: 1,
      tuesday: 1,
      wednesday: 1,
      thursday: 1,
      friday: 1,
      saturday: 0,
      sunday: 0,
      start_date: SERVICE_START,
      end_date: SERVICE_END,
    },
    {
      service_id: 'SAT',
      monday: 0,
      tuesday: 0,
      wednesday: 0,
      thursday: 0,
      friday: 0,
      saturday: 1,
      sunday: 0,
      start_date: SERVICE_START,
      end_date: SERVICE_END,
    },
    {
      service_id: 'SUN',
      monday: 0,
      tuesday: 0,
      wednesday: 0,
      thursday: 0,
      friday: 0,
      saturday: 0,
      sunday: 1,
      start_date: SERVICE_START,
      end_date: SERVICE_END,
    },
  ];
  const calendarDates = [
    // Midwinter holiday and New Year's Day (both Fridays): weekday service removed, Sunday service added
    { service_id: 'WKDY', date: '20261225', exception_type: 2 },
    { service_id: 'SUN', date: '20261225', exception_type: 1 },
    { service_id: 'WKDY', date: '20270101', exception_type: 2 },
    { service_id: 'SUN', date: '20270101', exception_type: 1 },
    // the Winter Fair weekend: a service defined only here
    { service_id: 'FAIR', date: '20261212', exception_type: 1 },
    { service_id: 'FAIR', date: '20261213', exception_type: 1 },
  ];
  const feedInfo = [
    {
      feed_publisher_name: 'Vellmoor Transit Authority',
      feed_publisher_url: 'https://transit.vellmoor.example/',
      feed_lang: 'en',
      feed_start_date: SERVICE_START,
      feed_end_date: SERVICE_END,
      feed_version: next ? '2026.12.1' : '2026.11.1',
      feed_contact_email: 'data@transit.vellmoor.example',
    },
  ];

  const ridershipRows = [...ridership.values()].map((r) => ({
    stop_id: r.stop_id,
    route_id: r.route_id,
    direction_id: r.direction_id,
    boardings: Math.round(r.b),
    alightings: Math.round(r.a),
  }));

  const files = [
    ['agency.txt', table(Object.keys(agency[0]), agency)],
    ['feed_info.txt', table(Object.keys(feedInfo[0]), feedInfo)],
    ['routes.txt', table(Object.keys(routesRows[0]), routesRows)],
    [
      'stops.txt',
      table(
        ['stop_id', 'stop_code', 'stop_name', 'stop_lat', 'stop_lon', 'location_type', 'parent_station', 'wheelchair_boarding'],
        [...stops.values()],
      ),
    ],
    ['calendar.txt', table(Object.keys(calendar[0]), calendar)],
    ['calendar_dates.txt', table(Object.keys(calendarDates[0]), calendarDates)],
    ['trips.txt', table(Object.keys(trips[0]), trips)],
    [
      'stop_times.txt',
      table(
        [
          'trip_id',
          'arrival_time',
          'departure_time',
          'stop_id',
          'stop_sequence',
          'pickup_type',
          'drop_off_type',
          'shape_dist_traveled',
          'timepoint',
        ],
        stopTimes,
      ),
    ],
    ['shapes.txt', table(['shape_id', 'shape_pt_lat', 'shape_pt_lon', 'shape_pt_sequence', 'shape_dist_traveled'], shapes)],
    ['frequencies.txt', table(['trip_id', 'start_time', 'end_time', 'headway_secs', 'exact_times'], frequencies)],
  ];
  return { files, ridership: table(['stop_id', 'route_id', 'direction_id', 'boardings', 'alightings'], ridershipRows) };
}

// ---------------------------------------------------------------------------------------------------
// The land-use layer: blocks of BLOCK_M metres within LAND_USE_REACH_M of a route's road, residents thinning
// out from the centre, jobs gathered in the centre and on the Eastfield estate; the estuary (the bridge's
// stretch) is water and Brackwater Park a block-free polygon with no residents and no jobs.

const BLOCK_M = 250;
const LAND_USE_REACH_M = 700;
const ESTUARY = { yFrom: 3950, yTo: 6150 }; // no blocks between these northings: water under route 20's bridge
const PARK = [
  [-2600, 700],
  [-1300, 700],
  [-1300, 1700],
  [-2600, 1700],
]; // along College Rd (route 40)

function nearRoad(x, y, lines) {
  for (const line of lines) {
    for (const [px, py] of line.points) if (Math.hypot(px - x, py - y) <= LAND_USE_REACH_M) return true;
  }
  return false;
}

function inBox(x, y, poly) {
  const xs = poly.map((p) => p[0]);
  const ys = poly.map((p) => p[1]);
  return x >= Math.min(...xs) && x <= Math.max(...xs) && y >= Math.min(...ys) && y <= Math.max(...ys);
}

function ringOf(points) {
  const ring = points.map((xy) => {
    const [lat, lon] = toLatLon(xy);
    return [Number(fmt6(lon)), Number(fmt6(lat))];
  });
  ring.push(ring[0]);
  return ring;
}

/** The land-use layer as GeoJSON text: one Polygon feature per block, and the park. */
function buildLandUse() {
  const rand = prng(seedOf('land-use:20261102'));
  const lines = ROUTES.map((r) => polyline(densify(roadLine(r).points, 100)));
  const features = [];
  for (let y = -4000; y < 8600; y += BLOCK_M) {
    for (let x = -11000; x < 6600; x += BLOCK_M) {
      const cx = x + BLOCK_M / 2;
      const cy = y + BLOCK_M / 2;
      if (!nearRoad(cx, cy, lines)) continue;
      if (cy > ESTUARY.yFrom && cy < ESTUARY.yTo) continue;
      if (inBox(cx, cy, PARK)) continue;
      const r = Math.hypot(cx, cy);
      const eastfield = cx > 800 && cx < 6400 && cy > -3200 && cy < -300; // the industrial estate
      const population = eastfield ? Math.round(rand() * 40) : Math.round((0.5 + rand()) * 420 * Math.exp(-r / 5000));
      const jobs = Math.round((0.3 + rand()) * (eastfield ? 380 : 900 * Math.exp(-r / 1500) + 40));
      features.push({
        type: 'Feature',
        properties: { block: `B${x}_${y}`, population, jobs },
        geometry: {
          type: 'Polygon',
          coordinates: [
            ringOf([
              [x, y],
              [x + BLOCK_M, y],
              [x + BLOCK_M, y + BLOCK_M],
              [x, y + BLOCK_M],
            ]),
          ],
        },
      });
    }
  }
  features.push({
    type: 'Feature',
    properties: { block: 'Brackwater Park', population: 0, jobs: 0 },
    geometry: { type: 'Polygon', coordinates: [ringOf(PARK)] },
  });
  // one feature a line: small diffs when the generator changes
  return `{"type":"FeatureCollection","features":[\n${features.map((f) => JSON.stringify(f)).join(',\n')}\n]}\n`;
}

function writeZip(path, files) {
  return new Promise((resolvePromise, reject) => {
    const zip = new yazl.ZipFile();
    for (const [name, text] of files)
      zip.addBuffer(Buffer.from(text, 'utf8'), name, { mtime: ZIP_MTIME, mode: 0o100644, compress: true, compressionLevel: 9 });
    zip.end();
    const out = createWriteStream(path);
    zip.outputStream.pipe(out).on('close', resolvePromise).on('error', reject);
  });
}

/** Writes demo-feed.zip, demo-feed-next.zip, ridership.csv and land-use.geojson into outDir. */
export async function makeDemo(outDir) {
  mkdirSync(outDir, { recursive: true });
  const base = buildFeed({ next: false });
  const nextFeed = buildFeed({ next: true });
  await writeZip(join(outDir, 'demo-feed.zip'), base.files);
  await writeZip(join(outDir, 'demo-feed-next.zip'), nextFeed.files);
  writeFileSync(join(outDir, 'ridership.csv'), base.ridership);
  writeFileSync(join(outDir, 'land-use.geojson'), buildLandUse());
}

export const demoEdits = { removed: NEXT_REMOVED, moved: NEXT_MOVED, renamed: NEXT_RENAMED };

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const i = process.argv.indexOf('--out');
  const here = dirname(fileURLToPath(import.meta.url));
  const outDir = i >= 0 ? resolve(process.argv[i + 1]) : join(here, '..', 'fixtures', 'demo');
  await makeDemo(outDir);
}
