// buildPatterns on the real New York City Transit feeds, against the facts in ../shared/feeds/README.md
// (patterns, trips and stops served on 2026-10-14, and the median gap between consecutive pattern stops,
// all measured there with an independent script). Skipped with a message when the feeds are absent.

import { describe, it, expect, beforeAll } from 'vitest';
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { readFeed } from '../../src/gtfs/readFeed.js';
import { buildPatterns } from '../../src/network/buildPatterns.js';
import { haversineM } from '../../src/network/geodesy.js';
import { lineString } from '@turf/helpers';
import { distance } from '@turf/distance';
import { nearestPointOnLine } from '@turf/nearest-point-on-line';
import type { Feed, Shape, TripStopTimes } from '../../src/gtfs/types.js';
import type { PatternSet } from '../../src/network/types.js';

const FEEDS = process.env.STOPSPAN_FEEDS ?? resolve(__dirname, '../../../shared/feeds');
const DATE = '2026-10-14'; // a Wednesday, the date of the README's facts
const have = (f: string) => existsSync(join(FEEDS, f));
if (!have('nyct-bus-manhattan.zip')) console.warn(`skipping real-feed pattern tests: no feeds at ${FEEDS} (set STOPSPAN_FEEDS)`);

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Figures computed the way the README's table defines them: every gap of every pattern counted once. */
function figures(feed: Feed, set: PatternSet) {
  const along: number[] = [];
  const straight: number[] = [];
  for (const p of set.patterns) {
    for (let i = 1; i < p.stopIdx.length; i++) {
      along.push(p.distAlongM[i] - p.distAlongM[i - 1]);
      const a = feed.stops[p.stopIdx[i - 1]];
      const b = feed.stops[p.stopIdx[i]];
      straight.push(haversineM(a.lat, a.lon, b.lat, b.lon));
    }
  }
  return {
    patterns: set.patterns.length,
    trips: set.patterns.reduce((n, p) => n + p.tripsPerDay, 0),
    stopsServed: new Set(set.patterns.flatMap((p) => p.stopIdx)).size,
    medianAlongM: median(along),
    medianStraightM: median(straight),
  };
}

const cases = [
  // [C] /work/shared/feeds/README.md, "Facts about them that tests may use" (independent script).
  { file: 'nyct-bus-manhattan.zip', patterns: 151, trips: 8575, stopsServed: 1822, straightM: 216.2, alongM: 222.3 },
  { file: 'nyct-subway.zip', patterns: 209, trips: 8497, stopsServed: 989, straightM: 710.6, alongM: 727.2 },
];

for (const c of cases) {
  describe.skipIf(!have(c.file))(`buildPatterns on ${c.file} for ${DATE}`, () => {
    let feed: Feed;
    let set: PatternSet;
    beforeAll(async () => {
      feed = await readFeed(join(FEEDS, c.file), { date: DATE });
      set = buildPatterns(feed);
    }, 120_000);

    it('finds exactly the patterns, trips and stops served of the feeds README', () => {
      const f = figures(feed, set);
      expect(f.patterns).toBe(c.patterns);
      expect(f.trips).toBe(c.trips);
      expect(f.stopsServed).toBe(c.stopsServed);
    });

    it('measures along the shapes, with a median gap within 3 % of the README figure', () => {
      expect(set.patterns.every((p) => p.distanceSource === 'shape_projection')).toBe(true);
      const f = figures(feed, set);
      expect(Math.abs(f.medianAlongM - c.alongM) / c.alongM).toBeLessThan(0.03);
    });

    it('falls back to great-circle distances without shapes, matching the README straight-line median', () => {
      const bare = buildPatterns({ ...feed, shapes: new Map() });
      expect(bare.patterns.every((p) => p.distanceSource === 'great_circle')).toBe(true);
      const f = figures(feed, bare);
      expect(f.medianAlongM).toBeCloseTo(f.medianStraightM, 9);
      expect(Math.abs(f.medianAlongM - c.straightM) / c.straightM).toBeLessThan(0.001);
      // A path along the shape is never shorter than the chords.
      expect(figures(feed, set).medianAlongM).toBeGreaterThan(f.medianAlongM);
    });

    it.runIf(c.file === 'nyct-bus-manhattan.zip')('infers miles when shape_dist_traveled is written in miles, and keeps the median', () => {
      // shape_dist_traveled in miles computed by a reference library: @turf/distance length along each shape
      // point and nearestPointOnLine location of each stop (whole-line search), in miles.
      const shapes = new Map<string, Shape>();
      for (const p of set.patterns) {
        if (shapes.has(p.shapeId)) continue;
        const sh = feed.shapes.get(p.shapeId)!;
        const dist = new Float64Array(sh.lat.length);
        for (let i = 1; i < dist.length; i++) {
          dist[i] = dist[i - 1] + distance([sh.lon[i - 1], sh.lat[i - 1]], [sh.lon[i], sh.lat[i]], { units: 'miles' });
        }
        shapes.set(p.shapeId, { ...sh, dist });
      }
      const stopTimes = new Map<string, TripStopTimes>();
      for (const p of set.patterns) {
        const sh = feed.shapes.get(p.shapeId)!;
        const geo = lineString(Array.from(sh.lat, (la, i) => [sh.lon[i], la]));
        const d = Float64Array.from(
          p.stopIdx,
          (k) => nearestPointOnLine(geo, [feed.stops[k].lon, feed.stops[k].lat], { units: 'miles' }).properties.location,
        );
        for (const t of p.tripIds) stopTimes.set(t, { ...feed.stopTimes.get(t)!, shapeDist: d });
      }
      const mi = buildPatterns({ ...feed, shapes, stopTimes });
      expect(mi.shapeDistUnit!.unit).toBe('mi');
      const used = mi.patterns.filter((p) => p.distanceSource === 'shape_dist_traveled').length;
      // Whole-line snapping goes backwards on some loops; those patterns fall back to projection.
      expect(used).toBeGreaterThan(mi.patterns.length * 0.8);
      expect(mi.distanceBacktracks!.length).toBeGreaterThanOrEqual(mi.patterns.length - used);
      expect(Math.abs(figures(feed, mi).medianAlongM - c.alongM) / c.alongM).toBeLessThan(0.03);
    });

    it('keeps every pattern sane: distances non-decreasing, one run time per gap, paths for maps', () => {
      for (const p of set.patterns) {
        expect(p.distAlongM[0]).toBe(0);
        for (let i = 1; i < p.distAlongM.length; i++) expect(p.distAlongM[i]).toBeGreaterThanOrEqual(p.distAlongM[i - 1]);
        // Each gap along the shape is at least the chord, less a few metres for the stops' offsets.
        for (let i = 1; i < p.stopIdx.length; i++) {
          const a = feed.stops[p.stopIdx[i - 1]];
          const b = feed.stops[p.stopIdx[i]];
          const chord = haversineM(a.lat, a.lon, b.lat, b.lon);
          expect(p.distAlongM[i] - p.distAlongM[i - 1]).toBeGreaterThan(chord - (p.offsetFromShapeM[i - 1]! + p.offsetFromShapeM[i]!) - 1);
        }
        expect(p.gapRunTimeS).toHaveLength(p.stopIdx.length - 1);
        expect(p.path.length).toBeGreaterThanOrEqual(2);
      }
    });

    it('gives stable pattern ids', () => {
      const ids = set.patterns.map((p) => p.id);
      expect(new Set(ids).size).toBe(ids.length);
      expect(buildPatterns(feed).patterns.map((p) => p.id)).toEqual(ids);
    });
  });
}
