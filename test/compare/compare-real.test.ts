// compareFeeds on the real Manhattan bus feed against a copy altered here (three stops removed from
// stops.txt and stop_times.txt, one moved 50 m, one renamed): it reports exactly those changes.
import { describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { readZip, writeZip } from '../helpers/zip.js';
import { parse } from 'csv-parse/sync';
import geodesicPkg from 'geographiclib-geodesic';
import { readFeed } from '../../src/gtfs/index.js';
import { buildPatterns } from '../../src/network/index.js';
import { compareFeeds } from '../../src/compare/compare.js';
import { checkFeed } from '../../src/check/check.js';
import { compareExitCode } from '../../src/cli/compare.js';

const FEEDS = process.env.STOPSPAN_FEEDS ?? resolve(__dirname, '../../../shared/feeds');
const BUS = join(FEEDS, 'nyct-bus-manhattan.zip');
const SUBWAY = join(FEEDS, 'nyct-subway.zip');
const DATE = '2026-10-14'; // the date of the feeds' README facts, a Wednesday
const Geodesic = (geodesicPkg as any).Geodesic;

describe.skipIf(!existsSync(BUS))('compare on the Manhattan bus feed', () => {
  it('reports exactly three stops removed, one moved 50 m and one renamed', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'stopspan-compare-'));
    try {
      const oldFeed = await readFeed(BUS, { date: 'all' });
      const oldPatterns = buildPatterns(oldFeed, { date: DATE });
      // the feeds' README: 151 patterns on 2026-10-14 [real feed fact]
      expect(oldPatterns.patterns.length).toBe(151);

      // pick interior stops of three different patterns to remove, a fourth to move and a fifth to rename
      const used = new Set<string>();
      const pick = (p: number) => {
        const ids = oldPatterns.patterns[p].stopIdx.map((i) => oldFeed.stops[i].id);
        const id = ids.slice(2, -2).find((x) => !used.has(x))!;
        used.add(id);
        return id;
      };
      const removedIds = [pick(0), pick(10), pick(20)].sort();
      const movedId = pick(30);
      const renamedId = pick(40);

      const files = await readZip(BUS);
      const stopsText = files.get('stops.txt')!.toString('utf8');
      const timesText = files.get('stop_times.txt')!.toString('utf8');
      expect(stopsText.includes('"') || timesText.includes('"')).toBe(false); // so lines can be split on commas
      // csv-parse as the independent reading of stops.txt
      const rows: string[][] = parse(stopsText, { relax_column_count: false });
      const header = rows[0];
      const iId = header.indexOf('stop_id');
      const iName = header.indexOf('stop_name');
      const iLat = header.indexOf('stop_lat');
      const iLon = header.indexOf('stop_lon');
      const lines = stopsText.split('\n');
      let moveFrom: [number, number] = [0, 0];
      let moveTo: [number, number] = [0, 0];
      const outLines = lines
        .filter((line, k) => {
          if (k === 0 || line === '') return true;
          const cells = line.split(',');
          return !removedIds.includes(cells[iId]);
        })
        .map((line, k) => {
          if (k === 0 || line === '') return line;
          const cells = line.split(',');
          if (cells[iId] === movedId) {
            const lat = Number(cells[iLat]);
            const lon = Number(cells[iLon]);
            // the point 50 m due north on the WGS84 ellipsoid (geographiclib Direct) [C]
            const d = Geodesic.WGS84.Direct(lat, lon, 0, 50);
            moveFrom = [lat, lon];
            moveTo = [d.lat2, d.lon2];
            cells[iLat] = d.lat2.toFixed(7);
            cells[iLon] = d.lon2.toFixed(7);
          }
          if (cells[iId] === renamedId) cells[iName] = 'VELLMOOR TEST NAME';
          return cells.join(',');
        });
      expect(rows.length - 1 - 3).toBe(outLines.filter((l, k) => k > 0 && l !== '').length);
      const tLines = timesText.split('\n');
      const iStop = tLines[0].split(',').indexOf('stop_id');
      const keptTimes = tLines.filter((l, k) => k === 0 || l === '' || !removedIds.includes(l.split(',')[iStop]));
      expect(tLines.length - keptTimes.length).toBeGreaterThan(0);
      files.set('stops.txt', Buffer.from(outLines.join('\n')));
      files.set('stop_times.txt', Buffer.from(keptTimes.join('\n')));
      const altered = join(dir, 'altered.zip');
      await writeZip(altered, files);

      const newFeed = await readFeed(altered, { date: 'all' });
      const newPatterns = buildPatterns(newFeed, { date: DATE });
      const c = compareFeeds(oldFeed, newFeed, oldPatterns, newPatterns, { moveThresholdM: 10 });

      expect(c.stops.removed.map((s) => s.stopId)).toEqual(removedIds);
      expect(c.stops.added).toEqual([]);
      expect(c.stops.moved.map((s) => s.stopId)).toEqual([movedId]);
      // the move measured here agrees with geographiclib's 50 m within 0.5 % [C]
      const g = Geodesic.WGS84.Inverse(moveFrom[0], moveFrom[1], moveTo[0], moveTo[1]).s12;
      expect(Math.abs(g - 50)).toBeLessThan(0.01);
      expect(Math.abs(c.stops.moved[0].movedM - 50) / 50).toBeLessThan(0.005);
      expect(c.stops.renamed).toEqual([
        { stopId: renamedId, oldName: oldFeed.stops[oldFeed.stopIndex.get(renamedId)!].name, newName: 'VELLMOOR TEST NAME' },
      ]);

      // patterns: exactly those serving a removed stop changed, each dropping only removed stops
      const idsOf = (p: { stopIdx: number[] }) => p.stopIdx.map((i) => oldFeed.stops[i].id);
      const touched = oldPatterns.patterns
        .filter((p) => idsOf(p).some((x) => removedIds.includes(x)))
        .map((p) => p.id)
        .sort();
      expect(touched.length).toBeGreaterThanOrEqual(3);
      expect(c.patterns.changed.map((x) => x.oldPatternId).sort()).toEqual(touched);
      for (const ch of c.patterns.changed) {
        expect(ch.inserted).toEqual([]);
        expect(ch.dropped.length).toBeGreaterThan(0);
        expect(ch.dropped.every((x) => removedIds.includes(x))).toBe(true);
      }
      expect(new Set(c.patterns.changed.flatMap((x) => x.dropped))).toEqual(new Set(removedIds));
      expect(c.patterns.added).toEqual([]);
      expect(c.patterns.removed).toEqual([]);
      expect(c.patterns.unchanged + touched.length).toBe(151);

      // spacing before: the README's median gap along the shape, 222.3 m [real feed fact], within 1 %
      expect(Math.abs(c.spacing.before.medianGapM! - 222.3) / 222.3).toBeLessThan(0.01);
      // README: 1 822 stops in the day's patterns [real feed fact]; of them, stops served count passenger
      // stops only (as the audit does), leaving out 4 where the patterns' trips neither pick up nor drop off [D]
      expect(new Set(oldPatterns.patterns.flatMap((p) => p.stopIdx)).size).toBe(1822);
      expect(c.spacing.before.stopsServed).toBe(1818);
      expect(c.spacing.after.stopsServed).toBe(1818 - 3);
      // three of thousands of gaps merge: the median barely moves (it may move either way) [D]
      expect(Math.abs(c.spacing.after.medianGapM! - c.spacing.before.medianGapM!) / c.spacing.before.medianGapM!).toBeLessThan(0.01);
      expect(c.spacing.after.patterns).toBe(151);

      // and the real feed's service end as documented in the feeds' README: 2027-01-02 [real feed fact]
      const report = checkFeed(oldFeed, oldPatterns, { today: DATE });
      expect(report.serviceEnd).toBe('2027-01-02');
      expect(report.counts['service-ending-soon']).toBe(0);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 240_000);
});

describe.skipIf(!existsSync(BUS))('compare names trips added, cancelled and cut on the Manhattan bus feed', () => {
  it('one trip added, one cancelled and one route halved: exactly those routes and patterns, and the cut fails the run', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'stopspan-compare-trips-'));
    try {
      const oldFeed = await readFeed(BUS, { date: 'all' });
      const oldPatterns = buildPatterns(oldFeed, { date: DATE });
      const routes = [...new Set(oldPatterns.patterns.map((p) => p.routeId))].sort();
      const tripsOf = (routeId: string) =>
        oldPatterns.patterns
          .filter((p) => p.routeId === routeId)
          .flatMap((p) => p.tripIds)
          .sort();
      const [halved, cancelled, grown] = [routes[0], routes[1], routes[2]];
      const drop = new Set(tripsOf(halved).filter((_, k) => k % 2 === 1)); // every second trip of the day
      const cancelledTrip = tripsOf(cancelled)[0];
      drop.add(cancelledTrip);
      const copied = tripsOf(grown)[0];
      const addedTrip = 'VELLMOOR-ADDED-1';

      const files = await readZip(BUS);
      const trips = files.get('trips.txt')!.toString('utf8').split('\n');
      const iTrip = trips[0].split(',').indexOf('trip_id');
      const tripLine = trips.find((l) => l.split(',')[iTrip] === copied)!;
      const keptTrips = trips.filter((l, k) => k === 0 || l === '' || !drop.has(l.split(',')[iTrip]));
      keptTrips.splice(
        1,
        0,
        tripLine
          .split(',')
          .map((x, i) => (i === iTrip ? addedTrip : x))
          .join(','),
      );
      const times = files.get('stop_times.txt')!.toString('utf8').split('\n');
      const keptTimes = times.filter((l, k) => k === 0 || l === '' || !drop.has(l.slice(0, l.indexOf(','))));
      // the added trip runs an hour after the one it copies (times only move; the pattern stays)
      const later = (t: string) => {
        const [h, m, sec] = t.trim().split(':').map(Number);
        return `${String(h + 1).padStart(2, '0')}:${String(m).padStart(2, '0')}:${String(sec).padStart(2, '0')}`;
      };
      for (const l of times) {
        if (!l.startsWith(copied + ',')) continue;
        const cells = l.split(',');
        cells[0] = addedTrip;
        cells[1] = later(cells[1]);
        cells[2] = later(cells[2]);
        keptTimes.push(cells.join(','));
      }
      files.set('trips.txt', Buffer.from(keptTrips.join('\n')));
      files.set('stop_times.txt', Buffer.from(keptTimes.join('\n') + '\n'));
      const altered = join(dir, 'altered.zip');
      await writeZip(altered, files);

      const newFeed = await readFeed(altered, { date: 'all' });
      const newPatterns = buildPatterns(newFeed, { date: DATE });
      const c = compareFeeds(oldFeed, newFeed, oldPatterns, newPatterns);
      const nHalved = tripsOf(halved).length;
      const nCancelled = tripsOf(cancelled).length;
      const nGrown = tripsOf(grown).length;
      const halvedAfter = nHalved - Math.floor(nHalved / 2);
      // the routes, biggest cut first; percentages worked out from the counts [D]
      expect(c.trips.byRoute.map((r) => [r.routeId, r.tripsBefore, r.tripsAfter])).toEqual([
        [halved, nHalved, halvedAfter],
        [cancelled, nCancelled, nCancelled - 1],
        [grown, nGrown, nGrown + 1],
      ]);
      expect(c.trips.byRoute[0].changePct).toBeCloseTo(((halvedAfter - nHalved) / nHalved) * 100, 9);
      // the patterns: the cancelled and the added trip named by trip_id, the halved route's lost trips counted
      const byPattern = c.trips.byPattern;
      expect(byPattern.flatMap((x) => x.tripIdsAdded)).toEqual([addedTrip]);
      expect(byPattern.some((x) => x.routeId === cancelled && x.tripIdsRemoved.includes(cancelledTrip))).toBe(true);
      expect(byPattern.filter((x) => x.routeId === halved).reduce((n, x) => n + x.tripIdsRemovedCount, 0)).toBe(Math.floor(nHalved / 2));
      expect(new Set(byPattern.map((x) => x.routeId))).toEqual(new Set([halved, cancelled, grown]));
      // no stop changed, and a pattern whose trips changed is not counted unchanged
      expect(c.patterns.changed).toEqual([]);
      expect(c.patterns.unchanged + byPattern.length + c.patterns.removed.length).toBe(oldPatterns.patterns.length);
      expect(c.spacing.after.tripsPerDay - c.spacing.before.tripsPerDay).toBe(-Math.floor(nHalved / 2) - 1 + 1);
      // a nightly job failing on a route losing more than 40 % of its trips, and not on 60 %
      expect(compareExitCode(c, 40)).toBe(1);
      expect(compareExitCode(c, 60)).toBe(0);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 240_000);
});

describe.skipIf(!existsSync(SUBWAY))('check on the subway feed', () => {
  it('sees the service end documented for the feed, and flags it within a week of it', async () => {
    const feed = await readFeed(SUBWAY, { date: 'all' });
    const patterns = buildPatterns(feed, { date: DATE });
    // the feeds' README: subway service runs to 2026-10-31 [real feed fact]
    expect(checkFeed(feed, patterns, { today: DATE }).serviceEnd).toBe('2026-10-31');
    expect(checkFeed(feed, patterns, { today: DATE }).counts['service-ending-soon']).toBe(0);
    // GTFS Schedule best practices: valid for at least the next 7 days [C]
    expect(checkFeed(feed, patterns, { today: '2026-10-28' }).counts['service-ending-soon']).toBe(1);
    expect(checkFeed(feed, patterns, { today: '2026-10-24' }).counts['service-ending-soon']).toBe(0);
  }, 120_000);
});
